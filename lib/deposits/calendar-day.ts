import { AppError } from "@/lib/errors";
import { isoDateOfUtcDay, MS_PER_DAY } from "@/lib/limits/utc-day";

/**
 * A calendar date "YYYY-MM-DD" as the store sees it on its wall calendar.
 *
 * Deposit windows count whole calendar days in the store's time zone (project choice): the day of
 * the sale is day 0, the next calendar day is day 1, and a return on day N is inside an N-day window.
 * A clock time never matters, so a sale at 23:59 and one at 00:01 on the same date have the same
 * deadline. An instant (`Date`) is first turned into the store's date with the IANA zone given;
 * a string must already be a calendar date.
 */
export type TCalendarDay = string;

const DAY_PATTERN = /^(\d{4})-(\d{2})-(\d{2})$/;
const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let formatter = formatters.get(timeZone);
  if (!formatter) {
    try {
      formatter = new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" });
    } catch {
      throw new AppError("invalid_input", `"${timeZone}" is not a known time zone`, [
        { field: "timeZone", message: "time zone must be an IANA name such as America/Los_Angeles" },
      ]);
    }
    formatters.set(timeZone, formatter);
  }
  return formatter;
}

const DAYS_IN_MONTH = [31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31];
const isLeapYear = (year: number) => (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;

/** Days since 1970-01-01 of a valid calendar date, or null when the text is not a real date. */
export function dayNumber(day: string): number | null {
  const match = DAY_PATTERN.exec(day);
  if (!match) return null;
  const year = Number(match[1]);
  const month = Number(match[2]);
  const date = Number(match[3]);
  if (month < 1 || month > 12 || date < 1) return null;
  if (date > (month === 2 && isLeapYear(year) ? 29 : DAYS_IN_MONTH[month - 1]!)) return null;
  return Date.UTC(year, month - 1, date) / MS_PER_DAY;
}

export const isCalendarDay = (text: string): boolean => dayNumber(text) !== null;

/** The store's calendar date of an instant, or a calendar-date string checked and passed through. */
export function calendarDay(at: Date | string, timeZone = "UTC"): TCalendarDay {
  if (typeof at === "string") {
    if (!isCalendarDay(at)) {
      throw new AppError("invalid_input", `"${at}" is not a date`, [{ field: "date", message: "date must be YYYY-MM-DD" }]);
    }
    return at;
  }
  if (Number.isNaN(at.getTime())) {
    throw new AppError("invalid_input", "the date is not valid", [{ field: "date", message: "date must be a real date and time" }]);
  }
  if (timeZone === "UTC") return at.toISOString().slice(0, 10);
  return formatterFor(timeZone).format(at);
}

/** Whole calendar days from `from` to `to` (negative when `to` is earlier). */
export function daysBetween(from: TCalendarDay, to: TCalendarDay): number {
  const a = dayNumber(from);
  const b = dayNumber(to);
  if (a === null || b === null) throw new AppError("invalid_input", "date must be YYYY-MM-DD");
  return b - a;
}

export function addDays(day: TCalendarDay, days: number): TCalendarDay {
  const n = dayNumber(day);
  if (n === null) throw new AppError("invalid_input", "date must be YYYY-MM-DD");
  return isoDateOfUtcDay(n + days);
}

/** "YYYY-MM" of a calendar day. */
export const monthOf = (day: TCalendarDay): string => day.slice(0, 7);
