import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import {
  acidMassFraction,
  estimateComposition,
  faradayFloor,
  KIND_IDS,
  KIND_TABLE,
  PB_SHARE,
  type TComposition,
  type TCompositionInput,
} from "@/lib/chemistry";

const ranges = (c: TComposition) => [c.batteryKg, c.leadKg, c.electrolyteKg, c.sulfuricAcidKg, c.polymerKg, c.otherKg];

describe("mass fractions of a weighed car battery are within the Basel guideline ranges (REFERENCES.md V2)", () => {
  const rows: Array<[string, number, number]> = [
    ["flooded", 40, 11],
    ["flooded", 45, 12.5],
    ["flooded", 60, 15],
    ["flooded", 60, 18],
    ["flooded", 74, 19],
    ["flooded", 100, 24],
    ["flooded", 100, 29],
    ["efb", 70, 18],
  ];
  test.each(rows)("%s %d Ah weighed %d kg: electrolyte 15–25 wt %%, lead as Pb within 65–75 wt %% lead-bearing", (kind, capacityAh, weightKg) => {
    const c = estimateComposition({ kind: kind as TCompositionInput["kind"], nominalVoltage: 12, capacityAh, weightKg });
    expect(c.method).toBe("weighed");
    expect(c.warnings).toEqual([]);
    for (const x of [c.electrolyteKg.value, c.electrolyteKg.low, c.electrolyteKg.high]) {
      expect(x / weightKg).toBeGreaterThanOrEqual(0.15 - 1e-12);
      expect(x / weightKg).toBeLessThanOrEqual(0.25 + 1e-12);
    }
    // Basel's 65–75 % is the lead-bearing mass; as Pb it lies between all of it as PbSO4 and all as metal.
    for (const x of [c.leadKg.value, c.leadKg.low, c.leadKg.high]) {
      expect(x / weightKg).toBeGreaterThanOrEqual(0.65 * PB_SHARE.PbSO4);
      expect(x / weightKg).toBeLessThanOrEqual(0.75);
    }
  });
});

describe("estimated masses of typical 12 V car batteries of 40–100 Ah lie inside 10–30 kg (Basel guidelines, REFERENCES.md V2)", () => {
  const rows = (["flooded", "efb", "agm"] as const).flatMap((kind) => [40, 45, 50, 60, 70, 74, 80, 95, 100].map((ah) => [kind, ah] as const));
  test.each(rows)("%s %d Ah", (kind, capacityAh) => {
    const c = estimateComposition({ kind, nominalVoltage: 12, capacityAh });
    expect(c.method).toBe("from-capacity");
    expect(c.batteryKg.value).toBeGreaterThanOrEqual(10);
    expect(c.batteryKg.value).toBeLessThanOrEqual(30);
  });

  test.each([180, 225])("a %d Ah 12 V truck battery stays within the 70 kg of a truck battery (Basel guidelines, REFERENCES.md V2)", (capacityAh) => {
    expect(estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh }).batteryKg.value).toBeLessThanOrEqual(70);
  });
});

describe("which input drives the battery mass", () => {
  test.each([
    [{ kind: "flooded", nominalVoltage: 12, capacityAh: 60, groupSize: "24F", weightKg: 18 }, "weighed"],
    [{ kind: "flooded", nominalVoltage: 12, capacityAh: 60, groupSize: "24F" }, "from-capacity"],
    [{ kind: "flooded", nominalVoltage: 12, groupSize: "24F" }, "from-group-size"],
    [{ kind: "flooded", nominalVoltage: 12, groupSize: "group 24f" }, "from-group-size"],
    [{ kind: "flooded", nominalVoltage: 12, groupSize: "ZZ9" }, "kind-default"],
    [{ kind: "traction", nominalVoltage: 12, groupSize: "24F" }, "kind-default"],
    [{ kind: "flooded", nominalVoltage: 12 }, "kind-default"],
  ] as Array<[TCompositionInput, TComposition["method"]]>)("%o → %s", (input, method) => {
    expect(estimateComposition(input).method).toBe(method);
  });

  test("weighed: the battery is the weight, and the note says so", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18 });
    expect(c.batteryKg).toEqual({ value: 18, low: 18, high: 18 });
    expect(c.notes.join(" ")).toMatch(/measured weight/);
  });

  test("from capacity: Ah × V over the kind's specific energy, range from its high and low ends", () => {
    const se = KIND_TABLE.flooded.specificEnergyWhPerKg;
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60 });
    expect(c.batteryKg.value).toBeCloseTo(720 / se.value, 12);
    expect(c.batteryKg.low).toBeCloseTo(720 / se.high, 12);
    expect(c.batteryKg.high).toBeCloseTo(720 / se.low, 12);
    expect(c.notes.join(" ")).toMatch(/capacity × voltage/);
  });

  test("kind default: warns that the figures may be far off", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12 });
    expect(c.warnings.join(" ")).toMatch(/may be far off/);
    expect(c.notes.join(" ")).toMatch(/could not be checked against the Faraday floor/);
  });

  test("a capacity that does not fit the group size is flagged", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 200, groupSize: "51R" });
    expect(c.warnings.join(" ")).toMatch(/group 51R/);
  });

  test("CCA is noted as recorded but not used", () => {
    const a = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60, cca: 540 });
    const b = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60 });
    expect(a.leadKg).toEqual(b.leadKg);
    expect(a.notes.join(" ")).toMatch(/CCA/);
  });
});

