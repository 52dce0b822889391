import { describe, expect, test } from "vitest";
import { yearPeakKg } from "@/lib/db/totals";

// 40 CFR 273.9: a large quantity handler is one that accumulates 5 000 kg or more at any time; the status holds
// to the end of that calendar year. yearPeakKg gives the most on hand so far in a year from the stored peak.
describe("yearPeakKg", () => {
  test.each([
    ["no decrease this year: on-hand only grew, so now is the peak", { batteryKg: 4200, peakYear: 2025, peakBatteryKg: 6100 }, 2026, 4200],
    ["a decrease this year stored a higher peak", { batteryKg: 3000, peakYear: 2026, peakBatteryKg: 5200 }, 2026, 5200],
    ["on-hand grew past the stored peak after the decrease", { batteryKg: 5600, peakYear: 2026, peakBatteryKg: 5200 }, 2026, 5600],
    ["a year before the stored one has no figure here", { batteryKg: 3000, peakYear: 2026, peakBatteryKg: 5200 }, 2025, 0],
  ])("%s", (_name, site, year, expected) => {
    expect(yearPeakKg(site, year)).toBe(expected);
  });
});
