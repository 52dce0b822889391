/** DESIGN.md §6: shown wherever the tool states a legal conclusion. */
export const GENERAL_CAUTION =
  "These figures are estimates to help a trained person decide, not to decide for them. " +
  "Local, state and national rules may be stricter than shown here. " +
  "Confirm with the authority having jurisdiction.";

/** The same guidance in one sentence, for rule cautions and labels. */
export const LEAK_HANDLING =
  "Wear acid-resistant gloves and eye protection. Soak up spilled acid with a neutralising absorbent. " +
  "Put the unit upright in a closed container that acid cannot eat through, and keep that container closed.";

/** Shown where a leaking, cracked or damaged unit is logged (40 CFR 273.13(a)(1), 273.33(a)(1)). */
export const HANDLING_CAUTION = {
  title: "Damaged unit: handle as corrosive",
  steps: [
    "Put on acid-resistant gloves and eye protection before you touch it.",
    "Keep it upright and move it straight into a closed, structurally sound, compatible container that does not leak.",
    "Cover any spilled acid with neutralising absorbent, and keep the used absorbent with the unit.",
    "Follow your site's procedure; local rules and licensed practice come first.",
  ],
  citation: "40 CFR 273.13(a)(1), 273.33(a)(1)",
};
