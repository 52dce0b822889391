import { LEAK_HANDLING } from "./caution";
import type { TRulebook } from "./rulebook";

export const euAdr: TRulebook = {
  id: "eu-adr",
  title: "EU: List of Waste, Basel guidelines and ADR",
  version: "2026.1",
  jurisdiction: "EU",
  labelWording: "Hazardous waste: lead batteries, waste code 16 06 01*",
  labelCitation: "Code from Decision 2000/532/EC (List of Waste); the wording is a project estimate — confirm locally",
  wasteCodes: [
    { code: "16 06 01*", title: "Lead batteries", citation: "Decision 2000/532/EC (a revision of the battery codes is pending)" },
    { code: "16 06 06*", title: "Separately collected electrolyte from batteries", citation: "Decision 2000/532/EC" },
    { code: "A1160", title: "Waste lead-acid batteries, whole or crushed", citation: "Basel Convention, Annex VIII" },
  ],
  rules: [
    {
      id: "eu-storage-one-year",
      title: "Each container goes on to recovery within one year of its start date",
      metric: "container-age-days",
      threshold: 365,
      unit: "days",
      warningPct: 92,
      warningMargin: 30,
      trigger: "above",
      citation:
        "Project estimate — confirm locally. The Basel Convention technical guidelines on waste lead-acid batteries ask for sound storage until recovery; the one-year period is ours, not theirs.",
      caution:
        "Your permit or national law sets the real storage period, which may be shorter; add it as a site rule. The year is counted as 365 days from the start date (day 0).",
    },
    {
      id: "eu-leaking-closed",
      title: "Leaking or damaged units only in closed, acid-proof boxes",
      metric: "leaking-open-container",
      threshold: 0,
      unit: "count",
      warningPct: 100,
      trigger: "above",
      citation:
        "ADR P801 (used batteries go loose only in stainless-steel or plastic boxes able to hold free liquid) and ADR 3.3.1 special provision 598 (cases undamaged and secured against leaking). These are transport rules; applying them to storage is a project estimate — confirm locally.",
      caution: LEAK_HANDLING,
    },
  ],
};
