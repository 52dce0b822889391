import { describe, expect, test } from "vitest";
import { estimateComposition } from "@/lib/chemistry";
import { lotComposition } from "@/lib/yard/lot-composition";

describe("composition of a weighed lot", () => {
  test.each([
    ["one kind by count, 50 flooded 12 V in 1 000 kg", 1_000, 50, "flooded"],
    ["one kind by count, 20 traction cells in 1 200 kg", 1_200, 20, "traction"],
    ["one kind by count, 100 AGM in 1 900 kg", 1_900, 100, "agm"],
  ] as const)("%s: the same as that many weighed units from the engine", (_case, netKg, count, kind) => {
    const lot = lotComposition({ netKg, unitCount: count, mixBasis: "count", mix: [{ kind, nominalVoltage: 12, count }] });
    const one = estimateComposition({ kind, nominalVoltage: 12, weightKg: netKg / count });
    expect(lot.batteryKg).toBe(netKg);
    for (const key of ["value", "low", "high"] as const) {
      expect(lot.leadKg[key]).toBeCloseTo(one.leadKg[key] * count, 6);
      expect(lot.electrolyteKg[key]).toBeCloseTo(one.electrolyteKg[key] * count, 6);
      expect(lot.acidKg[key]).toBeCloseTo(one.sulfuricAcidKg[key] * count, 6);
    }
  });

  test("a mix shares the net weight by count × typical unit mass, and the parts add up to the net", () => {
    const lot = lotComposition({
      netKg: 2_000,
      unitCount: 60,
      mixBasis: "count",
      mix: [
        { kind: "flooded", nominalVoltage: 12, count: 50 },
        { kind: "powersport", nominalVoltage: 12, count: 10 },
      ],
    });
    const typicalFlooded = estimateComposition({ kind: "flooded", nominalVoltage: 12 }).batteryKg.value;
    const typicalSport = estimateComposition({ kind: "powersport", nominalVoltage: 12 }).batteryKg.value;
    const [flooded, sport] = lot.parts;
    expect(flooded!.massKg / sport!.massKg).toBeCloseTo((50 * typicalFlooded) / (10 * typicalSport), 9);
    expect(flooded!.massKg + sport!.massKg).toBeCloseTo(2_000, 9);
    expect(lot.leadKg.value).toBeCloseTo(flooded!.leadKg.value + sport!.leadKg.value, 9);
  });

  test("a mix by share of the units gives the same result as the same mix by count", () => {
    const byCount = lotComposition({ netKg: 1_500, unitCount: 80, mixBasis: "count", mix: [{ kind: "flooded", nominalVoltage: 12, count: 60 }, { kind: "agm", nominalVoltage: 12, count: 20 }] });
    const byShare = lotComposition({ netKg: 1_500, unitCount: 80, mixBasis: "share", mix: [{ kind: "flooded", nominalVoltage: 12, sharePct: 75 }, { kind: "agm", nominalVoltage: 12, sharePct: 25 }] });
    expect(byShare.leadKg.value).toBeCloseTo(byCount.leadKg.value, 9);
    expect(byShare.acidKg.high).toBeCloseTo(byCount.acidKg.high, 9);
  });

  test.each([
    // Basel Convention technical guidelines on waste lead-acid batteries: lead 65–75 wt %, electrolyte 15–25 wt % (V2)
    ["flooded", 0.65, 0.75, 0.15, 0.25],
    ["agm", 0.65, 0.75, 0.15, 0.25],
  ] as const)("Basel guidelines: the ranges of a %s lot reach the published shares", (kind, leadLow, leadHigh, elecLow, elecHigh) => {
    const lot = lotComposition({ netKg: 1_000, unitCount: 50, mixBasis: "count", mix: [{ kind, nominalVoltage: 12, count: 50 }] });
    expect(lot.leadKg.low).toBeLessThanOrEqual(leadHigh * 1_000);
    expect(lot.leadKg.high).toBeGreaterThanOrEqual(leadLow * 1_000);
    expect(lot.electrolyteKg.low).toBeLessThanOrEqual(elecHigh * 1_000);
    expect(lot.electrolyteKg.high).toBeGreaterThanOrEqual(elecLow * 1_000);
    expect(lot.leadKg.low).toBeLessThanOrEqual(lot.leadKg.value);
    expect(lot.leadKg.value).toBeLessThanOrEqual(lot.leadKg.high);
  });

  test("a row with no units is left out", () => {
    const lot = lotComposition({ netKg: 900, unitCount: 50, mixBasis: "share", mix: [{ kind: "flooded", nominalVoltage: 12, sharePct: 100 }, { kind: "gel", nominalVoltage: 12, sharePct: 0 }] });
    expect(lot.parts.map((p) => p.kind)).toEqual(["flooded"]);
  });
});
