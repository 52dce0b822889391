import type { TActor } from "@/lib/auth/permissions";
import { annualCsv } from "@/lib/annual/annual-csv";
import { annualFigures, type TAnnualFigures, type TLevelEvent, type TOnHand } from "@/lib/annual/annual-figures";
import { renderAnnualWorksheet } from "@/lib/papers/render-annual-worksheet";
import { getRulebook } from "@/lib/rules/rulebooks";
import { TIER_TWO_ACID_THRESHOLD_LB, TIER_TWO_LEAD_THRESHOLD_LB } from "@/lib/rules/us-federal";
import { lbToKg } from "@/lib/units";
import { db, type TDb } from "./client";
import type { Site } from "./generated/sqlite/client";
import { siteFor } from "./sites";

type TDayRow = {
  day: string;
  n: unknown;
  sb: unknown; sl: unknown; sa: unknown; su: unknown;
  maxb: unknown; minb: unknown; maxl: unknown; minl: unknown; maxa: unknown; mina: unknown; maxu: unknown; minu: unknown;
};

const COLUMNS = [
  ["batteryKg", "sb", "maxb", "minb"],
  ["leadKg", "sl", "maxl", "minl"],
  ["acidKg", "sa", "maxa", "mina"],
  ["unitCount", "su", "maxu", "minu"],
] as const;

/**
 * The year's level changes reduced by the database to one row per UTC day: the day's net change and the highest
 * and lowest running level (a running SUM over the year in time order; changes at the same instant count together,
 * as annualFigures applies them). Portable SQL: a window function, and the day as the first ten characters of the
 * timestamp's text (ISO text on SQLite, "YYYY-MM-DD hh:mm:ss" on PostgreSQL).
 */
async function dailyLevels(client: TDb, siteId: string, from: Date, to: Date): Promise<TDayRow[]> {
  return client.$queryRaw<TDayRow[]>`
    SELECT "day", COUNT(*) AS "n",
      SUM("b") AS "sb", SUM("l") AS "sl", SUM("a") AS "sa", SUM("u") AS "su",
      MAX("rb") AS "maxb", MIN("rb") AS "minb", MAX("rl") AS "maxl", MIN("rl") AS "minl",
      MAX("ra") AS "maxa", MIN("ra") AS "mina", MAX("ru") AS "maxu", MIN("ru") AS "minu"
    FROM (
      SELECT substr(CAST("at" AS TEXT), 1, 10) AS "day",
        "batteryKg" AS "b", "leadKg" AS "l", "acidKg" AS "a", "unitCount" AS "u",
        SUM("batteryKg") OVER w AS "rb", SUM("leadKg") OVER w AS "rl", SUM("acidKg") OVER w AS "ra", SUM("unitCount") OVER w AS "ru"
      FROM "LevelChange"
      WHERE "siteId" = ${siteId} AND "at" >= ${from} AND "at" < ${to}
      WINDOW w AS (ORDER BY "at")
    ) AS "t"
    GROUP BY "day"
    ORDER BY "day"`;
}

/**
 * Three changes a day that walk the level exactly as the day's own changes did at its extremes: down to its lowest,
 * up to its highest, then to where it closed. annualFigures takes the most on hand during each day (and notes a
 * level below zero), so these give the same figures as every change of the day, in a few hundred rows.
 */
export function eventsFromDailyLevels(rows: readonly TDayRow[]): { events: TLevelEvent[]; eventCount: number } {
  const events: TLevelEvent[] = [];
  const level = { batteryKg: 0, leadKg: 0, acidKg: 0, unitCount: 0 };
  let eventCount = 0;
  for (const row of rows) {
    const start = Date.parse(`${row.day}T00:00:00.000Z`);
    const low = { at: new Date(start + 1), batteryKg: 0, leadKg: 0, acidKg: 0, unitCount: 0 };
    const high = { at: new Date(start + 2), batteryKg: 0, leadKg: 0, acidKg: 0, unitCount: 0 };
    const close = { at: new Date(start + 3), batteryKg: 0, leadKg: 0, acidKg: 0, unitCount: 0 };
    for (const [key, sum, max, min] of COLUMNS) {
      const lowest = Number(row[min]);
      const highest = Number(row[max]);
      const closing = level[key] + Number(row[sum]);
      low[key] = lowest - level[key];
      high[key] = highest - lowest;
      close[key] = closing - highest;
      level[key] = closing;
    }
    events.push(low, high, close);
    eventCount += Number(row.n);
  }
  return { events, eventCount };
}

