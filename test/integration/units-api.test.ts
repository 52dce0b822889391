import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";

let db: TDb;
let units: typeof import("@/app/api/v1/units/route");
let totals: typeof import("@/app/api/v1/sites/[id]/totals/route");

beforeAll(async () => {
  db = await testDb();
  units = await import("@/app/api/v1/units/route");
  totals = await import("@/app/api/v1/sites/[id]/totals/route");
});

const flooded60 = (site: string) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return" });

async function counts(siteId: string) {
  const [unitCount, trail, levels, site] = await Promise.all([
    db.unit.count({ where: { siteId } }),
    db.trailEvent.count({ where: { siteId } }),
    db.levelChange.count({ where: { siteId } }),
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
  ]);
  return { unitCount, trail, levels, batteryKg: site.batteryKg, siteUnits: site.unitCount };
}

describe("POST /api/v1/units", () => {
  test("stores the unit with its composition, moves the totals by exactly that unit and writes a trail event", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key, id: keyId } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const response = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: flooded60(site.id) }));
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.unit.method).toBe("weighed");
    expect(body.unit.batteryKg).toBeCloseTo(18, 6);

    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect(after.unitCount).toBe(1);
    expect(after.batteryKg).toBeCloseTo(body.unit.batteryKg, 9);
    expect(after.leadKg).toBeCloseTo(body.unit.leadKg, 9);
    expect(after.electrolyteKg).toBeCloseTo(body.unit.electrolyteKg, 9);
    expect(after.acidKg).toBeCloseTo(body.unit.acidKg, 9);

    // The row as the database holds it reads back the same through Prisma (the intake writes it in plain SQL).
    const stored = await db.unit.findUniqueOrThrow({ where: { id: body.unit.id } });
    expect(stored.receivedAt.toISOString()).toBe(body.unit.receivedAt);
    expect(stored).toMatchObject({ siteId: site.id, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, state: "received", containerId: null });
    expect(stored.leadKg).toBeCloseTo(body.unit.leadKg, 12);
    const level = await db.levelChange.findFirstOrThrow({ where: { siteId: site.id } });
    expect(level).toMatchObject({ reason: "intake", refId: body.unit.id, unitCount: 1 });
    expect(level.at.toISOString()).toBe(body.unit.receivedAt);

    const events = await db.trailEvent.findMany({ where: { siteId: site.id } });
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ action: "unit.received", entity: "unit", entityId: body.unit.id, actor: `key:${keyId}` });
    expect(JSON.parse(events[0]!.after!).batteryKg).toBeCloseTo(18, 6);
  });

  test.each([
    [{ nominalVoltage: 13 }, "nominalVoltage", "multiple of 2 V"],
    [{ nominalVoltage: 120 }, "nominalVoltage", "between 2 and 96 V"],
    [{ capacityAh: 0 }, "capacityAh", "between 1 and 5 000 Ah"],
    [{ weightKg: 0.2 }, "weightKg", "between 0.5 and 3 000 kg"],
    [{ kind: "lithium" }, "kind", "kind must be one of"],
    [{ condition: "wet" }, "condition", "intact, leaking, cracked or bulged"],
    [{ condition: "leaking" }, "containerId", "closed container"],
  ])("refuses %o with a field message and writes nothing", async (change, field, message) => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const before = await counts(site.id);
    const response = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: { ...flooded60(site.id), ...change } }));
    expect(response.status).toBe(400);
    const body = await response.json();
    expect(body.error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await counts(site.id)).toEqual(before);
  });

  test("a body that is not JSON is a 400", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const response = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: "{not json" }));
    expect(response.status).toBe(400);
  });

  test("401 without credentials, 404 for an unknown or foreign site, 403 for a site without a role there", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const other = await makeOrgWithSite(db);
    const sibling = await makeSite(db, organisation.id);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const post = (body: unknown, k?: string) => units.POST(apiRequest("/api/v1/units", { method: "POST", key: k, body }));
    expect((await post(flooded60(site.id))).status).toBe(401);
    expect((await post(flooded60(site.id), "ldg_not-a-real-key")).status).toBe(401);
    expect((await post(flooded60("no-such-site"), key)).status).toBe(404);
    expect((await post(flooded60(other.site.id), key)).status).toBe(404);
    expect((await post(flooded60(sibling.id), key)).status).toBe(403);
    expect(await counts(other.site.id)).toMatchObject({ unitCount: 0, trail: 0 });
  });

  test("a retry with the same Idempotency-Key returns the first response and writes nothing new", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const send = () => units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: flooded60(site.id), headers: { "idempotency-key": "till-7-sale-0042" } }));
    const first = await send();
    const firstBody = await first.json();
    const [second, third] = await Promise.all([send(), send()]);
    expect(second.status).toBe(201);
    expect(third.status).toBe(201);
    // The replay is the first response itself, site totals included (on PostgreSQL the stored copy is
    // completed in SQL, so this also checks that it reads back the same).
    expect(await second.json()).toEqual(firstBody);
    expect((await third.json()).unit.id).toBe(firstBody.unit.id);
    expect(firstBody.siteTotals).toMatchObject({ unitCount: 1 });
    expect(second.headers.get("idempotent-replayed")).toBe("true");
    expect(await counts(site.id)).toMatchObject({ unitCount: 1, siteUnits: 1, trail: 1, levels: 1 });
  });

  test("a leaking unit goes straight into a closed container, which starts its accumulation date", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const openPallet = await makeContainer(db, { siteId: site.id });
    const drum = await makeContainer(db, { siteId: site.id, isClosed: true });
    const leaking = (containerId: string) => ({ ...flooded60(site.id), condition: "leaking", containerId });
    const refused = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: leaking(openPallet.id) }));
    expect(refused.status).toBe(400);
    expect((await refused.json()).error.issues[0].field).toBe("containerId");
    const accepted = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: leaking(drum.id) }));
    expect(accepted.status).toBe(201);
    const unit = (await accepted.json()).unit;
    expect(unit.state).toBe("stowed");
    const after = await db.container.findUniqueOrThrow({ where: { id: drum.id } });
    expect(after.unitCount).toBe(1);
    expect(after.batteryKg).toBeCloseTo(unit.batteryKg, 9);
    expect(after.accumulationStart?.toISOString()).toBe(unit.receivedAt);
  });

  test("weight in lb is converted at 0.45359237 kg/lb (exact by definition)", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const { weightKg: _drop, ...rest } = flooded60(site.id);
    const response = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: { ...rest, weightLb: 40 } }));
    expect(response.status).toBe(201);
    expect((await response.json()).unit.weightKg).toBeCloseTo(40 * 0.45359237, 9);
  });
});

