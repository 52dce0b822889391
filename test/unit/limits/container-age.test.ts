import { describe, expect, test } from "vitest";
import { containerAge } from "@/lib/limits/container-age";
import { getRulebook } from "@/lib/rules/rulebooks";

// 40 CFR 273.15(a) / 273.35(a): no longer than one year. Our day count (lib/limits/container-age.ts): the start
// date is day 0, a year is 365 days, day 365 is the last day on site and day 366 is over; 30 days left is
// "approaching" (the brief). Dates are UTC calendar dates.
const oneYear = getRulebook("us-federal").rules.find((r) => r.id === "us-uw-one-year")!;
const at = (iso: string) => new Date(iso);

describe("container age against one year (40 CFR 273.15(a), 273.35(a))", () => {
  test.each([
    // [case, start, asOf, ageDays, daysLeft, deadline, status]
    ["non-leap span, day 365 = the anniversary, last day", "2025-03-01", "2026-03-01T12:00Z", 365, 0, "2026-03-01", "approaching"],
    ["non-leap span, day 366 is over", "2025-03-01", "2026-03-02T00:00Z", 366, -1, "2026-03-01", "exceeded"],
    ["leap year 2024: day 365 is 2024-12-31, the last day", "2024-01-01", "2024-12-31T23:59:59Z", 365, 0, "2024-12-31", "approaching"],
    ["leap year 2024: day 366 is the anniversary 2025-01-01, already over", "2024-01-01", "2025-01-01T00:00Z", 366, -1, "2024-12-31", "exceeded"],
    ["started on 29 February: last day 2025-02-28", "2024-02-29", "2025-02-28T08:00Z", 365, 0, "2025-02-28", "approaching"],
    ["span holding 2028-02-29: last day one day before the anniversary", "2027-06-01", "2028-05-31T08:00Z", 365, 0, "2028-05-31", "approaching"],
    ["30 days left is approaching", "2025-01-01", "2025-12-02T00:00Z", 335, 30, "2026-01-01", "approaching"],
    ["31 days left is ok", "2025-01-01", "2025-12-01T23:59:59.999Z", 334, 31, "2026-01-01", "ok"],
    ["started today is day 0", "2026-12-01T18:00Z", "2026-12-01T19:00Z", 0, 365, "2027-12-01", "ok"],
    ["time of day does not count: late start, early check", "2025-03-01T23:59:59Z", "2026-03-01T00:00:00Z", 365, 0, "2026-03-01", "approaching"],
    ["a start date in the future counts as today", "2027-01-10", "2026-12-01T10:00Z", 0, 365, "2027-12-01", "ok"],
  ])("%s", (_case, start, asOf, ageDays, daysLeft, deadline, status) => {
    const age = containerAge({ accumulationStart: at(start), asOf: at(asOf), rule: oneYear });
    expect(age.ageDays).toBe(ageDays);
    expect(age.daysLeft).toBe(daysLeft);
    expect(age.deadline.toISOString().slice(0, 10)).toBe(deadline);
    expect(age.status).toBe(status);
    expect(age.firstDayOver.getTime() - age.deadline.getTime()).toBe(86_400_000);
  });

  test("an at-or-above age rule (a site rule of 90 days) is over on day 90", () => {
    const rule = { ...oneYear, threshold: 90, trigger: "at-or-above" as const, warningMargin: undefined, warningPct: 80 };
    const start = at("2026-01-01");
    expect(containerAge({ accumulationStart: start, asOf: at("2026-03-31"), rule }).status).toBe("approaching"); // day 89
    const day90 = containerAge({ accumulationStart: start, asOf: at("2026-04-01"), rule });
    expect([day90.ageDays, day90.status, day90.deadline.toISOString().slice(0, 10)]).toEqual([90, "exceeded", "2026-03-31"]);
    // 80 % of 90 days is day 72
    expect(containerAge({ accumulationStart: start, asOf: at("2026-03-14"), rule }).status).toBe("approaching");
    expect(containerAge({ accumulationStart: start, asOf: at("2026-03-13"), rule }).status).toBe("ok");
  });
});
