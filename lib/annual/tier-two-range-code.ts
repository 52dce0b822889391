import { AppError } from "@/lib/errors";

export type TTierTwoRangeCode = "01" | "02" | "03" | "04" | "05" | "06" | "07" | "08" | "09" | "10" | "11" | "12" | "13";

/** The Tier II weight ranges in pounds, 40 CFR 370.43(a). toLb is the last whole pound printed for the range. */
export const TIER_TWO_RANGES: readonly { code: TTierTwoRangeCode; fromLb: number; toLb: number | null }[] = [
  { code: "01", fromLb: 0, toLb: 99 },
  { code: "02", fromLb: 100, toLb: 499 },
  { code: "03", fromLb: 500, toLb: 999 },
  { code: "04", fromLb: 1_000, toLb: 4_999 },
  { code: "05", fromLb: 5_000, toLb: 9_999 },
  { code: "06", fromLb: 10_000, toLb: 24_999 },
  { code: "07", fromLb: 25_000, toLb: 49_999 },
  { code: "08", fromLb: 50_000, toLb: 74_999 },
  { code: "09", fromLb: 75_000, toLb: 99_999 },
  { code: "10", fromLb: 100_000, toLb: 499_999 },
  { code: "11", fromLb: 500_000, toLb: 999_999 },
  { code: "12", fromLb: 1_000_000, toLb: 9_999_999 },
  { code: "13", fromLb: 10_000_000, toLb: null },
];

/**
 * The 40 CFR 370.43(a) range code of an amount in pounds.
 *
 * The printed ranges are whole pounds (01 is 0–99, 02 is 100–499) and leave gaps for fractions. We read
 * each range as running from its lower bound up to, not including, the next one, with no rounding: 99.99 lb
 * is still 01 and 100 lb is 02, so the code agrees with the same "at or above" test the thresholds use.
 */
export function tierTwoRangeCode(pounds: number): TTierTwoRangeCode {
  if (!Number.isFinite(pounds) || pounds < 0) {
    throw new AppError("invalid_input", "an amount for a Tier II range code must be a number of 0 lb or more");
  }
  for (let i = TIER_TWO_RANGES.length - 1; i > 0; i--) {
    if (pounds >= TIER_TWO_RANGES[i].fromLb) return TIER_TWO_RANGES[i].code;
  }
  return "01";
}
