import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, makeSite, params, systemActor } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { changeSiteLevel, negate } from "@/lib/db/totals";
import { dateOfUtcDay, utcDay } from "@/lib/limits/utc-day";

let db: TDb;
let limits: typeof import("@/app/api/v1/sites/[id]/limits/route");
let rules: typeof import("@/app/api/v1/sites/[id]/rules/route");
let lots: typeof import("@/app/api/v1/lots/route");
let units: typeof import("@/app/api/v1/units/route");
let receiveLot: typeof import("@/lib/db/lots").receiveLot;

beforeAll(async () => {
  db = await testDb();
  limits = await import("@/app/api/v1/sites/[id]/limits/route");
  rules = await import("@/app/api/v1/sites/[id]/rules/route");
  lots = await import("@/app/api/v1/lots/route");
  units = await import("@/app/api/v1/units/route");
  ({ receiveLot } = await import("@/lib/db/lots"));
});

const DAY = 86_400_000;
const LQH = "us-uw-large-quantity-handler";

async function yard() {
  const { organisation, site } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "yard" });
  return { organisation, site, key };
}


/** A lot whose net weight is exactly `netKg` (gross − 1 kg tare), 100 units. */
const lotOf = (site: string, netKg: number, change: Record<string, unknown> = {}) => ({
  site,
  ticketNumber: `T-${Math.random().toString(36).slice(2, 9)}`,
  grossKg: netKg + 1,
  tareKg: 1,
  unitCount: 100,
  mix: [{ kind: "flooded", nominalVoltage: 12, count: 100 }],
  ...change,
});

const getLimits = async (key: string, siteId: string) => {
  const response = await limits.GET(apiRequest(`/api/v1/sites/${siteId}/limits`, { key }), params({ id: siteId }));
  return { status: response.status, body: await response.json() };
};
type TRuleJson = { ruleId: string; status: string; value: number; detail: string; source: string; caution: string; citation: string; forecastDate: string | null; margin: number };
const ruleOf = (body: { rules: TRuleJson[] }, id: string) => body.rules.find((r) => r.ruleId === id)!;

describe("GET /api/v1/sites/:id/limits", () => {
  // 40 CFR 273.9: a large quantity handler holds 5 000 kg or more at any time; our warning level is 80 % (4 000 kg).
  test.each([
    ["40 CFR 273.9, below the warning level", 3_999.99, "ok"],
    ["40 CFR 273.9, at the 80 % warning level", 4_000, "approaching"],
    ["40 CFR 273.9, a hair under 5 000 kg", 4_999.99, "approaching"],
    ["40 CFR 273.9, 5 000 kg or more", 5_000, "exceeded"],
  ])("%s: %d kg of batteries is %s", async (_source, netKg, status) => {
    const { site, key } = await yard();
    const created = await lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body: lotOf(site.id, netKg) }));
    expect(created.status).toBe(201);
    const { status: code, body } = await getLimits(key, site.id);
    expect(code).toBe(200);
    const rule = ruleOf(body, LQH);
    expect(rule.value).toBeCloseTo(netKg, 6);
    expect(rule.status).toBe(status);
    expect(rule.margin).toBeCloseTo(5_000 - netKg, 6);
    expect(rule.citation).toContain("40 CFR 273.9");
    expect(body.caution).toContain("authority having jurisdiction");
    expect(rule.caution).toContain("authority having jurisdiction");
    expect(body.site).toMatchObject({ id: site.id, totals: { unitCount: 100 } });
  });

  test("40 CFR 273.9: once 5 000 kg was reached in the year, the site stays exceeded after the amount falls", async () => {
    const { organisation, site, key } = await yard();
    const created = await (await lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body: lotOf(site.id, 5_000) }))).json();
    expect(ruleOf((await getLimits(key, site.id)).body, LQH).status).toBe("exceeded");
    // The lot leaves as a departure would take it (loads are another module): totals and ledger move down together.
    await db.$transaction(async (tx) => {
      const lot = await tx.lot.update({ where: { id: created.lot.id }, data: { state: "departed" } });
      const delta = { unitCount: lot.unitCount, batteryKg: lot.netKg, leadKg: lot.leadKg, electrolyteKg: lot.electrolyteKg, acidKg: lot.acidKg };
      await changeSiteLevel(tx, { siteId: site.id, delta: negate(delta), reason: "departure", refId: lot.id, at: new Date() });
    });
    const { body } = await getLimits(key, site.id);
    const rule = ruleOf(body, LQH);
    expect(rule.value).toBeCloseTo(0, 6);
    expect(rule.status).toBe("exceeded");
    expect(rule.detail).toContain(`holds until 31 December ${new Date().getUTCFullYear()}`);
    // A sibling site that never reached it is not affected.
    const second = await makeSite(db, organisation.id);
    expect(second.peakBatteryKg).toBe(0);
  });

  test("the forecast uses the net intake of the last 28 days only (one aggregate of the level ledger)", async () => {
    const { organisation, site, key } = await yard();
    const actor = systemActor(organisation.id, site.id, "admin");
    const now = new Date();
    await receiveLot(actor, { ...lotOf(site.id, 1_000), mixBasis: "count", mix: [{ kind: "flooded", nominalVoltage: 12, count: 100 }] }, { at: new Date(now.getTime() - 40 * DAY) });
    await receiveLot(actor, { ...lotOf(site.id, 560, { unitCount: 28, mix: [{ kind: "flooded", nominalVoltage: 12, count: 28 }] }), mixBasis: "count", mix: [{ kind: "flooded", nominalVoltage: 12, count: 28 }] }, { at: new Date(now.getTime() - 7 * DAY) });
    const { body } = await getLimits(key, site.id);
    const rule = ruleOf(body, LQH);
    expect(rule.value).toBeCloseTo(1_560, 6);
    // 560 kg over 28 days = 20 kg a day; (5 000 − 1 560) / 20 = 172 days from today.
    expect(rule.forecastDate?.slice(0, 10)).toBe(dateOfUtcDay(utcDay(new Date(body.asOf)) + 172).toISOString().slice(0, 10));
    expect(rule.detail).toContain("20.0 kg a day");
  });

  test("container deadlines (40 CFR 273.15(a)) and a leaking unit in a container that is not closed (40 CFR 273.13(a)(1))", async () => {
    const { site, key } = await yard();
    const old = await makeContainer(db, { siteId: site.id });
    await db.container.update({ where: { id: old.id }, data: { accumulationStart: new Date(Date.now() - 340 * DAY), unitCount: 1 } });
    const drum = await makeContainer(db, { siteId: site.id, isClosed: true });
    const intake = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: { site: site.id, kind: "flooded", nominalVoltage: 12, weightKg: 18, condition: "leaking", source: "fleet", containerId: drum.id } }));
    expect(intake.status).toBe(201);
    let { body } = await getLimits(key, site.id);
    expect(ruleOf(body, "us-uw-leaking-closed").status).toBe("ok");
    const oldRow = body.containers.find((c: { containerId: string }) => c.containerId === old.id);
    expect(oldRow).toMatchObject({ ageDays: 340, daysLeft: 25, status: "approaching", ruleId: "us-uw-one-year" });
    expect(ruleOf(body, "us-uw-one-year")).toMatchObject({ status: "approaching", value: 340 });

    // Someone records the drum as not closed after all: the rule and the container both say so.
    await db.container.update({ where: { id: drum.id }, data: { isClosed: false } });
    ({ body } = await getLimits(key, site.id));
    expect(ruleOf(body, "us-uw-leaking-closed").status).toBe("exceeded");
    expect(body.containers.find((c: { containerId: string }) => c.containerId === drum.id)).toMatchObject({ needsClosing: true });
    expect(body.status).toBe("exceeded");
  });

  test("403 at a site without a role, 404 for another organisation's site, 401 without a key", async () => {
    const { organisation, key } = await yard();
    const sibling = await makeSite(db, organisation.id);
    const other = await makeOrgWithSite(db);
    expect((await getLimits(key, sibling.id)).status).toBe(403);
    expect((await getLimits(key, other.site.id)).status).toBe(404);
    const anonymous = await limits.GET(apiRequest(`/api/v1/sites/${sibling.id}/limits`), params({ id: sibling.id }));
    expect(anonymous.status).toBe(401);
  });
});

