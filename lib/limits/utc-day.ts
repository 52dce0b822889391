import { AppError } from "@/lib/errors";

export const MS_PER_DAY = 86_400_000;

/**
 * The UTC calendar day of an instant, as a day number (days since 1970-01-01). All date arithmetic of
 * limits and annual figures works on these, so a time of day or a local time zone never moves a date.
 */
export function utcDay(at: Date): number {
  const ms = at.getTime();
  if (!Number.isFinite(ms)) throw new AppError("invalid_input", "a date is not valid");
  return Math.floor(ms / MS_PER_DAY);
}

/** 00:00 UTC of a day number: the Date that stands for a calendar date. */
export const dateOfUtcDay = (day: number): Date => new Date(day * MS_PER_DAY);

/** YYYY-MM-DD of a day number. */
export const isoDateOfUtcDay = (day: number): string => dateOfUtcDay(day).toISOString().slice(0, 10);
