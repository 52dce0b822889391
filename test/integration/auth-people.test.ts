// Setup › people: adding a person with a temporary password, roles per site, and the rules around them
// (no raising one's own role, a site keeps an administrator, API keys cannot change people).
import { beforeAll, describe, expect, test } from "vitest";
import type { TDb } from "@/lib/db/client";
import type { TRole } from "@/lib/auth/permissions";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import { makePerson, sessionRequest, signIn, signInRequest } from "../security/sessions";

let db: TDb;
let people: typeof import("@/app/api/v1/people/route");
let person: typeof import("@/app/api/v1/people/[id]/route");
let memberships: typeof import("@/app/api/v1/people/[id]/memberships/route");
let units: typeof import("@/app/api/v1/units/route");

beforeAll(async () => {
  db = await testDb();
  people = await import("@/app/api/v1/people/route");
  person = await import("@/app/api/v1/people/[id]/route");
  memberships = await import("@/app/api/v1/people/[id]/memberships/route");
  units = await import("@/app/api/v1/units/route");
});

/** An organisation with two sites and a signed-in administrator of the first. */
async function orgWithAdmin({ adminAt = "first" }: { adminAt?: "first" | "both" } = {}) {
  const { organisation, site } = await makeOrgWithSite(db);
  const second = await makeSite(db, organisation.id);
  const ms: { siteId: string; role: TRole }[] = [{ siteId: site.id, role: "admin" }];
  if (adminAt === "both") ms.push({ siteId: second.id, role: "admin" });
  const admin = await makePerson(db, { organisationId: organisation.id, memberships: ms });
  return { organisation, site, second, admin, cookie: await signIn(admin) };
}

const newPerson = (siteId: string, role: string = "clerk") => ({
  email: `New.Person.${Math.random().toString(36).slice(2, 8)}@Test.Example`,
  name: "Ada Newcomer",
  password: "temporary-pass-1",
  memberships: [{ site: siteId, role }],
});

describe("POST /api/v1/people", () => {
  test("adds a person with a temporary password and a role; person, memberships and trail commit together", async () => {
    const { site, organisation, cookie, admin } = await orgWithAdmin();
    const body = newPerson(site.id);
    const response = await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body }));
    expect(response.status).toBe(201);
    const created = (await response.json()).person;
    expect(created).toMatchObject({ email: body.email.toLowerCase(), name: "Ada Newcomer", memberships: [{ siteId: site.id, role: "clerk" }] });

    const events = await db.trailEvent.findMany({ where: { entityId: created.id }, orderBy: { action: "asc" } });
    expect(events.map((e) => [e.action, e.siteId, e.actor])).toEqual([
      ["membership.added", site.id, `user:${admin.id}`],
      ["person.added", null, `user:${admin.id}`],
    ]);
    // Neither the password nor its hash is ever written to the trail.
    const account = await db.account.findFirstOrThrow({ where: { userId: created.id } });
    for (const e of events) {
      expect(e.after).not.toContain(body.password);
      expect(e.after).not.toContain(account.password!);
    }
    expect(account.password).not.toContain(body.password);
    expect((await db.user.findUniqueOrThrow({ where: { id: created.id } })).organisationId).toBe(organisation.id);

    // The new person can sign in with the temporary password (the email in any case).
    const signedIn = await signInRequest({ email: body.email.toUpperCase(), password: body.password });
    expect(signedIn.status).toBe(200);
  });

  test.each([
    ["a role outside ROLES", { memberships: [{ role: "owner" }] }, "memberships.0.role", "role must be one of: clerk, yard, compliance, admin"],
    ["a role in another case", { memberships: [{ role: "Admin" }] }, "memberships.0.role", "role must be one of"],
    ["no membership", { memberships: [] }, "memberships", "give at least one site and role"],
    ["a short password", { password: "short" }, "password", "at least 10 characters"],
    ["a bad email", { email: "not-an-email" }, "email", "valid email"],
    ["no name", { name: "  " }, "name", "name is required"],
  ] as [string, { memberships?: { role: string }[]; password?: string; email?: string; name?: string }, string, string][])("refuses %s with a field message and writes nothing", async (_label, change, field, message) => {
    const { site, cookie } = await orgWithAdmin();
    const base = newPerson(site.id);
    const body = { ...base, ...change, memberships: change.memberships?.map((m) => ({ site: site.id, ...m })) ?? base.memberships };
    const before = await db.user.count();
    const response = await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body }));
    expect(response.status).toBe(400);
    const issues = (await response.json()).error.issues;
    expect(issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await db.user.count()).toBe(before);
  });

  test("an email already in use is a conflict, and nothing else is written", async () => {
    const { site, cookie } = await orgWithAdmin();
    const body = newPerson(site.id);
    expect((await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body }))).status).toBe(201);
    const trailBefore = await db.trailEvent.count({ where: { siteId: site.id } });
    const again = await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body: { ...body, name: "Someone Else" } }));
    expect(again.status).toBe(409);
    expect((await again.json()).error.message).toBe("This email is already in use.");
    expect(await db.trailEvent.count({ where: { siteId: site.id } })).toBe(trailBefore);
  });

  test("a role at a site the administrator does not administer is refused (403), at another organisation's site 404", async () => {
    const { second, cookie } = await orgWithAdmin();
    const foreign = await makeOrgWithSite(db);
    expect((await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body: newPerson(second.id) }))).status).toBe(403);
    expect((await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body: newPerson(foreign.site.id) }))).status).toBe(404);
  });

  test("an API key cannot add people, whatever its role; a compliance officer may read but not add", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
    const viaKey = await people.POST(apiRequest("/api/v1/people", { method: "POST", key, body: newPerson(site.id) }));
    expect(viaKey.status).toBe(403);
    expect((await viaKey.json()).error.message).toMatch(/not with an API key/);

    const officer = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "compliance" }] });
    const cookie = await signIn(officer);
    expect((await people.POST(sessionRequest("/api/v1/people", { cookie, method: "POST", body: newPerson(site.id) }))).status).toBe(403);
    const listed = await people.GET(sessionRequest(`/api/v1/people?site=${site.id}`, { cookie }));
    expect(listed.status).toBe(200);
    expect((await listed.json()).people.map((p: { email: string }) => p.email)).toContain(officer.email);
  });
});

