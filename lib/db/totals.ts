import type { TDb, TTx } from "./client";

/** The running totals kept on sites, bays and containers. Masses in kg. */
export type TTotals = { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };

export const ZERO_TOTALS: TTotals = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };

export const negate = (t: TTotals): TTotals => ({
  unitCount: -t.unitCount,
  batteryKg: -t.batteryKg,
  leadKg: -t.leadKg,
  electrolyteKg: -t.electrolyteKg,
  acidKg: -t.acidKg,
});

export const addTotals = (a: TTotals, b: TTotals): TTotals => ({
  unitCount: a.unitCount + b.unitCount,
  batteryKg: a.batteryKg + b.batteryKg,
  leadKg: a.leadKg + b.leadKg,
  electrolyteKg: a.electrolyteKg + b.electrolyteKg,
  acidKg: a.acidKg + b.acidKg,
});

export const pickTotals = (row: TTotals): TTotals => ({
  unitCount: row.unitCount,
  batteryKg: row.batteryKg,
  leadKg: row.leadKg,
  electrolyteKg: row.electrolyteKg,
  acidKg: row.acidKg,
});

/** Prisma update data that adds a delta atomically in the database (no read-modify-write race). */
export const incrementBy = (d: TTotals) => ({
  unitCount: { increment: d.unitCount },
  batteryKg: { increment: d.batteryKg },
  leadKg: { increment: d.leadKg },
  electrolyteKg: { increment: d.electrolyteKg },
  acidKg: { increment: d.acidKg },
});

/**
 * The highest battery mass on hand at the site in `year`, for the handler category that, once reached, holds to
 * the end of the calendar year (40 CFR 273.9). Only decreases store a peak: while on-hand only grows, the peak is
 * the amount on hand now, so intake never has to touch it.
 */
export function yearPeakKg(site: { batteryKg: number; peakYear: number; peakBatteryKg: number }, year: number): number {
  if (site.peakYear === year) return Math.max(site.peakBatteryKg, site.batteryKg);
  // No decrease recorded this year: on-hand has only grown since 1 January, so now is the year's peak so far.
  return site.peakYear < year ? site.batteryKg : 0;
}

/** The two writes of an increase, unawaited, for a batch `$transaction([...])`. */
export function siteIncreaseOps(
  client: TTx | TDb,
  { siteId, delta, reason, refId, at }: { siteId: string; delta: TTotals; reason: string; refId?: string; at: Date },
) {
  return [
    client.site.update({ where: { id: siteId }, data: incrementBy(delta), select: { unitCount: true, batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
    client.levelChange.create({ data: { siteId, at, reason, refId, ...delta }, select: { id: true } }),
  ] as const;
}

/**
 * Moves the site's on-hand totals by a delta and records it in the level ledger (the source of the annual
 * figures and intake rates). Before a decrease, the year's peak so far is stored (see yearPeakKg).
 */
export async function changeSiteLevel(
  tx: TTx,
  { siteId, delta, reason, refId, at }: { siteId: string; delta: TTotals; reason: string; refId?: string; at: Date },
): Promise<TTotals> {
  if (delta.batteryKg < 0) {
    const current = await tx.site.findUniqueOrThrow({ where: { id: siteId }, select: { batteryKg: true, peakYear: true, peakBatteryKg: true } });
    const year = at.getUTCFullYear();
    if (year >= current.peakYear) {
      await tx.site.update({ where: { id: siteId }, data: { peakYear: year, peakBatteryKg: yearPeakKg(current, year) } });
    }
  }
  const [siteUpdate, levelInsert] = siteIncreaseOps(tx, { siteId, delta, reason, refId, at });
  const site = await siteUpdate;
  await levelInsert;
  return pickTotals(site);
}
