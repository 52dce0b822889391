import { estimateComposition, type TMassRange } from "@/lib/chemistry";
import { INPUT_LIMITS } from "@/lib/chemistry/composition-input";
import type { TBatteryKind } from "@/lib/chemistry/kinds";

export type TLotMixShare = { kind: TBatteryKind; nominalVoltage: number; count?: number; sharePct?: number };

export type TLotKindPart = {
  kind: TBatteryKind;
  nominalVoltage: number;
  /** Units of this kind; fractional when the mix was given by share. */
  units: number;
  /** The part of the net weight given to this kind. */
  massKg: number;
  leadKg: TMassRange;
  electrolyteKg: TMassRange;
  acidKg: TMassRange;
};

export type TLotComposition = {
  batteryKg: number;
  leadKg: TMassRange;
  electrolyteKg: TMassRange;
  acidKg: TMassRange;
  parts: TLotKindPart[];
  notes: string[];
};

const zero = (): TMassRange => ({ value: 0, low: 0, high: 0 });
const addScaled = (sum: TMassRange, r: TMassRange, k: number) => {
  sum.value += r.value * k;
  sum.low += r.low * k;
  sum.high += r.high * k;
};
const clamp = (v: number, min: number, max: number) => Math.min(max, Math.max(min, v));

/**
 * The composition of a weighed lot: the net weight is shared among the kinds of the mix in proportion to
 * units × the kind's typical unit mass (the engine's estimate without a weight), then each kind's share is
 * run through the engine as weighed units, so lead, electrolyte and acid keep the engine's ranges. A mix by
 * share is read as the share of the lot's units.
 */
export function lotComposition({ netKg, unitCount, mixBasis, mix }: { netKg: number; unitCount: number; mixBasis: "count" | "share"; mix: readonly TLotMixShare[] }): TLotComposition {
  const rows = mix
    .map((r) => ({ ...r, units: mixBasis === "count" ? (r.count ?? 0) : (unitCount * (r.sharePct ?? 0)) / 100 }))
    .filter((r) => r.units > 0);
  const typical = rows.map((r) => estimateComposition({ kind: r.kind, nominalVoltage: r.nominalVoltage }).batteryKg.value);
  const typicalTotal = rows.reduce((s, r, i) => s + r.units * typical[i]!, 0);
  const lead = zero();
  const electrolyte = zero();
  const acid = zero();
  const parts = rows.map((r, i): TLotKindPart => {
    const massKg = typicalTotal > 0 ? (netKg * r.units * typical[i]!) / typicalTotal : 0;
    const perUnitKg = clamp(massKg / r.units, INPUT_LIMITS.weightKg.min, INPUT_LIMITS.weightKg.max);
    const c = estimateComposition({ kind: r.kind, nominalVoltage: r.nominalVoltage, weightKg: perUnitKg });
    // The weighed estimate of one unit scaled to the kind's whole part of the net weight.
    const k = massKg / c.batteryKg.value;
    const part = { lead: zero(), electrolyte: zero(), acid: zero() };
    addScaled(part.lead, c.leadKg, k);
    addScaled(part.electrolyte, c.electrolyteKg, k);
    addScaled(part.acid, c.sulfuricAcidKg, k);
    addScaled(lead, c.leadKg, k);
    addScaled(electrolyte, c.electrolyteKg, k);
    addScaled(acid, c.sulfuricAcidKg, k);
    return { kind: r.kind, nominalVoltage: r.nominalVoltage, units: r.units, massKg, leadKg: part.lead, electrolyteKg: part.electrolyte, acidKg: part.acid };
  });
  return {
    batteryKg: netKg,
    leadKg: lead,
    electrolyteKg: electrolyte,
    acidKg: acid,
    parts,
    notes: [
      "Battery mass: the net weight of the scale ticket (gross − tare).",
      mixBasis === "count"
        ? "The net weight is shared among the kinds by their counts and each kind's typical unit mass."
        : "The mix was estimated by share of the units; the net weight is shared by those shares and each kind's typical unit mass.",
      "Each kind's part is estimated as weighed units of that kind; the ranges are the engine's.",
    ],
  };
}
