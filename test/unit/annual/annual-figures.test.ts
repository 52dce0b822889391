import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { annualFigures, type TAnnualFigures, type TLevelEvent, type TSubstance } from "@/lib/annual/annual-figures";
import { CAUTION } from "@/lib/rules/caution";
import { kgToLb } from "@/lib/units";

// Invented test battery: 20 kg, of which 13 kg lead and 3 kg sulfuric acid.
const units = (at: string, n: number): TLevelEvent => ({ at: new Date(at), unitCount: n, batteryKg: 20 * n, leadKg: 13 * n, acidKg: 3 * n });
const onHand = (n: number) => ({ unitCount: n, batteryKg: 20 * n, leadKg: 13 * n, acidKg: 3 * n });
const figure = (f: TAnnualFigures, s: TSubstance) => f.substances.find((x) => x.substance === s)!;

/*
 * Hand computation, year 2025 (365 days), opening balance 10 units on 1 January 00:00 UTC:
 *   2025-01-01 08:00 +5  → 15        day max 15 (10 at 00:00, 15 after 08:00, 0 after 17:00)
 *   2025-01-01 17:00 −15 → 0
 *   2025-01-02            0          not on site
 *   2025-01-03 10:00 +20 and −8 at the same instant → 12   day max 12 (applied together, never 20)
 *   2025-01-04            12         day max 12
 *   2025-01-05 23:59:59.999 −12 → 0  day max 12 (12 on hand from 00:00)
 *   2025-01-06 … 2025-12-30 0        not on site
 *   2025-12-31 23:00 +1  → 1         day max 1
 *   2026-01-01 00:00 +50             next year: left out
 *   2024-12-20 +10                   before the year: left out, the opening balance is given
 * Days on site 5 (Jan 1, 3, 4, 5, Dec 31); daily maxima 15 + 12 + 12 + 12 + 1 = 52 unit-days.
 * Maximum 15 units on 2025-01-01; average 52 / 5 = 10.4 units (not 52 / 365).
 *   sulfuric acid ×3 kg:  max 45 kg = 99.21 lb → 01;  average 31.2 kg = 68.78 lb → 01
 *   lead ×13 kg:          max 195 kg = 429.90 lb → 02; average 135.2 kg = 298.07 lb → 02
 *   battery ×20 kg:       max 300 kg = 661.39 lb → 03; average 208 kg = 458.56 lb → 02
 * Closing balance 1 unit; 6 changes inside the year.
 */
const HAND_EVENTS: TLevelEvent[] = [
  units("2025-12-31T23:00:00Z", 1),
  units("2025-01-03T10:00:00Z", 20),
  units("2026-01-01T00:00:00Z", 50),
  units("2025-01-01T17:00:00Z", -15),
  units("2025-01-05T23:59:59.999Z", -12),
  units("2024-12-20T10:00:00Z", 10),
  units("2025-01-01T08:00:00Z", 5),
  units("2025-01-03T10:00:00Z", -8),
];

describe("annual figures against a history computed by hand (40 CFR 370.42; average over days on site)", () => {
  const f = annualFigures({ events: HAND_EVENTS, year: 2025, siteId: "site-1", openingBalance: onHand(10) });

  test.each([
    // [substance, max kg, average kg, max code, average code, threshold lb] — codes 40 CFR 370.43(a)
    ["sulfuric-acid", 45, 31.2, "01", "01", 500],
    ["lead", 195, 135.2, "02", "02", 10_000],
    ["battery", 300, 208, "03", "02", null],
  ] as const)("%s: max %f kg, average %f kg", (substance, maxKg, averageKg, maxCode, averageCode, thresholdLb) => {
    const s = figure(f, substance);
    expect(s.maxDailyKg).toBeCloseTo(maxKg, 9);
    expect(s.averageDailyKg).toBeCloseTo(averageKg, 9);
    expect(s.maxDailyLb).toBeCloseTo(kgToLb(maxKg), 9);
    expect(s.averageDailyLb).toBeCloseTo(kgToLb(averageKg), 9);
    expect([s.maxDailyCode, s.averageDailyCode, s.daysOnSite, s.maxDate, s.thresholdLb]).toEqual([maxCode, averageCode, 5, "2025-01-01", thresholdLb]);
  });

  test("daily maxima, balances and counts", () => {
    expect(f.days.slice(0, 6).map((d) => d.unitCount)).toEqual([15, 0, 12, 12, 12, 0]);
    expect(f.days[364]).toEqual({ date: "2025-12-31", ...onHand(1) });
    expect(f.days.reduce((sum, d) => sum + d.unitCount, 0)).toBe(52);
    expect([f.daysInYear, f.days.length, f.firstDate, f.lastDate, f.eventCount]).toEqual([365, 365, "2025-01-01", "2025-12-31", 6]);
    expect(f.openingBalance).toEqual(onHand(10));
    expect(f.closingBalance).toEqual(onHand(1));
    expect([figure(f, "sulfuric-acid").isAtOrAboveThreshold, figure(f, "battery").isAtOrAboveThreshold]).toEqual([false, null]);
  });

  test("notes state the reading of the average and which amount of a day counts, and the caution is carried", () => {
    expect(f.notes.join(" ")).toMatch(/divided by the number of those days, not by the days in the year/);
    expect(f.notes.join(" ")).toMatch(/the most on hand at any moment of that UTC day/);
    expect(f.notes.join(" ")).toMatch(/1 change\(s\) dated before 2025 were left out/);
    expect(f.caution).toBe(CAUTION);
    expect([f.rulebookId, f.siteId, f.year]).toEqual(["us-federal", "site-1", 2025]);
  });

  test("without an opening balance the earlier changes give it, with the same figures", () => {
    const g = annualFigures({ events: HAND_EVENTS, year: 2025, siteId: "site-1" });
    expect(g.openingBalance).toEqual(onHand(10));
    expect(g.substances).toEqual(f.substances);
    expect(g.notes.join(" ")).toMatch(/the sum of the 1 change\(s\) dated before 2025/);
  });
});

