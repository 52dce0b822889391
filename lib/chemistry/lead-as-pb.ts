import type { TCitedRange } from "./kind-table";
import { PB_SHARE } from "./molar-masses";

export type TFractionRange = { readonly low: number; readonly value: number; readonly high: number };

/**
 * Pb share of the paste. A fully discharged paste is all PbSO4 (207.2 / 303.256 = 0.683); a charged one is
 * sponge Pb and PbO2 in equal moles (2 × 207.2 / 446.398 = 0.928). Spent units are often part-discharged,
 * so the value takes the midpoint and the range spans both states. Residual PbO (0.928) lies inside.
 */
export const PASTE_PB_SHARE: TFractionRange = {
  low: PB_SHARE.PbSO4,
  value: (PB_SHARE.PbSO4 + PB_SHARE.chargedPaste) / 2,
  high: PB_SHARE.chargedPaste,
};

/**
 * Pb per kg of lead-bearing material: metal counts whole, paste by its Pb share.
 *
 * Why the Basel figure (lead, metal and compounds, 65–75 wt%) is read as the mass of the compounds and not
 * as Pb: the guideline names the materials ("metal and compounds") and does not convert them, and read as
 * Pb it would not fit its own electrolyte share. A spent, part-discharged unit with 70 % Pb, 20 % electrolyte
 * and about 7 % case would leave 3 % for the oxygen and sulfate bound to the paste lead; but with half of the
 * lead in paste, that bound mass is about 35 % × (1/0.928 − 1) ≈ 3 % when fully charged (no room left for
 * separators or anything else) and 35 % × (1/0.683 − 1) ≈ 16 % when discharged, which overflows. So
 * 65–75 % is the lead-bearing mass, and Pb is about 79–97 % of it (metal share 35–55 %, paste as above).
 */
export function pbShareOfLeadBearing({ metallicShare }: { metallicShare: TFractionRange }): TFractionRange {
  const at = (metal: number, paste: number) => metal + (1 - metal) * paste;
  return {
    low: at(metallicShare.low, PASTE_PB_SHARE.low),
    value: at(metallicShare.value, PASTE_PB_SHARE.value),
    high: at(metallicShare.high, PASTE_PB_SHARE.high),
  };
}

/**
 * Fractions of the battery mass, lead as elemental Pb. "Other" takes what the conversion removes from the
 * lead-bearing mass (oxygen and sulfate bound to lead) plus the kind's misc share, so the four values add
 * up to 1 exactly when the kind's four table values do.
 */
export function batteryFractions(p: {
  leadBearingFraction: TCitedRange;
  metallicShare: TCitedRange;
  electrolyteFraction: TCitedRange;
  polymerFraction: TCitedRange;
  miscFraction: TCitedRange;
}): { lead: TFractionRange; electrolyte: TFractionRange; polymer: TFractionRange; other: TFractionRange } {
  const share = pbShareOfLeadBearing({ metallicShare: p.metallicShare });
  const lb = p.leadBearingFraction;
  const lead = { low: lb.low * share.low, value: lb.value * share.value, high: lb.high * share.high };
  const other = {
    low: lb.low * (1 - share.high) + p.miscFraction.low,
    value: 1 - lead.value - p.electrolyteFraction.value - p.polymerFraction.value,
    high: lb.high * (1 - share.low) + p.miscFraction.high,
  };
  const range = (r: TCitedRange): TFractionRange => ({ low: r.low, value: r.value, high: r.high });
  return { lead, electrolyte: range(p.electrolyteFraction), polymer: range(p.polymerFraction), other };
}
