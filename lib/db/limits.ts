import { randomUUID } from "node:crypto";
import type { TActor } from "@/lib/auth/permissions";
import { evaluateLimits, HISTORY_WINDOW_DAYS, type TEvaluateLimitsInput, type TLimitsReport } from "@/lib/limits/evaluate-limits";
import { MS_PER_DAY } from "@/lib/limits/utc-day";
import { ZCustomRule, type TCustomRule, type TRule, type TSiteRule } from "@/lib/rules/rule";
import { getRulebook } from "@/lib/rules/rulebooks";
import { ON_SITE_CONTAINER_STATES } from "@/lib/yard/schema";
import { db, type TDb } from "./client";
import type { CustomRule, Site } from "./generated/sqlite/client";
import { siteFor, visibleSites } from "./sites";
import { pickTotals, type TTotals, yearPeakKg } from "./totals";
import { writeTrail } from "./trail";

const DAMAGED = ["leaking", "cracked"];
/** States of a unit that sits in a container still at the site. */
const IN_CONTAINER_ON_SITE = ["stowed", "loaded"];

const siteRuleOf = (row: CustomRule): TSiteRule => ({ ...ZCustomRule.parse(row), id: row.id });

/**
 * The inputs of the limits engine for one site, each from one cheap query: the running totals and the year's
 * peak from the site row; the containers on site; which of them hold a damaged unit (a GROUP BY over the site's
 * stowed units, by the (siteId, state) index); the net change of the last 28 days as ONE aggregate over the level
 * ledger by its (siteId, at) index; and the site's own rules. Nothing scans the history.
 */
export async function limitsInputs(client: TDb, site: Site, asOf: Date): Promise<TEvaluateLimitsInput> {
  const windowStart = new Date(asOf.getTime() - HISTORY_WINDOW_DAYS * MS_PER_DAY);
  const isYoung = site.createdAt.getTime() > windowStart.getTime();
  const [containers, damaged, window, first, customRules] = await Promise.all([
    client.container.findMany({
      where: { siteId: site.id, state: { in: [...ON_SITE_CONTAINER_STATES] } },
      select: { id: true, labelNumber: true, accumulationStart: true, state: true, isClosed: true },
    }),
    client.unit.groupBy({ by: ["containerId"], where: { siteId: site.id, state: { in: IN_CONTAINER_ON_SITE }, condition: { in: DAMAGED } } }),
    client.levelChange.aggregate({
      where: { siteId: site.id, at: { gt: windowStart, lte: asOf } },
      _sum: { unitCount: true, batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true },
    }),
    // Only a site younger than the window needs its first change (backdated imports can be older than the site row).
    isYoung ? client.levelChange.findFirst({ where: { siteId: site.id }, orderBy: { at: "asc" }, select: { at: true } }) : null,
    client.customRule.findMany({ where: { siteId: site.id }, orderBy: { createdAt: "asc" } }),
  ]);
  const withDamage = new Set(damaged.map((d) => d.containerId));
  const s = window._sum;
  const netChangeLast28Days: TTotals = {
    unitCount: s.unitCount ?? 0,
    batteryKg: s.batteryKg ?? 0,
    leadKg: s.leadKg ?? 0,
    electrolyteKg: s.electrolyteKg ?? 0,
    acidKg: s.acidKg ?? 0,
  };
  let daysCovered = HISTORY_WINDOW_DAYS;
  if (isYoung) {
    const since = Math.min(site.createdAt.getTime(), first?.at.getTime() ?? Number.POSITIVE_INFINITY);
    daysCovered = Math.min(HISTORY_WINDOW_DAYS, Math.max(1, Math.ceil((asOf.getTime() - since) / MS_PER_DAY)));
  }
  return {
    rulebook: getRulebook(site.rulebookId),
    customRules: customRules.map(siteRuleOf),
    totals: pickTotals(site),
    containers: containers.map((c) => ({ ...c, hasLeaking: withDamage.has(c.id) })),
    history: { netChangeLast28Days, daysCovered },
    asOf,
    // Intake never stores the peak (see yearPeakKg): the year's peak so far is derived here.
    site: { isConsumerExempt: site.isConsumerExempt, peakYear: asOf.getUTCFullYear(), peakBatteryKg: yearPeakKg(site, asOf.getUTCFullYear()) },
  };
}

export type TSiteLimitsView = {
  site: { id: string; name: string; kind: string; unitSystem: string; rulebookId: string; totals: TTotals };
  report: TLimitsReport;
  /** The rules evaluated, rulebook's then the site's, for screens that draw their warning levels. */
  definitions: TRule[];
};

export async function limitsOfSite(client: TDb, site: Site, asOf: Date = new Date()): Promise<TSiteLimitsView> {
  const inputs = await limitsInputs(client, site, asOf);
  return {
    site: { id: site.id, name: site.name, kind: site.kind, unitSystem: site.unitSystem, rulebookId: site.rulebookId, totals: pickTotals(site) },
    report: evaluateLimits(inputs),
    definitions: [...inputs.rulebook.rules, ...(inputs.customRules ?? [])],
  };
}

/** Each rule of the site's rulebook and its own rules against what it holds now, with container deadlines. */
export async function siteLimits(actor: TActor, siteId: string, { asOf }: { asOf?: Date } = {}): Promise<TSiteLimitsView> {
  const site = await siteFor(actor, siteId, "limits.read");
  return limitsOfSite(db(), site, asOf);
}

/** The roll-up: every site the person may see the limits of, each with its rule statuses. */
export async function organisationLimits(actor: TActor, { asOf = new Date() }: { asOf?: Date } = {}): Promise<TSiteLimitsView[]> {
  const sites = await visibleSites(actor, "limits.read");
  const out: TSiteLimitsView[] = [];
  for (const site of sites) out.push(await limitsOfSite(db(), site, asOf));
  return out;
}

export async function listCustomRules(actor: TActor, siteId: string) {
  const site = await siteFor(actor, siteId, "limits.read");
  return db().customRule.findMany({ where: { siteId: site.id }, orderBy: { createdAt: "asc" } });
}

/** Adds a site's own rule (a permit or fire-code limit with its citation); administrators only. */
export async function addCustomRule(actor: TActor, siteId: string, input: TCustomRule) {
  const site = await siteFor(actor, siteId, "setup.write");
  return db().$transaction(async (tx) => {
    const rule = await tx.customRule.create({ data: { id: randomUUID(), siteId: site.id, ...input } });
    await writeTrail(tx, actor, { siteId: site.id, action: "rule.added", entity: "custom-rule", entityId: rule.id, after: rule });
    return rule;
  });
}
