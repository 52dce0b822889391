import { LEAK_HANDLING } from "./caution";
import type { TRulebook } from "./rulebook";

/** EPCRA Tier II thresholds in pounds, at any one time: the sulfuric acid figure is min(500 lb, TPQ 1 000 lb). */
export const TIER_TWO_ACID_THRESHOLD_LB = 500; // 40 CFR 370.10(a)(1)
export const TIER_TWO_LEAD_THRESHOLD_LB = 10_000; // 40 CFR 370.10(a)

const TIER_TWO_EXEMPTION =
  "Batteries held for sale to the public are exempt as consumer products; spent batteries are not, so leave the site's exemption off where spent units are kept.";

export const usFederal: TRulebook = {
  id: "us-federal",
  title: "US federal: EPA universal waste and EPCRA Tier II",
  version: "2026.1",
  jurisdiction: "US",
  labelWording: "Universal Waste—Batteries",
  labelCitation: '40 CFR 273.14(a), 273.34(a) ("Waste Batteries" and "Used Batteries" are also allowed)',
  wasteCodes: [
    { code: "D002", title: "Corrosive (the sulfuric acid electrolyte)", citation: "EPA RCRA guidance" },
    { code: "D008", title: "Toxic for lead", citation: "EPA RCRA guidance" },
  ],
  rules: [
    {
      id: "us-uw-large-quantity-handler",
      title: "Large quantity handler of universal waste: 5 000 kg on site at any time",
      metric: "battery-kg",
      threshold: 5000,
      unit: "kg",
      warningPct: 80,
      sticky: "calendar-year",
      addsOtherUniversalWaste: true,
      citation: "40 CFR 273.9 (small and large quantity handler of universal waste)",
      caution:
        "All universal waste on site counts together, and a battery counts at its whole mass. Once 5 000 kg is reached the site stays a large quantity handler until 31 December: it needs an EPA ID number (40 CFR 273.32) and must keep shipment records for three years (40 CFR 273.39).",
    },
    {
      id: "us-uw-one-year",
      title: "Each container leaves within one year of its start date",
      metric: "container-age-days",
      threshold: 365,
      unit: "days",
      // 30 days before the limit; warningMargin governs (335 / 365 ≈ 92 % is kept for percent displays).
      warningPct: 92,
      warningMargin: 30,
      trigger: "above",
      citation: "40 CFR 273.15(a) (small quantity handler), 40 CFR 273.35(a) (large quantity handler)",
      caution:
        "The year is counted as 365 days from the accumulation start date (that date is day 0; day 365 is the last day on site), so when 29 February falls in between, the last day comes one day before the calendar anniversary. Keeping waste longer is allowed only to gather the quantity needed for proper recovery, and the handler must be able to prove it (40 CFR 273.15, 273.35).",
    },
    {
      id: "us-tier2-sulfuric-acid",
      title: "Tier II reporting: sulfuric acid, 500 lb on site at any one time",
      metric: "acid-kg",
      threshold: TIER_TWO_ACID_THRESHOLD_LB,
      unit: "lb",
      warningPct: 80,
      isConsumerExemptible: true,
      citation:
        "40 CFR 370.10(a)(1); sulfuric acid (CAS 7664-93-9) is an extremely hazardous substance, 40 CFR 355 Appendix A",
      caution: `Add up the acid in every battery and in any other form on site. ${TIER_TWO_EXEMPTION} The report is due by 1 March for the year before.`,
    },
    {
      id: "us-tier2-lead",
      title: "Tier II reporting: lead, 10 000 lb on site at any one time",
      metric: "lead-kg",
      threshold: TIER_TWO_LEAD_THRESHOLD_LB,
      unit: "lb",
      warningPct: 80,
      isConsumerExemptible: true,
      citation: "40 CFR 370.10(a); lead (CAS 7439-92-1) is not an extremely hazardous substance",
      caution: `Lead in metal and compounds, as Pb. Batteries may be reported as a mixture by total weight or by their lead (EPA EPCRA FAQ; 55 FR 30640). ${TIER_TWO_EXEMPTION}`,
    },
    {
      id: "us-uw-leaking-closed",
      title: "Leaking or damaged units only in closed containers",
      metric: "leaking-open-container",
      threshold: 0,
      unit: "count",
      warningPct: 100,
      trigger: "above",
      citation: "40 CFR 273.13(a)(1), 40 CFR 273.33(a)(1)",
      caution: `The container must be closed, structurally sound, compatible with the acid and free of leaks. ${LEAK_HANDLING}`,
    },
  ],
};