describe("the parts sum to the battery mass, for the value and within the ranges", () => {
  test.each(KIND_IDS)("%s, 12 V 60 Ah weighed 17 kg", (kind) => {
    const c = estimateComposition({ kind, nominalVoltage: 12, capacityAh: 60, weightKg: 17 });
    const parts = [c.leadKg, c.electrolyteKg, c.polymerKg, c.otherKg];
    expect(parts.reduce((s, p) => s + p.value, 0)).toBeCloseTo(c.batteryKg.value, 10);
    expect(parts.reduce((s, p) => s + p.low, 0)).toBeLessThanOrEqual(c.batteryKg.low + 1e-9);
    expect(parts.reduce((s, p) => s + p.high, 0)).toBeGreaterThanOrEqual(c.batteryKg.high - 1e-9);
  });
});

describe("acid: charged state unless a measured SG is given", () => {
  test.each(KIND_IDS)("%s: acid is the electrolyte at the kind's charged SG (battery service references, REFERENCES.md V2)", (kind) => {
    const c = estimateComposition({ kind, nominalVoltage: 12, capacityAh: 40, weightKg: 25 });
    const w = acidMassFraction({ specificGravity: KIND_TABLE[kind].chargedSpecificGravity.value });
    expect(c.sulfuricAcidKg.value / c.electrolyteKg.value).toBeCloseTo(w, 12);
  });

  test("a measured SG of 1.150 (discharged, REFERENCES.md V2) gives less acid than the charged default", () => {
    const base = { kind: "flooded", nominalVoltage: 12, capacityAh: 40, weightKg: 25 } as const;
    const charged = estimateComposition(base);
    const measured = estimateComposition({ ...base, specificGravity: 1.15 });
    expect(measured.sulfuricAcidKg.value).toBeLessThan(charged.sulfuricAcidKg.value);
    expect(measured.sulfuricAcidKg.value / measured.electrolyteKg.value).toBeCloseTo(acidMassFraction({ specificGravity: 1.15 }), 12);
    expect(measured.leadKg).toEqual(charged.leadKg);
  });

  test("the reading is corrected to 20 °C: 1.265 at 30 °C is 1.272 at 20 °C (battery service manual, REFERENCES.md V2)", () => {
    const base = { kind: "flooded", nominalVoltage: 12, capacityAh: 40, weightKg: 25 } as const;
    const hot = estimateComposition({ ...base, specificGravity: 1.265, electrolyteTempC: 30 });
    const at20 = estimateComposition({ ...base, specificGravity: 1.272, electrolyteTempC: 20 });
    expect(hot.sulfuricAcidKg.value).toBeCloseTo(at20.sulfuricAcidKg.value, 12);
  });

  test.each([
    // open-circuit voltage ≈ SG + 0.84 per cell (REFERENCES.md V2): below 2.0 V nominal a cell is discharged
    [1.12, true, "OCV 1.96 V: discharged"],
    [1.15, true, "OCV 1.99 V: discharged"],
    [1.265, false, "OCV 2.105 V: charged (2.10–2.13 V, REFERENCES.md V2)"],
    [1.28, false, "OCV 2.12 V: charged"],
  ])("SG %f flags a discharged unit: %s (%s)", (specificGravity, isDischarged) => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, weightKg: 18, specificGravity });
    expect(c.notes.some((n) => /discharged/.test(n))).toBe(isDischarged);
  });
});

