// Setup › API keys: one site, one role, shown once, stored as a hash, revocable, "last used" kept, and the
// trail names the key for what it did.
import { createHash } from "node:crypto";
import { beforeAll, describe, expect, test } from "vitest";
import type { TDb } from "@/lib/db/client";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import { makePerson, sessionRequest, signIn } from "../security/sessions";

let db: TDb;
let keys: typeof import("@/app/api/v1/api-keys/route");
let keyById: typeof import("@/app/api/v1/api-keys/[id]/route");
let units: typeof import("@/app/api/v1/units/route");

beforeAll(async () => {
  db = await testDb();
  keys = await import("@/app/api/v1/api-keys/route");
  keyById = await import("@/app/api/v1/api-keys/[id]/route");
  units = await import("@/app/api/v1/units/route");
});

async function adminSession() {
  const { organisation, site } = await makeOrgWithSite(db);
  const admin = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "admin" }] });
  return { organisation, site, admin, cookie: await signIn(admin) };
}

const create = (cookie: string, body: unknown) => keys.POST(sessionRequest("/api/v1/api-keys", { cookie, method: "POST", body }));
const revoke = (cookie: string, id: string) => keyById.DELETE(sessionRequest(`/api/v1/api-keys/${id}`, { cookie, method: "DELETE" }), params({ id }));
const intake = (site: string) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return" });

describe("API keys", () => {
  test("made for one site and role, shown once, stored only as its SHA-256; the list never shows it again", async () => {
    const { site, cookie, admin } = await adminSession();
    const response = await create(cookie, { site: site.id, role: "clerk", name: "Till 2" });
    expect(response.status).toBe(201);
    expect(response.headers.get("cache-control")).toBe("no-store");
    const { apiKey, key } = await response.json();
    expect(key).toMatch(/^ldg_[A-Za-z0-9_-]{43}$/);
    expect(apiKey).toMatchObject({ name: "Till 2", siteId: site.id, role: "clerk", prefix: key.slice(0, 12), lastUsedAt: null, revokedAt: null });

    const row = await db.apiKey.findUniqueOrThrow({ where: { id: apiKey.id } });
    expect(row.hash).toBe(createHash("sha256").update(key).digest("hex"));
    expect(Object.values(row).map(String).some((v) => v.includes(key))).toBe(false);

    const listed = await (await keys.GET(sessionRequest(`/api/v1/api-keys?site=${site.id}`, { cookie }))).json();
    const text = JSON.stringify(listed);
    expect(text).not.toContain(key);
    expect(text).not.toContain(row.hash);
    expect(listed.apiKeys[0]).toMatchObject({ id: apiKey.id, createdBy: expect.stringMatching(/^Person /) });

    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: apiKey.id } });
    expect(event).toMatchObject({ action: "api-key.created", siteId: site.id, actor: `user:${admin.id}` });
    expect(event.after).not.toContain(key);
  });

  test("the key acts with its one role at its one site, is named as the key in the trail, and shows when it was last used", async () => {
    const { site, organisation, cookie } = await adminSession();
    const sibling = await makeSite(db, organisation.id);
    const { apiKey, key } = await (await create(cookie, { site: site.id, role: "clerk", name: "Counter PC" })).json();
    const logged = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: intake(site.id) }));
    expect(logged.status).toBe(201);
    const unitId = (await logged.json()).unit.id;
    expect(await db.trailEvent.findFirstOrThrow({ where: { entityId: unitId } })).toMatchObject({ actor: `key:${apiKey.id}`, actorLabel: "API key “Counter PC”" });
    expect((await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: intake(sibling.id) }))).status).toBe(403);
    // A clerk key cannot read the keys or the setup.
    expect((await keys.GET(apiRequest(`/api/v1/api-keys?site=${site.id}`, { key }))).status).toBe(403);
    expect((await db.apiKey.findUniqueOrThrow({ where: { id: apiKey.id } })).lastUsedAt).toBeInstanceOf(Date);
  });

  test("a revoked key is refused at once (401); revoking again is a conflict; the record and its trail stay", async () => {
    const { site, cookie } = await adminSession();
    const { apiKey, key } = await (await create(cookie, { site: site.id, role: "yard", name: "Scale PC" })).json();
    expect((await units.GET(apiRequest(`/api/v1/units?site=${site.id}`, { key }))).status).toBe(200);
    const response = await revoke(cookie, apiKey.id);
    expect(response.status).toBe(200);
    expect((await response.json()).apiKey.revokedAt).toEqual(expect.any(String));
    expect((await units.GET(apiRequest(`/api/v1/units?site=${site.id}`, { key }))).status).toBe(401);
    expect((await revoke(cookie, apiKey.id)).status).toBe(409);
    expect((await db.trailEvent.findMany({ where: { entityId: apiKey.id } })).map((e) => e.action).sort()).toEqual(["api-key.created", "api-key.revoked"]);
  });

  test.each([
    [{ role: "owner" }, "role", "role must be one of"],
    [{ role: undefined }, "role", "role must be one of"],
    [{ name: "" }, "name", "give the key a name"],
    [{ site: "" }, "site", "site is required"],
  ])("refuses %o with a field message", async (change, field, message) => {
    const { site, cookie } = await adminSession();
    const before = await db.apiKey.count({ where: { siteId: site.id } });
    const response = await create(cookie, { site: site.id, role: "clerk", name: "Till", ...change });
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await db.apiKey.count({ where: { siteId: site.id } })).toBe(before);
  });

  test("only a signed-in administrator of the key's site makes or revokes keys: not a key, not a compliance officer, not another organisation", async () => {
    const { organisation, site, cookie } = await adminSession();
    const { key: adminKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    expect((await keys.POST(apiRequest("/api/v1/api-keys", { method: "POST", key: adminKey, body: { site: site.id, role: "admin", name: "copy" } }))).status).toBe(403);
    const target = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    expect((await keyById.DELETE(apiRequest(`/api/v1/api-keys/${target.id}`, { method: "DELETE", key: adminKey }), params({ id: target.id }))).status).toBe(403);
    // A key may list the keys of its site when its role reads the setup.
    expect((await keys.GET(apiRequest("/api/v1/api-keys", { key: adminKey }))).status).toBe(200);

    const officer = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "compliance" }] });
    const officerCookie = await signIn(officer);
    expect((await create(officerCookie, { site: site.id, role: "clerk", name: "x" })).status).toBe(403);
    expect((await revoke(officerCookie, target.id)).status).toBe(403);
    expect((await keys.GET(sessionRequest("/api/v1/api-keys", { cookie: officerCookie }))).status).toBe(200);

    const foreign = await makeOrgWithSite(db);
    const foreignKey = await makeKey(db, { organisationId: foreign.organisation.id, siteId: foreign.site.id, role: "clerk" });
    expect((await revoke(cookie, foreignKey.id)).status).toBe(404);
    expect((await create(cookie, { site: foreign.site.id, role: "clerk", name: "x" })).status).toBe(404);
    expect((await db.apiKey.findUniqueOrThrow({ where: { id: foreignKey.id } })).revokedAt).toBeNull();
  });
});
