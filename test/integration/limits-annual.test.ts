import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, params, systemActor } from "../helpers/factories";
import { pdfPages, squash } from "../unit/papers/pdf-tools";
import type { TDb } from "@/lib/db/client";
import { changeSiteLevel } from "@/lib/db/totals";
import { annualFigures } from "@/lib/annual/annual-figures";

let db: TDb;
let annual: typeof import("@/app/api/v1/sites/[id]/annual/route");
let receiveLot: typeof import("@/lib/db/lots").receiveLot;

beforeAll(async () => {
  db = await testDb();
  annual = await import("@/app/api/v1/sites/[id]/annual/route");
  ({ receiveLot } = await import("@/lib/db/lots"));
});

const lot = (site: string, netKg: number, unitCount: number) => ({
  site,
  ticketNumber: `T-${Math.random().toString(36).slice(2, 9)}`,
  grossKg: netKg + 500,
  tareKg: 500,
  unitCount,
  mixBasis: "count" as const,
  mix: [{ kind: "flooded" as const, nominalVoltage: 12, count: unitCount }],
});

/** 1 000 kg on hand from December 2024, 500 kg more on 1 March 2025, 800 kg out at noon on 1 June 2025. */
async function siteWithHistory() {
  const { organisation, site } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "compliance" });
  const { key: clerkKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
  const actor = systemActor(organisation.id, site.id, "admin");
  await receiveLot(actor, lot(site.id, 1_000, 50), { at: new Date("2024-12-10T09:00:00Z") });
  await receiveLot(actor, lot(site.id, 500, 25), { at: new Date("2025-03-01T10:00:00Z") });
  await db.$transaction((tx) =>
    changeSiteLevel(tx, { siteId: site.id, delta: { unitCount: -40, batteryKg: -800, leadKg: -480, electrolyteKg: -190, acidKg: -70 }, reason: "departure", at: new Date("2025-06-01T12:00:00Z") }),
  );
  return { organisation, site, key, clerkKey };
}

const get = (key: string | undefined, siteId: string, query: string) => annual.GET(apiRequest(`/api/v1/sites/${siteId}/annual?${query}`, { key }), params({ id: siteId }));