describe("GET /api/v1/people", () => {
  test("lists the organisation's people at sites whose setup the actor may read, and their roles there only", async () => {
    const { organisation, site, second } = await makeOrgWithSite(db).then(async (o) => ({ ...o, second: await makeSite(db, o.organisation.id) }));
    const officer = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "compliance" }] });
    const both = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }, { siteId: second.id, role: "yard" }] });
    const onlySecond = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: second.id, role: "clerk" }] });
    const foreign = await makeOrgWithSite(db);
    const stranger = await makePerson(db, { organisationId: foreign.organisation.id, memberships: [{ siteId: foreign.site.id, role: "admin" }] });
    const cookie = await signIn(officer);
    const list = (await (await people.GET(sessionRequest("/api/v1/people", { cookie }))).json()).people as { id: string; memberships: { siteId: string }[] }[];
    const ids = list.map((p) => p.id);
    expect(ids).toEqual(expect.arrayContaining([officer.id, both.id]));
    expect(ids).not.toContain(onlySecond.id);
    expect(ids).not.toContain(stranger.id);
    expect(list.find((p) => p.id === both.id)!.memberships.map((m) => m.siteId)).toEqual([site.id]);

    expect((await person.GET(sessionRequest(`/api/v1/people/${onlySecond.id}`, { cookie }), params({ id: onlySecond.id }))).status).toBe(403);
    expect((await person.GET(sessionRequest(`/api/v1/people/${stranger.id}`, { cookie }), params({ id: stranger.id }))).status).toBe(404);
    expect((await people.GET(sessionRequest(`/api/v1/people?site=${second.id}`, { cookie }))).status).toBe(403);
    expect((await people.GET(sessionRequest(`/api/v1/people?site=${foreign.site.id}`, { cookie }))).status).toBe(404);
  });

  test("a clerk does not open the people list (403), and no credentials is a 401", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const clerk = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }] });
    const cookie = await signIn(clerk);
    expect((await people.GET(sessionRequest("/api/v1/people", { cookie }))).status).toBe(403);
    expect((await people.GET(apiRequest("/api/v1/people"))).status).toBe(401);
  });
});

