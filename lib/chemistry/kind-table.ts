import type { TBatteryKind } from "./kinds";

/** A figure with its range and where it comes from: a REFERENCES.md entry, or "project estimate: …". */
export type TCitedRange = { readonly low: number; readonly value: number; readonly high: number; readonly source: string };

export type TKindParameters = {
  /**
   * Lead-bearing material (grids, straps, posts and paste, weighed as the compounds they are) per kg of
   * battery. Converted to elemental Pb in lead-as-pb.ts.
   */
  readonly leadBearingFraction: TCitedRange;
  /** Metallic lead (grids, straps, posts) as a share of the lead-bearing mass; the rest is paste. */
  readonly metallicShare: TCitedRange;
  /** Electrolyte (the acid solution only) per kg of battery. */
  readonly electrolyteFraction: TCitedRange;
  /** Case, lid and polymer separators per kg of battery. */
  readonly polymerFraction: TCitedRange;
  /**
   * Everything else that is neither lead-bearing, electrolyte nor polymer: glass mat, silica, steel,
   * labels. The oxygen and sulfate bound to lead in the paste are added to "other" by the model.
   */
  readonly miscFraction: TCitedRange;
  /** Wh per kg of battery at the 20 h rating, to estimate weight from Ah × V. */
  readonly specificEnergyWhPerKg: TCitedRange;
  /** Electrolyte SG when charged (the conservative default for acid). */
  readonly chargedSpecificGravity: TCitedRange;
  /** Weight per 2 V cell of a typical unit, when nothing but the kind and voltage is known. */
  readonly defaultKgPerCell: TCitedRange;
  /** How the kind's figures were chosen, when not one by one. */
  readonly basis?: string;
};

const cited = (low: number, value: number, high: number, source: string): TCitedRange => ({ low, value, high, source });
const project = (why: string) => `project estimate: ${why}`;

const BASEL_LEAD = "Basel Convention technical guidelines on waste lead-acid batteries: lead (metal and compounds) 65–75 wt% (REFERENCES.md, V2)";
const BASEL_ELECTROLYTE = "Basel Convention technical guidelines on waste lead-acid batteries: electrolyte 15–25 wt% (REFERENCES.md, V2)";
const BASEL_MASS = "Basel Convention technical guidelines: a car battery weighs 10–30 kg (REFERENCES.md, V2), over 6 cells";
const SG_AUTOMOTIVE = "battery service references: charged 1.260–1.280 automotive, 1.265–1.300 also cited (REFERENCES.md, V2)";
const SG_TRACTION = "battery service references: charged 1.285 industrial traction (REFERENCES.md, V2); range a project estimate";

/** Grids and posts against paste: the same wide guess for all kinds but traction (heavier tube spines). */
const METALLIC_SHARE = cited(0.35, 0.45, 0.55, project("grids, straps and posts are roughly 35–55 % of the lead-bearing mass (from memory, unverified; kept wide)"));

const FLOODED: TKindParameters = {
  // Basel gives the range. Our value sits below its middle because the electrolyte value sits near the
  // top of its range (below), and the four values must add up to the whole battery.
  leadBearingFraction: cited(0.65, 0.67, 0.75, `${BASEL_LEAD}; value a project estimate`),
  metallicShare: METALLIC_SHARE,
  // Near the top of Basel's range: acid is reported charged, when the electrolyte holds all the sulfate;
  // and at the specific energy below, the Faraday floor of the 20 h rating already needs about 21 %.
  electrolyteFraction: cited(0.15, 0.24, 0.25, `${BASEL_ELECTROLYTE}; value a project estimate`),
  polymerFraction: cited(0.04, 0.07, 0.12, project("polypropylene case and lid plus polyethylene separators")),
  miscFraction: cited(0.005, 0.02, 0.05, project("additives, labels, residues")),
  // The published 30–40 Wh/kg (SLI about 35) would put a 100 Ah car battery at 34 kg, above Basel's 10–30 kg
  // for car batteries; 40–100 Ah car batteries fit 10–30 kg only between 40 and 48 Wh/kg. Value: the middle
  // of that, 44. Low end: the published 30. High end: ours, for light modern designs.
  specificEnergyWhPerKg: cited(30, 44, 55, project("value 44 Wh/kg so that 40–100 Ah car batteries weigh 10–30 kg (Basel); low end the published 30 Wh/kg (Linden's Handbook of Batteries, REFERENCES.md V2/M)")),
  chargedSpecificGravity: cited(1.26, 1.28, 1.3, SG_AUTOMOTIVE),
  defaultKgPerCell: cited(10 / 6, 3, 30 / 6, `${BASEL_MASS}; value (18 kg a 12 V unit) a project estimate`),
};

