// Setup › sites: GET/PATCH /api/v1/sites/:id — settings only, validated, with the changed fields in the trail.
import { beforeAll, describe, expect, test } from "vitest";
import type { TDb } from "@/lib/db/client";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";

let db: TDb;
let route: typeof import("@/app/api/v1/sites/[id]/route");

beforeAll(async () => {
  db = await testDb();
  route = await import("@/app/api/v1/sites/[id]/route");
});

const patch = (key: string, id: string, body: unknown) => route.PATCH(apiRequest(`/api/v1/sites/${id}`, { method: "PATCH", key, body }), params({ id }));

describe("site settings", () => {
  test("changes name, kind, address, jurisdiction, rulebook, unit system and the consumer-product exemption; the trail holds only what changed", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key, id: keyId } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    const body = { name: "Renamed store", kind: "yard", address: "1 New Road", jurisdiction: "us-or", rulebookId: "eu-adr", unitSystem: "lb", isConsumerExempt: true, regulatoryIds: "EPA ID WAD000000000" };
    const response = await patch(key, site.id, body);
    expect(response.status).toBe(200);
    expect((await response.json()).site).toEqual({ id: site.id, ...body, jurisdiction: "US-OR" });
    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: site.id, action: "site.updated" } });
    expect(event.actor).toBe(`key:${keyId}`);
    expect(JSON.parse(event.before!)).toEqual({ name: site.name, kind: "store", address: site.address, jurisdiction: "US", rulebookId: "us-federal", unitSystem: "kg", isConsumerExempt: false, regulatoryIds: "" });
    expect(JSON.parse(event.after!)).toEqual({ ...body, jurisdiction: "US-OR" });

    // The same values again change nothing and write nothing.
    expect((await patch(key, site.id, { unitSystem: "lb" })).status).toBe(200);
    expect(await db.trailEvent.count({ where: { entityId: site.id } })).toBe(1);
    const read = await route.GET(apiRequest(`/api/v1/sites/${site.id}`, { key }), params({ id: site.id }));
    expect((await read.json()).site.unitSystem).toBe("lb");
  });

  test.each([
    [{ unitSystem: "stone" }, "unitSystem", "kg or lb"],
    [{ kind: "warehouse" }, "kind", "store or yard"],
    [{ rulebookId: "mars" }, "rulebookId", "us-federal, eu-adr, custom"],
    [{ jurisdiction: "Washington" }, "jurisdiction", "country code"],
    [{ isConsumerExempt: "yes" }, "isConsumerExempt", "on (true) or off (false)"],
    [{ name: "" }, "name", "name is required"],
    [{ unitCount: 0 }, "(body)", "can be changed"],
    [{ batteryKg: 0, name: "x" }, "(body)", "can be changed"],
    [{}, "name", "at least one setting"],
  ])("refuses %o with a field message and changes nothing", async (body, field, message) => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    const response = await patch(key, site.id, body);
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await db.site.findUniqueOrThrow({ where: { id: site.id } })).toEqual(site);
  });

  test("compliance reads but cannot change; a clerk cannot read; another site of the organisation is 403, another organisation's 404", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const sibling = await makeSite(db, organisation.id);
    const foreign = await makeOrgWithSite(db);
    const compliance = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "compliance" })).key;
    const clerk = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" })).key;
    const admin = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" })).key;
    const get = (key: string, id: string) => route.GET(apiRequest(`/api/v1/sites/${id}`, { key }), params({ id }));
    expect((await get(compliance, site.id)).status).toBe(200);
    expect((await patch(compliance, site.id, { name: "No" })).status).toBe(403);
    expect((await get(clerk, site.id)).status).toBe(403);
    expect((await patch(admin, sibling.id, { name: "No" })).status).toBe(403);
    expect((await patch(admin, foreign.site.id, { name: "No" })).status).toBe(404);
    expect((await get(admin, foreign.site.id)).status).toBe(404);
    expect((await db.site.findUniqueOrThrow({ where: { id: site.id } })).name).toBe(site.name);
  });
});