describe("calendar and day boundaries (UTC)", () => {
  test("a leap year has 366 days, 29 February included (2024)", () => {
    const f = annualFigures({ events: [], year: 2024, siteId: "s", openingBalance: onHand(1) });
    expect([f.daysInYear, f.days.length, f.days[59].date, f.lastDate]).toEqual([366, 366, "2024-02-29", "2024-12-31"]);
    expect(figure(f, "battery")).toMatchObject({ daysOnSite: 366, maxDailyKg: 20, averageDailyKg: 20 });
  });

  test("a change at 00:00:00.000 belongs to its day; one at 23:59:59.999 to the day before", () => {
    const f = annualFigures({ events: [units("2025-01-01T23:59:59.999Z", 2), units("2025-01-02T00:00:00.000Z", -2), units("2025-01-03T00:00:00.000Z", 1)], year: 2025, siteId: "s" });
    expect(f.days.slice(0, 4).map((d) => d.unitCount)).toEqual([2, 2, 1, 1]);
  });

  test("nothing ever on site: no range codes, no dates", () => {
    const f = annualFigures({ events: [], year: 2025, siteId: "s" });
    expect(figure(f, "lead")).toMatchObject({ daysOnSite: 0, maxDailyKg: 0, averageDailyKg: 0, maxDailyCode: null, averageDailyCode: null, maxDate: null });
  });

  test("float residue after +x −x is not a day on site", () => {
    const f = annualFigures({ events: [{ at: new Date("2025-05-01T10:00Z"), batteryKg: 0.1 + 0.2, leadKg: 0, acidKg: 0, unitCount: 0 }, { at: new Date("2025-05-01T11:00Z"), batteryKg: -0.3, leadKg: 0, acidKg: 0, unitCount: 0 }], year: 2025, siteId: "s" });
    expect(figure(f, "battery").daysOnSite).toBe(1); // 1 May only; 0.1 + 0.2 − 0.3 = 5.6e-17 afterwards
  });

  test("a balance below zero is flagged and counted as nothing", () => {
    const f = annualFigures({ events: [units("2025-03-01T10:00:00Z", -2)], year: 2025, siteId: "s" });
    expect(f.notes.join(" ")).toMatch(/fell below zero \(battery mass from 2025-03-01; lead from 2025-03-01; sulfuric acid from 2025-03-01; unit count from 2025-03-01\)/);
    expect(figure(f, "battery").daysOnSite).toBe(0);
    expect(f.days[100].batteryKg).toBe(0);
  });

  test.each([
    ["a bad year", { year: 2025.5 }],
    ["an invalid date", { events: [{ ...units("2025-01-01", 1), at: new Date("nope") }] }],
    ["a missing amount", { events: [{ ...units("2025-01-01", 1), acidKg: Number.NaN }] }],
  ])("%s is refused as invalid input", (_case, change) => {
    expect(() => annualFigures({ events: [], year: 2025, siteId: "s", ...change })).toThrow(expect.objectContaining({ code: "invalid_input" }));
  });
});

describe("matches a direct day-by-day reading (property, fast-check)", () => {
  const YEAR_START = Date.UTC(2025, 0, 1);
  const DAY = 86_400_000;
  // The direct reading: the day's amount is the highest of the balance at 00:00 and after each instant of the day.
  const reference = (events: TLevelEvent[], opening: number) => {
    const balanceAt = (t: number, inclusive: boolean) =>
      opening + events.filter((e) => (inclusive ? e.at.getTime() <= t : e.at.getTime() < t)).reduce((s, e) => s + e.unitCount, 0);
    const maxima: number[] = [];
    for (let d = 0; d < 365; d++) {
      const start = YEAR_START + d * DAY;
      const instants = events.map((e) => e.at.getTime()).filter((t) => t >= start && t < start + DAY);
      maxima.push(Math.max(0, balanceAt(start, false), ...instants.map((t) => balanceAt(t, true))));
    }
    return maxima;
  };

  test("daily maxima, days on site and average for random histories", () => {
    const event = fc.record({ minute: fc.integer({ min: -60 * 24 * 20, max: 60 * 24 * 380 }), n: fc.integer({ min: -5, max: 8 }) });
    fc.assert(
      fc.property(fc.array(event, { maxLength: 25 }), fc.integer({ min: 0, max: 5 }), (raw, opening) => {
        // coarse minutes so that several changes share an instant
        const events = raw.map(({ minute, n }) => units(new Date(YEAR_START + Math.round(minute / 720) * 720 * 60_000).toISOString(), n));
        const expected = reference(events.filter((e) => e.at.getTime() >= YEAR_START), opening);
        const f = annualFigures({ events, year: 2025, siteId: "s", openingBalance: onHand(opening) });
        expect(f.days.map((d) => d.unitCount)).toEqual(expected);
        const present = expected.filter((v) => v > 0);
        const acid = figure(f, "sulfuric-acid");
        expect(acid.daysOnSite).toBe(present.length);
        expect(acid.averageDailyKg).toBeCloseTo(present.length ? (3 * present.reduce((a, b) => a + b, 0)) / present.length : 0, 9);
      }),
      { numRuns: 100 },
    );
  });
});