export const KIND_TABLE: Readonly<Record<TBatteryKind, TKindParameters>> = {
  flooded: FLOODED,
  efb: {
    ...FLOODED,
    basis: "project choice: the flooded starting figures, since an EFB is a flooded starting design (added carbon and plate scrim)",
  },
  agm: {
    leadBearingFraction: cited(0.65, 0.69, 0.8, project("Basel's 65–75 % for flooded units, top raised to 80 % for a starved-electrolyte design")),
    metallicShare: METALLIC_SHARE,
    electrolyteFraction: cited(0.12, 0.2, 0.25, project("acid held in glass mat: less than a flooded unit")),
    polymerFraction: cited(0.04, 0.07, 0.12, project("polypropylene case and lid")),
    miscFraction: cited(0.01, 0.04, 0.08, project("glass-mat separators, valves")),
    specificEnergyWhPerKg: cited(30, 41, 52, project("a little heavier than flooded starting units of the same capacity")),
    chargedSpecificGravity: cited(1.28, 1.3, 1.33, project("valve-regulated designs fill stronger acid, from the top of the cited 1.265–1.300 upward (from memory)")),
    defaultKgPerCell: cited(1.5, 3.3, 6, project("car-size AGM units, 9–36 kg at 12 V")),
  },
  gel: {
    leadBearingFraction: cited(0.6, 0.68, 0.78, project("Basel's 65–75 % widened both ways: gel units are mostly deep-cycle designs")),
    metallicShare: METALLIC_SHARE,
    electrolyteFraction: cited(0.12, 0.2, 0.26, project("acid held in a silica gel; the silica is counted as other")),
    polymerFraction: cited(0.04, 0.08, 0.14, project("case, lid and separators")),
    miscFraction: cited(0.01, 0.04, 0.1, project("fumed silica, valves")),
    specificEnergyWhPerKg: cited(22, 33, 45, project("deep-cycle designs: around and below the published 30–40 Wh/kg")),
    chargedSpecificGravity: cited(1.24, 1.28, 1.31, project("gel units fill 1.24–1.31 (from memory, unverified)")),
    defaultKgPerCell: cited(0.3, 4, 60, project("from small 12 V blocks to large 2 V cells: very wide")),
  },
  powersport: {
    leadBearingFraction: cited(0.58, 0.65, 0.75, project("Basel's 65–75 %, lower end widened: small units carry more case per kg")),
    metallicShare: METALLIC_SHARE,
    electrolyteFraction: cited(0.15, 0.22, 0.28, project("Basel's 15–25 % widened upward for small flooded units")),
    polymerFraction: cited(0.06, 0.1, 0.18, project("case and lid are a larger share of a small unit")),
    miscFraction: cited(0.005, 0.03, 0.06, project("vent tubes, additives, labels")),
    specificEnergyWhPerKg: cited(20, 32, 45, project("small units: wide around the published 30–40 Wh/kg")),
    chargedSpecificGravity: cited(1.26, 1.28, 1.3, SG_AUTOMOTIVE),
    defaultKgPerCell: cited(0.2, 0.7, 2.5, project("about 1–15 kg at 12 V")),
  },
  "deep-cycle": {
    leadBearingFraction: cited(0.63, 0.7, 0.78, project("Basel's 65–75 %, widened upward for thicker plates")),
    metallicShare: METALLIC_SHARE,
    electrolyteFraction: cited(0.15, 0.22, 0.28, project("Basel's 15–25 % widened upward: more room below the plates")),
    polymerFraction: cited(0.03, 0.06, 0.1, project("case, lid and separators")),
    miscFraction: cited(0.005, 0.02, 0.06, project("additives, labels, residues")),
    specificEnergyWhPerKg: cited(22, 32, 42, project("heavier than a starting unit of the same capacity (thicker plates: common practice, REFERENCES.md)")),
    chargedSpecificGravity: cited(1.265, 1.28, 1.3, SG_AUTOMOTIVE),
    defaultKgPerCell: cited(1.5, 4.5, 12, project("12 V units of 20–35 kg and 6 V golf-cart units near 28 kg")),
  },
  traction: {
    leadBearingFraction: cited(0.55, 0.62, 0.75, project("Basel's 65–75 %, lower end widened for the steel tray of a whole traction battery")),
    metallicShare: cited(0.35, 0.45, 0.6, project("tubular positive spines add metal: top end raised")),
    electrolyteFraction: cited(0.18, 0.25, 0.3, project("flooded tubular cells carry much free acid")),
    polymerFraction: cited(0.02, 0.05, 0.08, project("cell jars, lids and tube gauntlets")),
    miscFraction: cited(0.01, 0.08, 0.15, project("steel tray, intercell connectors and cables of a whole battery")),
    specificEnergyWhPerKg: cited(20, 28, 38, project("industrial cells, below starting units")),
    chargedSpecificGravity: cited(1.27, 1.285, 1.3, SG_TRACTION),
    defaultKgPerCell: cited(8, 35, 90, project("2 V forklift cells of about 200–1 000 Ah")),
  },
  stationary: {
    leadBearingFraction: cited(0.6, 0.7, 0.8, project("Basel's 65–75 % widened both ways for valve-regulated standby designs")),
    metallicShare: METALLIC_SHARE,
    electrolyteFraction: cited(0.1, 0.18, 0.25, project("absorbed or gelled acid: less than flooded")),
    polymerFraction: cited(0.04, 0.08, 0.14, project("case and lid; flame-retardant plastics")),
    miscFraction: cited(0.01, 0.04, 0.1, project("glass mat or silica, valves")),
    specificEnergyWhPerKg: cited(22, 33, 45, project("standby designs around the published 30–40 Wh/kg")),
    chargedSpecificGravity: cited(1.28, 1.3, 1.32, project("valve-regulated designs fill stronger acid (from memory)")),
    defaultKgPerCell: cited(0.35, 4, 100, project("from 12 V 7 Ah blocks near 2 kg to 2 V cells of 200 kg: very wide")),
  },
};
