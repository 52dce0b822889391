import { AppError } from "@/lib/errors";
import { ACID_TABLE_RANGE, acidFractionAt20C, specificGravityAt20C } from "./acid-mass-fraction";
import { VOLTS_PER_CELL } from "./cells-for";
import { compositionInputIssues, type TCompositionInput } from "./composition-input";
import { FLOOR_KG_PER_AH_CELL } from "./faraday-floor";
import { groupWeight } from "./group-sizes";
import { KIND_MODEL } from "./kind-model";

/** A mass in kg with its range: low ≤ value ≤ high. */
export type TMassRange = { value: number; low: number; high: number };

export type TCompositionMethod = "weighed" | "from-capacity" | "from-group-size" | "kind-default";

export type TComposition = {
  cells: number;
  method: TCompositionMethod;
  batteryKg: TMassRange;
  /** Elemental Pb: metal plus the lead in oxides and sulfate, converted by molar mass. */
  leadKg: TMassRange;
  /** The acid solution; its H2SO4 is `sulfuricAcidKg`, a part of it, not an extra. */
  electrolyteKg: TMassRange;
  sulfuricAcidKg: TMassRange;
  polymerKg: TMassRange;
  /** Separators, glass mat, steel, and the oxygen and sulfate bound to lead in the paste. */
  otherKg: TMassRange;
  /** Which inputs drove the estimate. */
  notes: string[];
  /** What a person should look at: inputs that contradict physics, weak estimates, odd readings. */
  warnings: string[];
};

/**
 * Half-width of the band around a measured SG: a hydrometer is read to about 0.005 (project estimate,
 * from memory).
 */
export const MEASURED_SG_BAND = 0.005;

/** Below this (at 20 °C) a reading points to a discharged unit: charged is about 1.26–1.30 (REFERENCES.md). */
const DISCHARGED_BELOW_SG = 1.2;
/**
 * A weighed unit whose capacity × voltage per kg exceeds the top of the kind's specific-energy range by this
 * factor is more likely mistyped than real (project choice).
 */
export const LIGHT_FOR_CAPACITY = 1.25;
/** A reading this far above the kind's charged range is more likely a misreading than stronger acid. */
const ABOVE_CHARGED_MARGIN = 0.02;

// Fixed texts (the numbers are in the ranges beside them): the hot path formats nothing.
const NOTE = {
  weighed: "Battery mass: the measured weight.",
  lead: "Lead is elemental Pb: grids and posts plus the lead in the oxide and sulfate paste, converted by molar mass.",
  leadLowRaised: "The low end of the lead range was raised to the Faraday floor of the rated capacity.",
  acidLowRaised: "The low end of the acid range was raised to the Faraday floor of the rated capacity.",
  // A floor that binds on a part while the battery mass clears its own floor means the kind's typical share
  // is low for this unit, not that the inputs are wrong, so it is a note. Inputs that contradict physics
  // show on the battery mass (below its reactants, or light for the capacity) and are warned about there.
  leadAtFloor: "The lead was raised to the Faraday floor of the rated capacity: the typical lead share of this kind would give less.",
  acidAtFloor:
    "The acid was raised to the Faraday floor of the rated capacity: a charged unit holds at least that much, part of it as sulfate in the plates when discharged.",
  measuredAcidAtFloor:
    "The measured specific gravity gives less acid than the rated capacity holds when charged. The rest is bound as lead sulfate in the plates and returns to the electrolyte on charging, so the acid is reported at the Faraday floor.",
  measuredAcid: "Acid from the measured specific gravity, corrected to 20 °C.",
  noTemperature: "No electrolyte temperature was given: the reading is taken as at 20 °C.",
  discharged:
    "The specific gravity points to a discharged unit. The sulfate bound in its plates still counts as lead compounds, and the lead is unchanged.",
  temperatureUnused: "The electrolyte temperature was not used: no specific gravity was given.",
  ccaUnused: "CCA is recorded but does not enter the estimate: cranking current says little about the lead inside.",
  groupUnknown: "The group size is not in the weight table, so it was not used.",
  noCapacity: "No capacity was given, so the estimate could not be checked against the Faraday floor.",
} as const;

const WARNING = {
  batteryRaised:
    "The weight is below the least a battery of this capacity and voltage can weigh (its reactants, by Faraday's law). The figures were raised to that floor: check the weight and the capacity.",
} as const;

// Shared scratch for fitToFloors: the estimate is synchronous, so one buffer serves every call.
const parts = new Float64Array(4);

