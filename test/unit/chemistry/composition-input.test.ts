import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { compositionInputIssues, KIND_IDS, ZCompositionInput, type TCompositionInput } from "@/lib/chemistry";

const ok = { kind: "flooded", nominalVoltage: 12 };

describe("ZCompositionInput: one clear message per field (limits from the issue)", () => {
  test.each([
    ["kind", { kind: "nickel" }, "battery kind must be one of: flooded, efb, agm, gel, powersport, deep-cycle, traction, stationary"],
    ["nominalVoltage", { nominalVoltage: 0 }, "voltage must be between 2 and 96 V, in steps of 2 V (for example 6, 12 or 24 V)"],
    ["nominalVoltage", { nominalVoltage: 98 }, "voltage must be between 2 and 96 V, in steps of 2 V (for example 6, 12 or 24 V)"],
    ["nominalVoltage", { nominalVoltage: 9 }, "voltage must be between 2 and 96 V, in steps of 2 V (for example 6, 12 or 24 V)"],
    ["nominalVoltage", { nominalVoltage: "12" }, "voltage must be between 2 and 96 V, in steps of 2 V (for example 6, 12 or 24 V)"],
    ["capacityAh", { capacityAh: 0.5 }, "capacity must be between 1 and 5 000 Ah"],
    ["capacityAh", { capacityAh: 5001 }, "capacity must be between 1 and 5 000 Ah"],
    ["cca", { cca: 540.5 }, "CCA must be a whole number between 1 and 5 000 A"],
    ["groupSize", { groupSize: "x".repeat(61) }, "group size must be at most 60 characters"],
    ["weightKg", { weightKg: 0.4 }, "weight must be between 0.5 and 3 000 kg"],
    ["weightKg", { weightKg: 3000.1 }, "weight must be between 0.5 and 3 000 kg"],
    ["specificGravity", { specificGravity: 0.999 }, "specific gravity must be between 1.000 and 1.400"],
    ["specificGravity", { specificGravity: 1.401 }, "specific gravity must be between 1.000 and 1.400"],
    ["electrolyteTempC", { electrolyteTempC: -31 }, "electrolyte temperature must be between -30 and 60 °C"],
    ["electrolyteTempC", { electrolyteTempC: 61 }, "electrolyte temperature must be between -30 and 60 °C"],
  ])("%s: %o", (field, patch, message) => {
    const result = ZCompositionInput.safeParse({ ...ok, ...patch });
    expect(result.success).toBe(false);
    const issue = result.error?.issues.find((i) => i.path[0] === field);
    expect(issue?.message).toBe(message);
    expect(compositionInputIssues({ ...ok, ...patch } as TCompositionInput)).toContainEqual({ field, message });
  });

  test.each([
    [{ nominalVoltage: 2 }],
    [{ nominalVoltage: 96, capacityAh: 5000, weightKg: 3000 }],
    [{ capacityAh: 1, weightKg: 0.5, specificGravity: 1.4, electrolyteTempC: 60 }],
    [{ capacityAh: null, weightKg: null, groupSize: null, specificGravity: null }],
    [{ groupSize: "  24F  " }],
  ])("accepts the edges %o", (patch) => {
    expect(ZCompositionInput.safeParse({ ...ok, ...patch }).success).toBe(true);
    expect(compositionInputIssues({ ...ok, ...patch } as TCompositionInput)).toBeNull();
  });

  test("a cold reading that corrects to below water is refused on the SG field, with the valid range", () => {
    const result = ZCompositionInput.safeParse({ ...ok, specificGravity: 1.0, electrolyteTempC: -30 });
    expect(result.success).toBe(false);
    expect(result.error?.issues[0].path).toEqual(["specificGravity"]);
    expect(result.error?.issues[0].message).toMatch(/corrected to 20 °C must be between 0.9982 and 1.6105/);
  });
});

test("the quick check inside estimateComposition agrees with the zod schema (property)", () => {
  const maybe = <T>(a: fc.Arbitrary<T>) => fc.option(a, { nil: undefined });
  const loose = fc.record({
    kind: fc.oneof(fc.constantFrom(...KIND_IDS), fc.constantFrom("lithium", "", "FLOODED")),
    nominalVoltage: fc.oneof(fc.integer({ min: -4, max: 100 }), fc.double({ min: 0, max: 100, noNaN: false })),
    capacityAh: maybe(fc.double({ min: -10, max: 6000, noNaN: false })),
    cca: maybe(fc.oneof(fc.integer({ min: -5, max: 6000 }), fc.double({ min: 0, max: 10 }))),
    groupSize: maybe(fc.string({ maxLength: 70 })),
    weightKg: maybe(fc.double({ min: 0, max: 3100, noNaN: false })),
    specificGravity: maybe(fc.double({ min: 0.95, max: 1.45, noNaN: false })),
    electrolyteTempC: maybe(fc.double({ min: -40, max: 70, noNaN: false })),
  });
  fc.assert(
    fc.property(loose, (input) => {
      const bySchema = ZCompositionInput.safeParse(input).success;
      const byQuickCheck = compositionInputIssues(input as TCompositionInput) === null;
      return bySchema === byQuickCheck;
    }),
    { numRuns: 2000 },
  );
});
