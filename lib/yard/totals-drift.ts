/** Running totals as kept on sites, bays and containers. Masses in kg. */
export type TTotalsRow = { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };

export type TDriftField = { field: keyof TTotalsRow; recorded: number; recounted: number; difference: number };

const FIELDS: (keyof TTotalsRow)[] = ["unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg"];

/**
 * A mass counts as drifted past 1 mg plus one part in 10⁹: running totals are float sums of many small
 * deltas added in another order than a recount adds them, which leaves differences far below that.
 */
export const MASS_TOLERANCE = { absoluteKg: 1e-6, relative: 1e-9 } as const;

/** Where a running total differs from a recount of the records; empty when they agree. Counts must agree exactly. */
export function totalsDrift(recorded: TTotalsRow, recounted: TTotalsRow): TDriftField[] {
  const out: TDriftField[] = [];
  for (const field of FIELDS) {
    const a = recorded[field];
    const b = recounted[field];
    const difference = a - b;
    const tolerance = field === "unitCount" ? 0 : MASS_TOLERANCE.absoluteKg + MASS_TOLERANCE.relative * Math.max(Math.abs(a), Math.abs(b));
    if (!(Math.abs(difference) <= tolerance)) out.push({ field, recorded: a, recounted: b, difference });
  }
  return out;
}
