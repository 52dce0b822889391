import { describe, expect, test } from "vitest";
import { TIER_TWO_RANGES, tierTwoRangeCode } from "@/lib/annual/tier-two-range-code";

describe("Tier II range codes (40 CFR 370.43(a), ranges in lb as REFERENCES.md gives them)", () => {
  test.each([
    [0, "01"],
    [99, "01"],
    [99.5, "01"], // fractions between ranges stay in the lower one until the next lower bound (our reading)
    [99.999999, "01"],
    [100, "02"],
    [499, "02"],
    [499.99, "02"],
    [500, "03"],
    [999, "03"],
    [1_000, "04"],
    [4_999, "04"],
    [5_000, "05"],
    [9_999, "05"],
    [10_000, "06"],
    [24_999, "06"],
    [25_000, "07"],
    [49_999, "07"],
    [50_000, "08"],
    [74_999, "08"],
    [75_000, "09"],
    [99_999, "09"],
    [100_000, "10"],
    [499_999, "10"],
    [500_000, "11"],
    [999_999, "11"],
    [1_000_000, "12"],
    [9_999_999, "12"],
    [9_999_999.5, "12"],
    [10_000_000, "13"],
    [1e12, "13"],
  ])("%f lb is range %s", (pounds, code) => {
    expect(tierTwoRangeCode(pounds)).toBe(code);
  });

  test("the table's printed bounds run without overlap: each range ends one pound below the next", () => {
    for (let i = 1; i < TIER_TWO_RANGES.length; i++) expect(TIER_TWO_RANGES[i - 1].toLb).toBe(TIER_TWO_RANGES[i].fromLb - 1);
    expect(TIER_TWO_RANGES.map((r) => r.code)).toEqual(["01", "02", "03", "04", "05", "06", "07", "08", "09", "10", "11", "12", "13"]);
  });

  test.each([[-1], [-0.001], [Number.NaN], [Number.POSITIVE_INFINITY]])("%f lb is refused", (pounds) => {
    expect(() => tierTwoRangeCode(pounds)).toThrow(expect.objectContaining({ code: "invalid_input" }));
  });
});