/**
 * The electrolyte's floor is the Faraday acid alone, not that acid diluted to a battery strength: a stricter
 * floor would have to take mass from lead above its floor and make the lead fall as the stated capacity
 * rises. Only a weight far too light for the capacity (already warned about, at over twice the specific
 * energy of any kind) reaches the floor, and the electrolyte then reads as pure acid.
 *
 * Raises lead and electrolyte to their floors, then brings the four parts down to at most `total`, taking
 * from polymer and other first and only then from what lead and electrolyte hold above their floors.
 * `total` is never below the sum of the floors (the battery is raised to the Faraday floor first).
 */
function fitToFloors(total: number, lead: number, elec: number, poly: number, other: number, leadFloor: number, elecFloor: number) {
  if (lead < leadFloor) lead = leadFloor;
  if (elec < elecFloor) elec = elecFloor;
  let excess = lead + elec + poly + other - total;
  if (excess > 0) {
    const donors = poly + other;
    if (donors >= excess) {
      const k = (donors - excess) / donors;
      poly *= k;
      other *= k;
    } else {
      excess -= donors;
      poly = 0;
      other = 0;
      const slack = lead - leadFloor + (elec - elecFloor);
      const k = slack > excess ? (slack - excess) / slack : 0;
      lead = leadFloor + (lead - leadFloor) * k;
      elec = elecFloor + (elec - elecFloor) * k;
    }
  }
  parts[0] = lead;
  parts[1] = elec;
  parts[2] = poly;
  parts[3] = other;
}

/**
 * Estimates what one battery holds: lead (as Pb), electrolyte and its sulfuric acid, polymer and other, each
 * with a range, from its kind, voltage, and whatever of capacity, group size, weight and SG is known.
 * Battery mass comes from, in order: the measured weight; capacity × voltage over the kind's specific
 * energy; the group size's typical weight; a typical unit of the kind. No figure goes below the Faraday
 * floor of the rated capacity. Validates its input with the same limits as `ZCompositionInput`.
 */
