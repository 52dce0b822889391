import type { TLimitStatus } from "@/lib/limits/rule-status";

export type TAgeBar = { percent: number; status: TLimitStatus; label: string };

/**
 * How much of a container's time limit is used, for the Yard's age bar: days used of the limit, capped at
 * 100 % for the bar (the label still says how far over it is). The status comes from the limits engine.
 */
export function ageBar({ ageDays, limitDays, status }: { ageDays: number | null; limitDays: number | null; status: TLimitStatus }): TAgeBar {
  if (ageDays === null) return { percent: 0, status: "ok", label: "empty: no start date yet" };
  if (!limitDays) return { percent: 0, status, label: `day ${ageDays}` };
  const percent = Math.min(100, Math.max(0, (ageDays / limitDays) * 100));
  const over = ageDays - limitDays;
  return { percent, status, label: over > 0 ? `day ${ageDays} of ${limitDays}: ${over} over` : `day ${ageDays} of ${limitDays}` };
}