describe("GET /api/v1/units and totals", () => {
  test("lists a site's units within a date range and reports its totals", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    for (let i = 0; i < 3; i++) await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: flooded60(site.id) }));
    const listed = await units.GET(apiRequest(`/api/v1/units?site=${site.id}&from=2000-01-01`, { key }));
    expect(listed.status).toBe(200);
    expect((await listed.json()).units).toHaveLength(3);
    const none = await units.GET(apiRequest(`/api/v1/units?site=${site.id}&to=2000-01-01`, { key }));
    expect((await none.json()).units).toHaveLength(0);
    const bad = await units.GET(apiRequest(`/api/v1/units?site=${site.id}&from=yesterday`, { key }));
    expect(bad.status).toBe(400);

    const response = await totals.GET(apiRequest(`/api/v1/sites/${site.id}/totals`, { key }), params({ id: site.id }));
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body.totals.unitCount).toBe(3);
    expect(body.totals.batteryKg).toBeCloseTo(54, 6);
    const foreign = await makeOrgWithSite(db);
    expect((await totals.GET(apiRequest(`/api/v1/sites/${foreign.site.id}/totals`, { key }), params({ id: foreign.site.id }))).status).toBe(404);
  });
});

describe("GET /api/v1/openapi.json", () => {
  test("is generated from the zod schemas", async () => {
    const { GET } = await import("@/app/api/v1/openapi.json/route");
    const doc = await GET().json();
    expect(doc.openapi).toBe("3.1.0");
    expect(Object.keys(doc.paths)).toEqual(expect.arrayContaining(["/api/v1/units", "/api/v1/sites/{id}/totals"]));
    const intake = doc.components.schemas.UnitIntake;
    expect(intake.properties.kind.enum).toContain("flooded");
    expect(intake.properties.nominalVoltage.maximum).toBe(96);
    expect(intake.required).toEqual(expect.arrayContaining(["site", "kind", "nominalVoltage", "condition", "source"]));
  });
});