export function estimateComposition(input: TCompositionInput): TComposition {
  const issues = compositionInputIssues(input);
  if (issues !== null) throw new AppError("invalid_input", "the battery details are not valid", issues);

  const model = KIND_MODEL[input.kind];
  const volts = input.nominalVoltage;
  const cells = volts / VOLTS_PER_CELL;
  const capacityAh = input.capacityAh ?? 0;
  const notes: string[] = [];
  const warnings: string[] = [];

  const ahCells = capacityAh * cells;
  const leadFloor = ahCells * FLOOR_KG_PER_AH_CELL.lead;
  const acidFloor = ahCells * FLOOR_KG_PER_AH_CELL.sulfuricAcid;
  const batteryFloor = ahCells * FLOOR_KG_PER_AH_CELL.reactants;

  // Battery mass.
  let method: TCompositionMethod;
  let bV: number;
  let bL: number;
  let bH: number;
  const hasGroupSize = input.groupSize != null && input.groupSize.trim() !== "";
  const group = hasGroupSize ? groupWeight(input.groupSize as string) : undefined;
  const groupFits = group !== undefined && model.usesGroupSize && group.nominalVoltage === volts;
  if (input.weightKg != null) {
    method = "weighed";
    bV = bL = bH = input.weightKg;
    notes.push(NOTE.weighed);
    if (capacityAh > 0 && (capacityAh * volts) / bV > model.specificEnergyWhPerKg.high * LIGHT_FOR_CAPACITY) {
      warnings.push(model.text.lightForCapacity);
    }
  } else if (capacityAh > 0) {
    method = "from-capacity";
    const wh = capacityAh * volts;
    const se = model.specificEnergyWhPerKg;
    bV = wh / se.value;
    bL = wh / se.high;
    bH = wh / se.low;
    notes.push(model.text.fromCapacity);
    if (groupFits && (bV < group.lowKg || bV > group.highKg)) {
      warnings.push(group.text.capacityMismatch);
    }
  } else if (groupFits) {
    method = "from-group-size";
    bV = group.valueKg;
    bL = group.lowKg;
    bH = group.highKg;
    notes.push(group.text.fromGroup);
  } else {
    method = "kind-default";
    const perCell = model.defaultKgPerCell;
    bV = perCell.value * cells;
    bL = perCell.low * cells;
    bH = perCell.high * cells;
    if (hasGroupSize) {
      notes.push(group === undefined ? NOTE.groupUnknown : group.text.notForThisUnit);
    }
    warnings.push(model.text.kindDefault);
  }
  if (method === "weighed" && groupFits && (bV < group.lowKg * 0.5 || bV > group.highKg * 1.5)) {
    warnings.push(group.text.weightMismatch);
  }

  if (capacityAh === 0) notes.push(NOTE.noCapacity);
  else if (bV < batteryFloor) warnings.push(WARNING.batteryRaised);
  if (bV < batteryFloor) bV = batteryFloor;
  if (bL < batteryFloor) bL = batteryFloor;
  if (bH < batteryFloor) bH = batteryFloor;

  // Parts: values add up to the battery exactly; lows add up to at most its low end.
  const { lead: fl, electrolyte: fe, polymer: fp, other: fo } = model;
  const leadByFraction = bV * fl.value;
  const elecByFraction = bV * fe.value;
  const polyByFraction = bV * fp.value;
  fitToFloors(bV, leadByFraction, elecByFraction, polyByFraction, bV - leadByFraction - elecByFraction - polyByFraction, leadFloor, acidFloor);
  const leadV = parts[0];
  const elecV = parts[1];
  const polyV = parts[2];
  const otherRest = bV - leadV - elecV - polyV;
  const otherV = otherRest > 0 ? otherRest : 0;
  notes.push(NOTE.lead);
  if (leadByFraction < leadFloor) notes.push(NOTE.leadAtFloor);
  else if (bL * fl.low < leadFloor) notes.push(NOTE.leadLowRaised);

  fitToFloors(bL, bL * fl.low, bL * fe.low, bL * fp.low, bL * fo.low, leadFloor, acidFloor);
  const leadL = Math.min(parts[0], leadV);
  const elecL = Math.min(parts[1], elecV);
  const polyL = Math.min(parts[2], polyV);
  const otherL = Math.min(parts[3], otherV);

  const leadH = Math.max(bH * fl.high, leadV);
  const elecH = Math.max(bH * fe.high, elecV);
  const polyH = Math.max(bH * fp.high, polyV);
  const otherH = Math.max(bH * fo.high, otherV);

  // Acid: charged state unless measured.
  let wV: number;
  let wL: number;
  let wH: number;
  const isMeasured = input.specificGravity != null;
  if (isMeasured) {
    const sg20 = specificGravityAt20C(input.specificGravity as number, input.electrolyteTempC);
    wV = acidFractionAt20C(sg20);
    wL = acidFractionAt20C(Math.max(ACID_TABLE_RANGE.min, sg20 - MEASURED_SG_BAND));
    wH = acidFractionAt20C(Math.min(ACID_TABLE_RANGE.max, sg20 + MEASURED_SG_BAND));
    notes.push(NOTE.measuredAcid);
    if (input.electrolyteTempC == null) notes.push(NOTE.noTemperature);
    if (sg20 < DISCHARGED_BELOW_SG) notes.push(NOTE.discharged);
    else if (sg20 > model.chargedSpecificGravity.high + ABOVE_CHARGED_MARGIN) {
      warnings.push(model.text.sgAboveCharged);
    }
  } else {
    const w = model.chargedAcidFraction;
    wV = w.value;
    wL = w.low;
    wH = w.high;
    notes.push(model.text.chargedAcid);
    if (input.electrolyteTempC != null) notes.push(NOTE.temperatureUnused);
  }
  let acidV = elecV * wV;
  if (acidV < acidFloor) {
    notes.push(isMeasured ? NOTE.measuredAcidAtFloor : NOTE.acidAtFloor);
    acidV = acidFloor;
  }
  let acidL = elecL * wL;
  if (acidL < acidFloor) {
    if (acidV > acidFloor) notes.push(NOTE.acidLowRaised);
    acidL = acidFloor;
  }
  const acidH = Math.max(elecH * wH, acidV);

  if (input.cca != null) notes.push(NOTE.ccaUnused);

  return {
    cells,
    method,
    batteryKg: { value: bV, low: bL, high: bH },
    leadKg: { value: leadV, low: leadL, high: leadH },
    electrolyteKg: { value: elecV, low: elecL, high: elecH },
    sulfuricAcidKg: { value: acidV, low: acidL, high: acidH },
    polymerKg: { value: polyV, low: polyL, high: polyH },
    otherKg: { value: otherV, low: otherL, high: otherH },
    notes,
    warnings,
  };
}