describe("site rules: GET/POST /api/v1/sites/:id/rules", () => {
  const permitRule = { title: "Fire permit: 300 batteries on site", metric: "unit-count", threshold: 300, unit: "count", warningPct: 80, citation: "Invented test permit FP-1, condition 7" };

  test("an administrator adds a rule with its citation; it is evaluated with the rulebook's", async () => {
    const { organisation, site, key } = await yard();
    const { key: adminKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    const created = await rules.POST(apiRequest(`/api/v1/sites/${site.id}/rules`, { method: "POST", key: adminKey, body: permitRule }), params({ id: site.id }));
    expect(created.status).toBe(201);
    const { rule } = await created.json();
    expect(rule).toMatchObject({ siteId: site.id, metric: "unit-count", threshold: 300, citation: permitRule.citation, caution: "" });
    expect(await db.trailEvent.count({ where: { entityId: rule.id, action: "rule.added" } })).toBe(1);
    const listed = await rules.GET(apiRequest(`/api/v1/sites/${site.id}/rules`, { key }), params({ id: site.id }));
    expect((await listed.json()).rules).toHaveLength(1);

    await lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body: lotOf(site.id, 4_800, { unitCount: 240, mix: [{ kind: "flooded", count: 240 }] }) }));
    const mine = ruleOf((await getLimits(key, site.id)).body, rule.id);
    // 240 of 300 is exactly the 80 % warning level.
    expect(mine).toMatchObject({ source: "site", status: "approaching", value: 240, citation: permitRule.citation });
  });

  test.each([
    ["no citation", { citation: undefined }, "citation", "needs its source"],
    ["a blank citation", { citation: "  " }, "citation", "needs its source"],
    ["a mass rule in days", { metric: "battery-kg", unit: "days" }, "unit", "kg or lb"],
    ["a zero limit", { threshold: 0 }, "threshold", "more than 0"],
  ])("refuses %s with a 400 and writes nothing", async (_case, change, field, message) => {
    const { organisation, site } = await yard();
    const { key: adminKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    const response = await rules.POST(apiRequest(`/api/v1/sites/${site.id}/rules`, { method: "POST", key: adminKey, body: { ...permitRule, ...change } }), params({ id: site.id }));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([{ field, message: expect.stringContaining(message) }]));
    expect(await db.customRule.count({ where: { siteId: site.id } })).toBe(0);
    expect(await db.trailEvent.count({ where: { siteId: site.id } })).toBe(0);
  });

  test("403 for a yard manager adding one (setup.write is the administrator's), 404 for another organisation", async () => {
    const { site, key } = await yard();
    const other = await makeOrgWithSite(db);
    expect((await rules.POST(apiRequest(`/api/v1/sites/${site.id}/rules`, { method: "POST", key, body: permitRule }), params({ id: site.id }))).status).toBe(403);
    expect((await rules.GET(apiRequest(`/api/v1/sites/${other.site.id}/rules`, { key }), params({ id: other.site.id }))).status).toBe(404);
    expect(await db.customRule.count({ where: { siteId: site.id } })).toBe(0);
  });
});