describe("no estimate goes below the Faraday floor", () => {
  test("a weight below the reactants of the stated capacity is flagged and raised to that floor", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 100, weightKg: 2 });
    // Pb + PbO2 + H2SO4 per A·h per cell, 3.8655 + 4.4624 + 3.6592 g (REFERENCES.md, C)
    expect(c.batteryKg.value / (100 * 6 * (3.8655 + 4.4624 + 3.6592) * 1e-3)).toBeCloseTo(1, 4);
    expect(c.warnings.join(" ")).toMatch(/below the least a battery of this capacity/);
    const floor = faradayFloor({ capacityAh: 100, cells: 6 });
    expect(c.leadKg.low).toBeGreaterThanOrEqual(floor.leadKg);
    expect(c.sulfuricAcidKg.low).toBeGreaterThanOrEqual(floor.sulfuricAcidKg);
  });

  test("a weight above the reactants but light for the capacity is flagged, and lead and acid are raised to their floors", () => {
    // 100 Ah × 6 cells: reactants 7.19 kg; 7.6 kg is 158 Wh/kg, far beyond flooded units, and the flooded lead
    // and electrolyte shares would give less than the 4.64 kg lead and 2.20 kg acid floors.
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 100, weightKg: 7.6 });
    const floor = faradayFloor({ capacityAh: 100, cells: 6 });
    expect(c.leadKg.value).toBeCloseTo(floor.leadKg, 12);
    expect(c.sulfuricAcidKg.value).toBeCloseTo(floor.sulfuricAcidKg, 12);
    expect(c.warnings.join(" ")).not.toMatch(/below the least/);
    expect(c.warnings.join(" ")).toMatch(/light for the stated capacity/);
    expect(c.notes.join(" ")).toMatch(/acid was raised/);
    expect(c.notes.join(" ")).toMatch(/lead was raised/);
    const parts = [c.leadKg, c.electrolyteKg, c.polymerKg, c.otherKg];
    expect(parts.reduce((s, p) => s + p.value, 0)).toBeCloseTo(7.6, 10);
  });

  test("a real, light 100 Ah car battery (22 kg) gets its acid raised to the floor with a note, not a warning", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 100, weightKg: 22 });
    expect(c.sulfuricAcidKg.value).toBeCloseTo(faradayFloor({ capacityAh: 100, cells: 6 }).sulfuricAcidKg, 12);
    expect(c.warnings).toEqual([]);
    expect(c.notes.join(" ")).toMatch(/acid was raised to the Faraday floor/);
  });

  test("a discharged reading below the floor keeps the acid at the floor and explains the bound sulfate", () => {
    const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 16, specificGravity: 1.1 });
    expect(c.sulfuricAcidKg.value).toBeCloseTo(faradayFloor({ capacityAh: 60, cells: 6 }).sulfuricAcidKg, 12);
    expect(c.notes.join(" ")).toMatch(/bound as lead sulfate/);
  });

  test.each(KIND_IDS)("%s: the table's typical values sit above the floor (no floor warning at 12 V 70 Ah from capacity)", (kind) => {
    const c = estimateComposition({ kind, nominalVoltage: 12, capacityAh: 70 });
    expect(c.warnings).toEqual([]);
  });
});

describe("bad input is refused with the field and a clear message, without zod", () => {
  test.each([
    [{ kind: "lithium", nominalVoltage: 12 }, "kind", /battery kind must be one of/],
    [{ kind: "flooded", nominalVoltage: 13 }, "nominalVoltage", /steps of 2 V/],
    [{ kind: "flooded", nominalVoltage: 12, capacityAh: 0 }, "capacityAh", /1 and 5 000 Ah/],
    [{ kind: "flooded", nominalVoltage: 12, weightKg: 0.2 }, "weightKg", /0.5 and 3 000 kg/],
    [{ kind: "flooded", nominalVoltage: 12, weightKg: Number.NaN }, "weightKg", /0.5 and 3 000 kg/],
    [{ kind: "flooded", nominalVoltage: 12, specificGravity: 1.5 }, "specificGravity", /1.000 and 1.400/],
    [{ kind: "flooded", nominalVoltage: 12, electrolyteTempC: 80 }, "electrolyteTempC", /-30 and 60 °C/],
  ])("%o → %s", (input, field, message) => {
    let caught: unknown;
    try {
      estimateComposition(input as TCompositionInput);
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(AppError);
    const issue = (caught as AppError).issues.find((i) => i.field === field);
    expect(issue?.message).toMatch(message);
  });
});

test("nothing in a typical estimate is NaN or infinite, and an 18 kg unit holds about the trade's rule-of-thumb 20 lb of lead (DESIGN.md §1; common practice)", () => {
  const c = estimateComposition({ kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18 });
  for (const r of ranges(c)) for (const x of [r.value, r.low, r.high]) expect(Number.isFinite(x)).toBe(true);
  const leadLb = c.leadKg.value / 0.45359237;
  expect(leadLb).toBeGreaterThan(18);
  expect(leadLb).toBeLessThan(27);
});