describe("GET /api/v1/sites/:id/annual", () => {
  test("40 CFR 370.42: maximum daily amount, average daily amount and days on site, from the year's changes and the opening balance", async () => {
    const { site, key } = await siteWithHistory();
    const response = await get(key, site.id, "year=2025");
    expect(response.status).toBe(200);
    const figures = await response.json();
    expect(figures).toMatchObject({ year: 2025, daysInYear: 365, eventCount: 2 });
    expect(figures.openingBalance).toMatchObject({ batteryKg: 1_000, unitCount: 50 });
    expect(figures.closingBalance).toMatchObject({ batteryKg: 700, unitCount: 35 });
    const battery = figures.substances.find((s: { substance: string }) => s.substance === "battery");
    expect(battery).toMatchObject({ maxDailyKg: 1_500, maxDate: "2025-03-01", daysOnSite: 365 });
    // 59 days at 1 000 kg (January, February), 93 at 1 500 kg (1 March to 1 June, the day's highest), 213 at 700 kg.
    expect(battery.averageDailyKg).toBeCloseTo((59 * 1_000 + 93 * 1_500 + 213 * 700) / 365, 6);
    expect(figures.days).toHaveLength(365);
    expect(figures.caution).toContain("authority having jurisdiction");
    const before = await (await get(key, site.id, "year=2024")).json();
    expect(before.substances.find((s: { substance: string }) => s.substance === "battery")).toMatchObject({ maxDailyKg: 1_000, maxDate: "2024-12-10", daysOnSite: 22 });
  });

  test("the database's day-by-day reduction gives the same figures as every change fed one by one", async () => {
    const { site, key } = await siteWithHistory();
    // An invented, deterministic history: bursts, changes at the same instant, dips within a day and below zero.
    let seed = 7;
    const random = () => ((seed = (seed * 1_664_525 + 1_013_904_223) >>> 0) / 2 ** 32);
    const rows = [];
    for (let i = 0; i < 400; i++) {
      const at = new Date(Date.UTC(2025, 0, 1) + Math.floor(random() * 365) * 86_400_000 + Math.floor(random() * 4) * 3_600_000);
      const n = random() < 0.6 ? Math.ceil(random() * 5) : -Math.ceil(random() * 6);
      rows.push({ siteId: site.id, at, reason: n > 0 ? "intake" : "departure", unitCount: n, batteryKg: n * 17.5, leadKg: n * 11.1, electrolyteKg: n * 4.2, acidKg: n * 1.55 });
    }
    await db.levelChange.createMany({ data: rows });
    const viaRoute = await (await get(key, site.id, "year=2025")).json();
    const all = await db.levelChange.findMany({ where: { siteId: site.id }, orderBy: { at: "asc" } });
    const expected = JSON.parse(JSON.stringify(annualFigures({ events: all, year: 2025, siteId: site.id })));
    expect(viaRoute.eventCount).toBe(expected.eventCount);
    expect(viaRoute.days.map((d: { date: string; batteryKg: number; unitCount: number }) => [d.date, Number(d.batteryKg.toFixed(6)), d.unitCount])).toEqual(
      expected.days.map((d: { date: string; batteryKg: number; unitCount: number }) => [d.date, Number(d.batteryKg.toFixed(6)), d.unitCount]),
    );
    for (const [i, s] of expected.substances.entries()) {
      const got = viaRoute.substances[i];
      expect([got.substance, got.maxDate, got.daysOnSite, got.maxDailyCode, got.averageDailyCode]).toEqual([s.substance, s.maxDate, s.daysOnSite, s.maxDailyCode, s.averageDailyCode]);
      expect(got.maxDailyKg).toBeCloseTo(s.maxDailyKg, 6);
      expect(got.averageDailyKg).toBeCloseTo(s.averageDailyKg, 6);
    }
    expect(viaRoute.closingBalance.unitCount).toBe(expected.closingBalance.unitCount);
    // The opening balance is given, so the only note that differs is how it was found.
    expect(viaRoute.notes.filter((n: string) => !n.startsWith("Opening balance"))).toEqual(expected.notes.filter((n: string) => !n.startsWith("Opening balance")));
  });

  test("as CSV and as the printable worksheet", async () => {
    const { site, key } = await siteWithHistory();
    const csv = await get(key, site.id, "year=2025&format=csv");
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toContain("text/csv");
    const text = await csv.text();
    expect(text).toContain("Annual figures worksheet (Tier II)");
    expect(text).toContain("2025-03-01,1500");
    const pdf = await get(key, site.id, "year=2025&format=pdf");
    expect(pdf.status).toBe(200);
    expect(pdf.headers.get("content-type")).toBe("application/pdf");
    const pages = squash(pdfPages(Buffer.from(await pdf.arrayBuffer())).join(" "));
    expect(pages).toContain("Annual figures worksheet");
    expect(pages).toContain(site.name);
    expect(pages).toContain("Sulfuric acid");
    expect(pages).toContain("authority having jurisdiction");
  });

  test.each([
    ["no year", ""],
    ["a year that is not a number", "year=last"],
    ["an unknown format", "year=2025&format=xml"],
    ["a year before 1970", "year=1969"],
  ])("400 for %s", async (_case, query) => {
    const { site, key } = await siteWithHistory();
    const response = await get(key, site.id, query);
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues.length).toBeGreaterThan(0);
  });

  test("403 for a clerk (no annual figures), 404 for another organisation's site, 401 without a key", async () => {
    const { site, clerkKey, key } = await siteWithHistory();
    const other = await makeOrgWithSite(db);
    expect((await get(clerkKey, site.id, "year=2025")).status).toBe(403);
    expect((await get(key, other.site.id, "year=2025")).status).toBe(404);
    expect((await get(undefined, site.id, "year=2025")).status).toBe(401);
  });
});
