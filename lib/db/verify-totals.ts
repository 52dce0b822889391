import { totalsDrift, type TDriftField, type TTotalsRow } from "@/lib/yard/totals-drift";
import { ON_SITE_CONTAINER_STATES, ON_SITE_ITEM_STATES } from "@/lib/yard/schema";
import { db, type TDb } from "./client";
import { addTotals, pickTotals, ZERO_TOTALS } from "./totals";

export type TDriftScope = "site" | "bay" | "container" | "ledger";

export type TDrift = { scope: TDriftScope; id: string; name: string; siteId: string; fields: TDriftField[] };

export type TVerifyReport = { checked: { sites: number; bays: number; containers: number }; drift: TDrift[]; hasDrift: boolean };

type TSums = { _count?: { _all: number }; _sum: { unitCount?: number | null; batteryKg?: number | null; netKg?: number | null; leadKg?: number | null; electrolyteKg?: number | null; acidKg?: number | null } };

const unitTotals = (g: TSums): TTotalsRow => ({
  unitCount: g._count?._all ?? 0,
  batteryKg: g._sum.batteryKg ?? 0,
  leadKg: g._sum.leadKg ?? 0,
  electrolyteKg: g._sum.electrolyteKg ?? 0,
  acidKg: g._sum.acidKg ?? 0,
});
const lotTotals = (g: TSums): TTotalsRow => ({
  unitCount: g._sum.unitCount ?? 0,
  batteryKg: g._sum.netKg ?? 0,
  leadKg: g._sum.leadKg ?? 0,
  electrolyteKg: g._sum.electrolyteKg ?? 0,
  acidKg: g._sum.acidKg ?? 0,
});
const ledgerTotals = (g: TSums): TTotalsRow => ({ ...lotTotals(g), batteryKg: g._sum.batteryKg ?? 0 });

function sumInto(map: Map<string, TTotalsRow>, key: string | null, t: TTotalsRow) {
  if (key === null) return;
  map.set(key, addTotals(map.get(key) ?? ZERO_TOTALS, t));
}

/**
 * Recounts every running total from the records and reports where it differs:
 * - a site holds its units and lots that are received, stowed or loaded, and equals the sum of its level ledger;
 * - a container still on site (open, sealed, loaded) holds the units and lots whose container it is;
 * - a bay holds what its containers on site hold, recounted from their units and lots.
 * Departed and delivered containers are not checked: their figures are a record of what left.
 */
export async function verifyTotals(client: TDb = db(), { siteIds }: { siteIds?: string[] } = {}): Promise<TVerifyReport> {
  const site = siteIds ? { in: siteIds } : undefined;
  const onSite = { in: [...ON_SITE_ITEM_STATES] as string[] };
  const sums = { batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } as const;
  const [sites, bays, containers, unitsBySite, lotsBySite, ledger, unitsByContainer, lotsByContainer] = await Promise.all([
    client.site.findMany({ where: { id: site } }),
    client.bay.findMany({ where: { siteId: site } }),
    client.container.findMany({ where: { siteId: site, state: { in: [...ON_SITE_CONTAINER_STATES] } } }),
    client.unit.groupBy({ by: ["siteId"], where: { siteId: site, state: onSite }, _count: { _all: true }, _sum: sums }),
    client.lot.groupBy({ by: ["siteId"], where: { siteId: site, state: onSite }, _sum: { unitCount: true, netKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
    client.levelChange.groupBy({ by: ["siteId"], where: { siteId: site }, _sum: { unitCount: true, ...sums } }),
    client.unit.groupBy({ by: ["containerId"], where: { siteId: site, containerId: { not: null } }, _count: { _all: true }, _sum: sums }),
    client.lot.groupBy({ by: ["containerId"], where: { siteId: site, containerId: { not: null } }, _sum: { unitCount: true, netKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
  ]);

  const siteCount = new Map<string, TTotalsRow>();
  for (const g of unitsBySite) sumInto(siteCount, g.siteId, unitTotals(g));
  for (const g of lotsBySite) sumInto(siteCount, g.siteId, lotTotals(g));
  const ledgerCount = new Map<string, TTotalsRow>();
  for (const g of ledger) sumInto(ledgerCount, g.siteId, ledgerTotals(g));
  const containerCount = new Map<string, TTotalsRow>();
  for (const g of unitsByContainer) sumInto(containerCount, g.containerId, unitTotals(g));
  for (const g of lotsByContainer) sumInto(containerCount, g.containerId, lotTotals(g));
  const bayCount = new Map<string, TTotalsRow>();
  for (const c of containers) sumInto(bayCount, c.bayId, containerCount.get(c.id) ?? ZERO_TOTALS);

  const drift: TDrift[] = [];
  const check = (scope: TDriftScope, row: { id: string; name: string; siteId: string }, recorded: TTotalsRow, recounted: TTotalsRow) => {
    const fields = totalsDrift(recorded, recounted);
    if (fields.length) drift.push({ scope, ...row, fields });
  };
  for (const s of sites) {
    check("site", { id: s.id, name: s.name, siteId: s.id }, pickTotals(s), siteCount.get(s.id) ?? ZERO_TOTALS);
    check("ledger", { id: s.id, name: `${s.name} (level ledger)`, siteId: s.id }, pickTotals(s), ledgerCount.get(s.id) ?? ZERO_TOTALS);
  }
  for (const b of bays) check("bay", { id: b.id, name: b.name, siteId: b.siteId }, pickTotals(b), bayCount.get(b.id) ?? ZERO_TOTALS);
  for (const c of containers) check("container", { id: c.id, name: c.labelNumber, siteId: c.siteId }, pickTotals(c), containerCount.get(c.id) ?? ZERO_TOTALS);
  return { checked: { sites: sites.length, bays: bays.length, containers: containers.length }, drift, hasDrift: drift.length > 0 };
}
