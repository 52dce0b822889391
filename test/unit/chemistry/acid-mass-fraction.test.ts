import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { ACID_TABLE_RANGE, acidMassFraction, KIND_TABLE } from "@/lib/chemistry";

describe("points of the density table of aqueous H2SO4 at 20 °C", () => {
  test.each([
    // [mass fraction, density g/cm³, source]
    [0.1, 1.0661, "handbook table (CRC-type), REFERENCES.md V2"],
    [0.3, 1.2185, "CRC Handbook, REFERENCES.md M (from memory)"],
    [0.35, 1.2599, "CRC Handbook, REFERENCES.md M (from memory)"],
    [0.36, 1.2684, "CRC Handbook, REFERENCES.md M (from memory)"],
    [0.37, 1.2769, "CRC Handbook, REFERENCES.md M (from memory)"],
    [0.38, 1.2855, "CRC Handbook, REFERENCES.md M (from memory)"],
    [0.4, 1.3028, "handbook table (CRC-type), REFERENCES.md V2"],
    [0.5, 1.3952, "handbook table (CRC-type), REFERENCES.md V2"],
    [0.7, 1.6105, "handbook table (CRC-type), REFERENCES.md V2"],
  ])("%f at SG %f (%s)", (fraction, sg) => {
    expect(acidMassFraction({ specificGravity: sg })).toBeCloseTo(fraction, 9);
  });

  test.each([
    // Between two table points the fraction lies between theirs: monotone interpolation.
    [1.28, 0.37, 0.38, "battery charged SG 1.280 (REFERENCES.md V2) between 37 % and 38 % (M)"],
    [1.265, 0.35, 0.37, "1.265 between 35 % and 37 % (M)"],
    [1.13, 0.1, 0.3, "discharged SG 1.110–1.150 (REFERENCES.md V2) between 10 % (V2) and 30 % (M)"],
  ])("SG %f lies between %f and %f: %s", (sg, low, high) => {
    const w = acidMassFraction({ specificGravity: sg });
    expect(w).toBeGreaterThan(low);
    expect(w).toBeLessThan(high);
  });

  test("near-linear stretch: halfway between 36 % and 37 % in density gives 36.5 % within 0.05 point (CRC, M)", () => {
    expect(acidMassFraction({ specificGravity: (1.2684 + 1.2769) / 2 })).toBeCloseTo(0.365, 3);
  });
});

describe("temperature correction: SG(20 °C) = reading + 0.0007 × (T − 20 °C) (battery service manual, REFERENCES.md V2)", () => {
  test.each([
    [1.265, 30, 1.272],
    [1.28, 0, 1.266],
    [1.2, -30, 1.165],
    [1.15, 60, 1.178],
    [1.25, 20, 1.25],
  ])("reading %f at %d °C reads as %f at 20 °C", (reading, temperatureC, at20) => {
    expect(acidMassFraction({ specificGravity: reading, temperatureC })).toBeCloseTo(acidMassFraction({ specificGravity: at20 }), 12);
  });

  test("no temperature means the reading was at 20 °C", () => {
    expect(acidMassFraction({ specificGravity: 1.27 })).toBe(acidMassFraction({ specificGravity: 1.27, temperatureC: 20 }));
  });
});

describe("outside the table", () => {
  test.each<[number, number | undefined, string]>([
    [1.8305, undefined, "100 % acid (REFERENCES.md V2) is beyond the table's 70 %"],
    [0.99, undefined, "below water"],
    [1.0, -30, "a cold reading of 1.000 corrects to below water"],
    [Number.NaN, undefined, "not a number"],
  ])("SG %f at %s °C is refused with the valid range: %s", (specificGravity, temperatureC) => {
    let caught: unknown;
    try {
      acidMassFraction({ specificGravity, temperatureC });
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(AppError);
    expect((caught as AppError).message).toContain(ACID_TABLE_RANGE.min.toFixed(4));
    expect((caught as AppError).message).toContain(ACID_TABLE_RANGE.max.toFixed(4));
    expect((caught as AppError).issues[0].field).toBe("specificGravity");
  });
});

test("the fraction never falls as the SG rises (property, any two readings in the table)", () => {
  const sg = fc.double({ min: ACID_TABLE_RANGE.min, max: ACID_TABLE_RANGE.max, noNaN: true });
  fc.assert(
    fc.property(sg, sg, (a, b) => {
      const [lo, hi] = a <= b ? [a, b] : [b, a];
      const wLo = acidMassFraction({ specificGravity: lo });
      const wHi = acidMassFraction({ specificGravity: hi });
      return wLo <= wHi && wLo >= 0 && wHi <= 0.7 + 1e-12;
    }),
  );
});

describe("open-circuit voltage ≈ SG + 0.84 V per cell (REFERENCES.md V2) as a check of the charged SG of flooded kinds", () => {
  test.each(["flooded", "efb", "powersport", "deep-cycle", "traction"] as const)(
    "%s: charged SG gives 2.10–2.13 V per cell, the charged open-circuit voltage (REFERENCES.md V2)",
    (kind) => {
      const ocv = KIND_TABLE[kind].chargedSpecificGravity.value + 0.84;
      expect(ocv).toBeGreaterThanOrEqual(2.1);
      expect(ocv).toBeLessThanOrEqual(2.13);
    },
  );
});
