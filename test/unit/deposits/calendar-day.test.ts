import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { addDays, calendarDay, dayNumber, daysBetween, isCalendarDay } from "@/lib/deposits/calendar-day";

// Gregorian calendar rules (common practice): leap years every 4, not every 100, every 400.
describe("calendar days", () => {
  test.each([
    ["2024-02-29", true],
    ["2025-02-29", false],
    ["1900-02-29", false],
    ["2000-02-29", true],
    ["2025-04-31", false],
    ["2025-12-31", true],
    ["2025-13-01", false],
    ["2025-00-10", false],
    ["2025-1-01", false],
    ["2025-01-01T00:00", false],
  ])("%s is a calendar day: %s", (text, expected) => {
    expect(isCalendarDay(text)).toBe(expected);
  });

  test("day numbers count from 1970-01-01", () => {
    expect(dayNumber("1970-01-01")).toBe(0);
    expect(dayNumber("2000-03-01")).toBe(11_017);
  });

  test.each([
    ["2024-12-31", 1, "2025-01-01"],
    ["2024-02-28", 1, "2024-02-29"],
    ["2025-01-01", 30, "2025-01-31"],
    ["2025-01-01", 45, "2025-02-15"],
    ["2025-03-01", -1, "2025-02-28"],
  ])("%s + %i days = %s", (day, n, expected) => {
    expect(addDays(day, n)).toBe(expected);
    expect(daysBetween(day, expected)).toBe(n);
  });

  test.each([
    ["UTC", "2025-03-09T07:30:00Z", "2025-03-09"],
    ["America/Los_Angeles", "2025-03-09T07:30:00Z", "2025-03-08"],
    ["Pacific/Auckland", "2025-03-09T12:00:00Z", "2025-03-10"],
  ])("in %s the instant %s falls on %s", (timeZone, iso, expected) => {
    expect(calendarDay(new Date(iso), timeZone)).toBe(expected);
  });

  test("an unknown zone and an invalid date are refused", () => {
    expect(() => calendarDay(new Date(), "Nowhere/At_All")).toThrow(AppError);
    expect(() => calendarDay(new Date("nonsense"))).toThrow(AppError);
    expect(() => calendarDay("2025-02-30")).toThrow(AppError);
  });
});
