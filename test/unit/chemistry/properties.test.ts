import fc from "fast-check";
import { describe, expect, test } from "vitest";
import {
  estimateComposition,
  faradayFloor,
  FLOOR_KG_PER_AH_CELL,
  KIND_IDS,
  ZCompositionInput,
  type TComposition,
  type TCompositionInput,
  type TMassRange,
} from "@/lib/chemistry";

// Property tests over any valid input (the limits of ZCompositionInput).
const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: undefined, freq: 3 });
const capacity = fc.double({ min: 1, max: 5000, noNaN: true });
const weight = fc.double({ min: 0.5, max: 3000, noNaN: true });
const validInput: fc.Arbitrary<TCompositionInput> = fc
  .record({
    kind: fc.constantFrom(...KIND_IDS),
    nominalVoltage: fc.integer({ min: 1, max: 48 }).map((n) => 2 * n),
    capacityAh: maybe(capacity),
    cca: maybe(fc.integer({ min: 1, max: 5000 })),
    groupSize: maybe(fc.oneof(fc.constantFrom("24F", "H6", "31", "51R", "GC2", "group 65", "U1"), fc.string({ maxLength: 60 }))),
    weightKg: maybe(weight),
    specificGravity: maybe(fc.double({ min: 1, max: 1.4, noNaN: true })),
    electrolyteTempC: maybe(fc.double({ min: -30, max: 60, noNaN: true })),
  })
  .filter((x) => ZCompositionInput.safeParse(x).success);

const RUNS = { numRuns: 600 };
const EPS = 1e-9;
const allRanges = (c: TComposition): TMassRange[] => [c.batteryKg, c.leadKg, c.electrolyteKg, c.sulfuricAcidKg, c.polymerKg, c.otherKg];
const parts = (c: TComposition): TMassRange[] => [c.leadKg, c.electrolyteKg, c.polymerKg, c.otherKg];
const sum = (xs: number[]) => xs.reduce((s, x) => s + x, 0);

/** a ≤ b up to rounding, relative to the size of the numbers. */
const notAbove = (a: number, b: number) => a <= b + EPS * Math.max(1, Math.abs(a), Math.abs(b));

describe("for any valid input", () => {
  test("nothing is NaN or Infinity, nothing is negative, and low ≤ value ≤ high", () => {
    fc.assert(
      fc.property(validInput, (input) => {
        const c = estimateComposition(input);
        for (const r of allRanges(c)) {
          for (const x of [r.value, r.low, r.high]) expect(Number.isFinite(x) && x >= 0).toBe(true);
          expect(notAbove(r.low, r.value) && notAbove(r.value, r.high)).toBe(true);
        }
      }),
      RUNS,
    );
  });

  test("the parts sum to the whole: values exactly, and the ranges cover the battery's range", () => {
    fc.assert(
      fc.property(validInput, (input) => {
        const c = estimateComposition(input);
        const b = c.batteryKg;
        expect(Math.abs(sum(parts(c).map((p) => p.value)) - b.value)).toBeLessThanOrEqual(EPS * b.value);
        expect(notAbove(sum(parts(c).map((p) => p.low)), b.low)).toBe(true);
        expect(notAbove(b.high, sum(parts(c).map((p) => p.high)))).toBe(true);
        // The acid is part of the electrolyte, never more than it.
        expect(notAbove(c.sulfuricAcidKg.value, c.electrolyteKg.value)).toBe(true);
        expect(notAbove(c.sulfuricAcidKg.low, c.electrolyteKg.low)).toBe(true);
        expect(notAbove(c.sulfuricAcidKg.high, c.electrolyteKg.high)).toBe(true);
      }),
      RUNS,
    );
  });

  test("nothing falls below the Faraday floor (F and IUPAC atomic weights, REFERENCES.md)", () => {
    fc.assert(
      fc.property(validInput, (input) => {
        const c = estimateComposition(input);
        const capacityAh = input.capacityAh ?? 0;
        const floor = faradayFloor({ capacityAh, cells: c.cells });
        const reactantsKg = capacityAh * c.cells * FLOOR_KG_PER_AH_CELL.reactants;
        expect(notAbove(floor.leadKg, c.leadKg.low)).toBe(true);
        expect(notAbove(floor.sulfuricAcidKg, c.sulfuricAcidKg.low)).toBe(true);
        expect(notAbove(floor.sulfuricAcidKg, c.electrolyteKg.low)).toBe(true);
        expect(notAbove(reactantsKg, c.batteryKg.low)).toBe(true);
        if (c.method === "weighed" && (input.weightKg as number) < reactantsKg) expect(c.warnings.length).toBeGreaterThan(0);
      }),
      RUNS,
    );
  });
});

/** Battery, lead, electrolyte and acid, value and both ends. */
const tracked = (c: TComposition) => [c.batteryKg, c.leadKg, c.electrolyteKg, c.sulfuricAcidKg].flatMap((r) => [r.value, r.low, r.high]);

describe("the estimate rises with weight and with capacity", () => {
  test("more weight, everything else equal: no tracked figure falls", () => {
    fc.assert(
      fc.property(validInput, weight, weight, (input, w1, w2) => {
        const [lo, hi] = w1 <= w2 ? [w1, w2] : [w2, w1];
        const a = tracked(estimateComposition({ ...input, weightKg: lo }));
        const b = tracked(estimateComposition({ ...input, weightKg: hi }));
        a.forEach((x, i) => expect(notAbove(x, b[i])).toBe(true));
      }),
      RUNS,
    );
  });

  test("more capacity, everything else equal: no tracked figure falls", () => {
    fc.assert(
      fc.property(validInput, capacity, capacity, (input, c1, c2) => {
        const [lo, hi] = c1 <= c2 ? [c1, c2] : [c2, c1];
        const a = tracked(estimateComposition({ ...input, capacityAh: lo }));
        const b = tracked(estimateComposition({ ...input, capacityAh: hi }));
        a.forEach((x, i) => expect(notAbove(x, b[i])).toBe(true));
      }),
      RUNS,
    );
  });
});