/**
 * The annual figures of a site for a calendar year (UTC): the level changes dated in the year (reduced per day by
 * the database, see dailyLevels) plus the opening balance as ONE aggregate of every change before 1 January.
 */
export async function annualOfSite(client: TDb, siteId: string, year: number): Promise<TAnnualFigures> {
  // An impossible year gets annualFigures' own field error before any query runs.
  if (!Number.isInteger(year) || year < 1970 || year > 9998) return annualFigures({ events: [], year, siteId });
  const from = new Date(Date.UTC(year, 0, 1));
  const to = new Date(Date.UTC(year + 1, 0, 1));
  const [before, days] = await Promise.all([
    client.levelChange.aggregate({ where: { siteId, at: { lt: from } }, _sum: { batteryKg: true, leadKg: true, acidKg: true, unitCount: true } }),
    dailyLevels(client, siteId, from, to),
  ]);
  const openingBalance: TOnHand = {
    batteryKg: before._sum.batteryKg ?? 0,
    leadKg: before._sum.leadKg ?? 0,
    acidKg: before._sum.acidKg ?? 0,
    unitCount: before._sum.unitCount ?? 0,
  };
  const { events, eventCount } = eventsFromDailyLevels(days);
  return { ...annualFigures({ events, year, siteId, openingBalance }), eventCount };
}

export async function siteAnnual(actor: TActor, siteId: string, year: number): Promise<{ site: Site; figures: TAnnualFigures }> {
  const site = await siteFor(actor, siteId, "annual.read");
  return { site, figures: await annualOfSite(db(), site.id, year) };
}

export const annualCsvOf = (figures: TAnnualFigures): string => annualCsv(figures);

const THRESHOLD_KG: Record<string, { kg: number; citation: string } | undefined> = {
  "sulfuric-acid": { kg: lbToKg(TIER_TWO_ACID_THRESHOLD_LB), citation: "40 CFR 370.10(a)(1)" },
  lead: { kg: lbToKg(TIER_TWO_LEAD_THRESHOLD_LB), citation: "40 CFR 370.10(a)" },
};

/** The annual figures worksheet (PDF) of a site and year, with the daily line and the Tier II thresholds. */
export async function annualWorksheetPdf({ site, figures, issuedAt = new Date() }: { site: Site; figures: TAnnualFigures; issuedAt?: Date }): Promise<Buffer> {
  const rulebook = getRulebook(figures.rulebookId);
  const daily = { "sulfuric-acid": "acidKg", lead: "leadKg", battery: "batteryKg" } as const;
  return renderAnnualWorksheet({
    issuedAt: issuedAt.toISOString(),
    rulebook: { id: rulebook.id, version: rulebook.version },
    site: { name: site.name, address: site.address, regulatoryIds: site.regulatoryIds },
    year: figures.year,
    chartUnit: site.unitSystem === "kg" ? "kg" : "lb",
    substances: figures.substances.map((s) => ({
      name: s.name,
      cas: s.casNumber ?? "",
      maxDailyKg: s.maxDailyKg,
      averageDailyKg: s.averageDailyKg,
      daysOnSite: s.daysOnSite,
      thresholdKg: THRESHOLD_KG[s.substance]?.kg,
      thresholdCitation: THRESHOLD_KG[s.substance]?.citation ?? "",
      dailyKg: figures.days.map((d) => d[daily[s.substance]]),
    })),
    notes: [...figures.notes, figures.caution],
  });
}
