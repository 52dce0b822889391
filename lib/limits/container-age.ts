import { ruleTrigger, type TRule } from "@/lib/rules/rule";
import { ruleStatus, type TLimitStatus } from "./rule-status";
import { dateOfUtcDay, utcDay } from "./utc-day";

export type TContainerAge = {
  ageDays: number;
  /** Days from today to the deadline: 0 on the last day, negative once past. */
  daysLeft: number;
  /** The last day the container may still be on site (00:00 UTC of that date). */
  deadline: Date;
  /** The first day it is over the limit: the day after the deadline. */
  firstDayOver: Date;
  status: TLimitStatus;
};

/**
 * How old a container is against an age rule, on UTC calendar dates.
 *
 * The day count: the accumulation start date is day 0 and each UTC midnight adds one, whatever the time
 * of day at either end. Under a 365-day limit with trigger "above" (40 CFR 273.15(a), 273.35(a): "no
 * longer than one year"), day 365 is the last allowed day and day 366 is over. A year is always 365
 * days here, never the calendar anniversary: a container started 2024-01-01 (leap year) has its last
 * day on 2024-12-31 (day 365) and is over on 2025-01-01 (day 366), one day before the anniversary — the
 * earlier, safer reading. Started 2025-03-01, the last day is 2026-03-01 (the anniversary, day 365).
 * A start date after asOf (a data error) counts as today.
 */
export function containerAge({ accumulationStart, asOf, rule }: { accumulationStart: Date; asOf: Date; rule: TRule }): TContainerAge {
  const today = utcDay(asOf);
  const ageDays = ageDaysOf(accumulationStart, asOf);
  const startDay = today - ageDays;
  const lastAllowedAge = ruleTrigger(rule) === "above" ? rule.threshold : rule.threshold - 1;
  const deadlineDay = startDay + lastAllowedAge;
  return {
    ageDays,
    daysLeft: deadlineDay - today,
    deadline: dateOfUtcDay(deadlineDay),
    firstDayOver: dateOfUtcDay(deadlineDay + 1),
    status: ruleStatus(rule, ageDays, rule.threshold),
  };
}

/** Whole UTC days from the start date (day 0) to asOf; a start after asOf counts as today. */
export const ageDaysOf = (accumulationStart: Date, asOf: Date): number => Math.max(0, utcDay(asOf) - utcDay(accumulationStart));