describe("PUT/DELETE /api/v1/people/:id/memberships", () => {
  const put = (cookie: string, userId: string, body: unknown) =>
    memberships.PUT(sessionRequest(`/api/v1/people/${userId}/memberships`, { cookie, method: "PUT", body }), params({ id: userId }));
  const remove = (cookie: string, userId: string, siteId: string) =>
    memberships.DELETE(sessionRequest(`/api/v1/people/${userId}/memberships?site=${siteId}`, { cookie, method: "DELETE" }), params({ id: userId }));

  test("changes a role with before and after in the trail; the same role again writes nothing; the new role applies at once", async () => {
    const { organisation, site, cookie, admin } = await orgWithAdmin();
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "yard" }] });
    const workerCookie = await signIn(worker);
    const intake = { site: site.id, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return" };
    expect((await units.POST(sessionRequest("/api/v1/units", { cookie: workerCookie, method: "POST", body: intake }))).status).toBe(201);

    const response = await put(cookie, worker.id, { site: site.id, role: "compliance" });
    expect(response.status).toBe(200);
    expect((await response.json()).person.memberships).toEqual([expect.objectContaining({ siteId: site.id, role: "compliance" })]);
    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: worker.id, action: "membership.changed" } });
    expect(event).toMatchObject({ siteId: site.id, actor: `user:${admin.id}` });
    expect(JSON.parse(event.before!)).toEqual({ email: worker.email, role: "yard" });
    expect(JSON.parse(event.after!)).toEqual({ email: worker.email, role: "compliance" });

    // Roles are read on every request: the same session can no longer log units.
    expect((await units.POST(sessionRequest("/api/v1/units", { cookie: workerCookie, method: "POST", body: intake }))).status).toBe(403);

    const count = await db.trailEvent.count({ where: { entityId: worker.id } });
    expect((await put(cookie, worker.id, { site: site.id, role: "compliance" })).status).toBe(200);
    expect(await db.trailEvent.count({ where: { entityId: worker.id } })).toBe(count);
  });

  test("adds a role at another site of the organisation for an existing person", async () => {
    const { organisation, site, second, cookie } = await orgWithAdmin({ adminAt: "both" });
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }] });
    const response = await put(cookie, worker.id, { site: second.id, role: "yard" });
    expect(response.status).toBe(200);
    expect((await db.membership.findMany({ where: { userId: worker.id }, orderBy: { role: "asc" } })).map((m) => m.role)).toEqual(["clerk", "yard"]);
    expect(await db.trailEvent.count({ where: { entityId: worker.id, action: "membership.added", siteId: second.id } })).toBe(1);
  });

  test.each(["superadmin", "ADMIN", "", "admin "])("refuses the role string %j and stores nothing", async (role) => {
    const { organisation, site, cookie } = await orgWithAdmin();
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }] });
    const response = await put(cookie, worker.id, { site: site.id, role });
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues[0].field).toBe("role");
    expect((await db.membership.findFirstOrThrow({ where: { userId: worker.id } })).role).toBe("clerk");
  });

  test("nobody changes their own role: not raising it at a site they administer, not at another site, not removing it", async () => {
    const { organisation, site, second, cookie, admin } = await orgWithAdmin();
    for (const [siteId, role] of [[site.id, "clerk"], [second.id, "admin"]] as const) {
      expect((await put(cookie, admin.id, { site: siteId, role })).status, `${role} at ${siteId}`).toBe(403);
    }
    // A compliance officer cannot raise themselves either (no setup.write anywhere).
    const officer = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "compliance" }] });
    const officerCookie = await signIn(officer);
    expect((await put(officerCookie, officer.id, { site: site.id, role: "admin" })).status).toBe(403);
    expect((await remove(cookie, admin.id, site.id)).status).toBe(403);
    expect(await db.membership.findMany({ where: { userId: { in: [admin.id, officer.id] } }, select: { role: true }, orderBy: { role: "asc" } })).toEqual([{ role: "admin" }, { role: "compliance" }]);
  });

  test("a site keeps an administrator: two administrators demoting each other at the same moment cannot both succeed", async () => {
    // Through the API the actor is always an administrator of the site and cannot change themselves, so the
    // last administrator can only be lost by such a race; the site row lock and the count after the change stop it.
    for (let round = 0; round < 3; round++) {
      const { organisation, site } = await makeOrgWithSite(db);
      const a = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "admin" }] });
      const b = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "admin" }] });
      const [cookieA, cookieB] = [await signIn(a), await signIn(b)];
      const statuses = (await Promise.all([put(cookieA, b.id, { site: site.id, role: "clerk" }), put(cookieB, a.id, { site: site.id, role: "clerk" })])).map((r) => r.status);
      expect(statuses.filter((s) => s === 200)).toHaveLength(1);
      expect(statuses.filter((s) => s !== 200)[0]).toBeOneOf([403, 409]);
      expect(await db.membership.count({ where: { siteId: site.id, role: "admin" } })).toBe(1);
    }
  });

  test("removes a role, with the trail; removing a role the person does not have is a 404", async () => {
    const { organisation, site, cookie } = await orgWithAdmin();
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }] });
    const response = await remove(cookie, worker.id, site.id);
    expect(response.status).toBe(200);
    expect(await db.membership.count({ where: { userId: worker.id } })).toBe(0);
    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: worker.id, action: "membership.removed" } });
    expect(JSON.parse(event.before!)).toEqual({ email: worker.email, role: "clerk" });
    expect((await remove(cookie, worker.id, site.id)).status).toBe(404);
  });
});

