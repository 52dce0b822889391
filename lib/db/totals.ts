import type { TTx } from "./client";

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
 * Moves the site's on-hand totals by a delta and records it in the level ledger (the source of the annual
 * figures and intake rates), keeping the year's peak battery mass for the sticky handler category.
 */
export async function changeSiteLevel(
  tx: TTx,
  { siteId, delta, reason, refId, at }: { siteId: string; delta: TTotals; reason: string; refId?: string; at: Date },
): Promise<TTotals> {
  const site = await tx.site.update({ where: { id: siteId }, data: incrementBy(delta) });
  const year = at.getUTCFullYear();
  const before = site.batteryKg - delta.batteryKg;
  if (year > site.peakYear) {
    // A new calendar year: the category starts again from what is on hand now (40 CFR 273.9).
    await tx.site.update({ where: { id: siteId }, data: { peakYear: year, peakBatteryKg: Math.max(before, site.batteryKg) } });
  } else if (year === site.peakYear && site.batteryKg > site.peakBatteryKg) {
    await tx.site.update({ where: { id: siteId }, data: { peakBatteryKg: site.batteryKg } });
  }
  await tx.levelChange.create({ data: { siteId, at, reason, refId, ...delta } });
  return pickTotals(site);
}