describe("PATCH /api/v1/people/:id", () => {
  const patch = (cookie: string, userId: string, body: unknown) => person.PATCH(sessionRequest(`/api/v1/people/${userId}`, { cookie, method: "PATCH", body }), params({ id: userId }));

  test("a new temporary password ends the person's sessions and replaces the old password; the trail says so without the password", async () => {
    const { organisation, site, cookie } = await orgWithAdmin();
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }] });
    const workerCookie = await signIn(worker);
    expect((await units.GET(sessionRequest(`/api/v1/units?site=${site.id}`, { cookie: workerCookie }))).status).toBe(200);
    const response = await patch(cookie, worker.id, { password: "a-brand-new-temp-9" });
    expect(response.status).toBe(200);
    expect((await units.GET(sessionRequest(`/api/v1/units?site=${site.id}`, { cookie: workerCookie }))).status).toBe(401);
    expect((await signInRequest({ email: worker.email, password: worker.password })).status).toBe(401);
    expect((await signInRequest({ email: worker.email, password: "a-brand-new-temp-9" })).status).toBe(200);
    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: worker.id, action: "person.password-reset" } });
    expect(JSON.parse(event.after!)).toEqual({ sessionsEnded: 1 });
  });

  test("renames, with before and after in the trail", async () => {
    const { organisation, site, cookie } = await orgWithAdmin();
    const worker = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }], name: "Old Name" });
    const response = await patch(cookie, worker.id, { name: "New Name" });
    expect(response.status).toBe(200);
    expect((await response.json()).person.name).toBe("New Name");
    const event = await db.trailEvent.findFirstOrThrow({ where: { entityId: worker.id, action: "person.renamed" } });
    expect([JSON.parse(event.before!), JSON.parse(event.after!)]).toEqual([{ name: "Old Name" }, { name: "New Name" }]);
  });

  test("an administrator of one site cannot reset the password of someone who also works at a site they do not administer", async () => {
    const { organisation, site, second, cookie } = await orgWithAdmin();
    const otherAdmin = await makePerson(db, { organisationId: organisation.id, memberships: [{ siteId: site.id, role: "clerk" }, { siteId: second.id, role: "admin" }] });
    const response = await patch(cookie, otherAdmin.id, { password: "take-over-attempt-1" });
    expect(response.status).toBe(403);
    expect((await signInRequest({ email: otherAdmin.email, password: otherAdmin.password })).status).toBe(200);
  });

  test("one's own name or password is not changed here (403); nothing to change is a 400", async () => {
    const { site, cookie, admin } = await orgWithAdmin();
    expect((await patch(cookie, admin.id, { password: "my-own-new-pass-1" })).status).toBe(403);
    expect((await patch(cookie, admin.id, { name: "Me" })).status).toBe(403);
    expect((await patch(cookie, admin.id, {})).status).toBe(400);
    void site;
  });
});
