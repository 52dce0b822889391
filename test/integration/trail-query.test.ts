// GET /api/v1/trail: scope (sites with trail.read; organisation-level events for administrators only),
// filters, newest first, paging, and the CSV export with the same filters.
import Papa from "papaparse";
import { beforeAll, describe, expect, test } from "vitest";
import type { TActor, TRole } from "@/lib/auth/permissions";
import type { TDb } from "@/lib/db/client";
import { writeTrail } from "@/lib/db/trail";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite } from "../helpers/factories";

let db: TDb;
let trail: typeof import("@/app/api/v1/trail/route");

beforeAll(async () => {
  db = await testDb();
  trail = await import("@/app/api/v1/trail/route");
});

const someone = (organisationId: string, id: string, label: string): TActor => ({ kind: "user", id, ref: `user:${id}`, label, organisationId, roles: new Map<string, TRole>() });

/** An organisation with two sites, events at both and at organisation level, and keys per role at the first site. */
async function world() {
  const { organisation, site } = await makeOrgWithSite(db);
  const second = await makeSite(db, organisation.id);
  const ana = someone(organisation.id, "ana", "Ana Field");
  const bo = someone(organisation.id, "bo", "Bo Weigh");
  const at = (day: string, time = "12:00:00") => new Date(`${day}T${time}Z`);
  const events: [TActor, string | null, string, string, string, Date, unknown?, unknown?][] = [
    [ana, site.id, "unit.received", "unit", "u1", at("2026-03-01", "08:00:00"), undefined, { batteryKg: 18 }],
    [bo, site.id, "container.sealed", "container", "c1", at("2026-03-02"), { state: "open" }, { state: "sealed" }],
    [ana, site.id, "unit.received", "unit", "u2", at("2026-03-03", "23:59:59"), undefined, { batteryKg: 20 }],
    [bo, second.id, "unit.received", "unit", "u3", at("2026-03-02", "14:00:00"), undefined, { batteryKg: 11 }],
    [ana, null, "person.added", "person", "p1", at("2026-03-02", "13:00:00"), undefined, { email: "x@test.example" }],
  ];
  await db.$transaction(async (tx) => {
    for (const [actor, siteId, action, entity, entityId, when, before, after] of events) {
      await writeTrail(tx, actor, { siteId, action, entity, entityId, at: when, before, after });
    }
  });
  const key = async (role: TRole) => (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role })).key;
  return { organisation, site, second, key };
}

async function get(key: string, query: string) {
  const response = await trail.GET(apiRequest(`/api/v1/trail?${query}`, { key }));
  return { status: response.status, body: await response.json() };
}
const ids = (body: { events: { entityId: string }[] }) => body.events.map((e) => e.entityId);

describe("trail scope", () => {
  test("a compliance officer sees the events of their site only, newest first; no organisation-level events", async () => {
    const { key } = await world();
    const { status, body } = await get(await key("compliance"), "");
    expect(status).toBe(200);
    expect(ids(body)).toEqual(["u2", "c1", "u1"]);
  });

  test("an administrator also sees organisation-level events", async () => {
    const { key } = await world();
    const admin = await key("admin");
    expect(ids((await get(admin, "")).body)).toEqual(["u2", "p1", "c1", "u1"]);
    expect(ids((await get(admin, "site=organisation")).body)).toEqual(["p1"]);
    expect((await get(await key("compliance"), "site=organisation")).status).toBe(403);
  });

  test("clerk and yard roles do not open the trail (403); no credentials is 401; a sibling site 403, a foreign one 404", async () => {
    const { key, second } = await world();
    expect((await get(await key("clerk"), "")).status).toBe(403);
    expect((await get(await key("yard"), "")).status).toBe(403);
    expect((await trail.GET(apiRequest("/api/v1/trail"))).status).toBe(401);
    const admin = await key("admin");
    expect((await get(admin, `site=${second.id}`)).status).toBe(403);
    const foreign = await world();
    expect((await get(admin, `site=${foreign.site.id}`)).status).toBe(404);
    // And an unfiltered read never includes another organisation's events.
    expect(ids((await get(admin, "")).body)).toEqual(["u2", "p1", "c1", "u1"]);
  });
});

describe("trail filters", () => {
  test.each([
    ["actor=user:ana", ["u2", "u1"]],
    ["action=container.sealed", ["c1"]],
    ["entity=unit", ["u2", "u1"]],
    ["entity=unit&entityId=u1", ["u1"]],
    ["from=2026-03-02&to=2026-03-02", ["c1"]],
    ["from=2026-03-03", ["u2"]],
    ["to=2026-03-01", ["u1"]],
    ["from=2026-03-01T09:00:00Z&to=2026-03-03T23:59:59Z", ["u2", "c1"]],
    ["from=&to=&actor=&action=", ["u2", "c1", "u1"]],
    ["action=no.such", []],
  ])("%s", async (query, expected) => {
    const { key, site } = await world();
    const { status, body } = await get(await key("compliance"), `site=${site.id}&${query}`);
    expect(status).toBe(200);
    expect(ids(body)).toEqual(expected);
  });

  test.each([
    ["from=yesterday", "from"],
    ["from=2026-03-04&to=2026-03-01", "to"],
    ["limit=0", "limit"],
    ["limit=201", "limit"],
    ["format=xml", "format"],
    ["cursor=bm90LWEtY3Vyc29y", "cursor"],
  ])("refuses %s (400, field %s)", async (query, field) => {
    const { key } = await world();
    const { status, body } = await get(await key("compliance"), query);
    expect(status).toBe(400);
    expect(body.error.issues.map((i: { field: string }) => i.field)).toContain(field);
  });

  test("before and after come back as values, not as JSON text", async () => {
    const { key } = await world();
    const event = (await get(await key("compliance"), "action=container.sealed")).body.events[0];
    expect(event).toMatchObject({ before: { state: "open" }, after: { state: "sealed" }, actorLabel: "Bo Weigh", siteName: expect.stringMatching(/^Test site/) });
  });
});

describe("trail paging", () => {
  test("pages newest first without gaps or repeats, even when many events share one instant", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const actor = someone(organisation.id, "pager", "Pager");
    const same = new Date("2026-05-05T10:00:00Z");
    await db.$transaction(async (tx) => {
      for (let i = 0; i < 23; i++) await writeTrail(tx, actor, { siteId: site.id, action: "unit.received", entity: "unit", entityId: `e${i}`, at: i % 3 === 0 ? new Date(same.getTime() + i * 1000) : same });
    });
    const key = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "compliance" })).key;
    const seen: string[] = [];
    let cursor: string | null = "";
    let pages = 0;
    while (cursor !== null) {
      const { body } = await get(key, `limit=5${cursor ? `&cursor=${cursor}` : ""}`);
      seen.push(...ids(body));
      cursor = body.nextCursor;
      pages++;
    }
    expect(pages).toBe(5);
    expect(new Set(seen).size).toBe(23);
    expect(seen).toHaveLength(23);
    const all = await db.trailEvent.findMany({ where: { siteId: site.id }, orderBy: [{ at: "desc" }, { id: "desc" }] });
    expect(seen).toEqual(all.map((e) => e.entityId));
  });
});

describe("trail CSV export", () => {
  test("the same filters as the screen, RFC 4180 quoting, formulas neutralised, a header once", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const tricky = someone(organisation.id, "t", '=HYPERLINK("http://x.example"), "quoted"');
    await db.$transaction(async (tx) => {
      await writeTrail(tx, tricky, { siteId: site.id, action: "site.updated", entity: "site", entityId: site.id, at: new Date("2026-04-01T00:00:00Z"), before: { address: "1 Road,\nLine 2" }, after: { address: 'The "New" Road' } });
      await writeTrail(tx, tricky, { siteId: site.id, action: "unit.received", entity: "unit", entityId: "plain", at: new Date("2026-04-02T00:00:00Z") });
    });
    const key = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "compliance" })).key;
    const response = await trail.GET(apiRequest("/api/v1/trail?format=csv&action=site.updated", { key }));
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    expect(response.headers.get("content-disposition")).toMatch(/^attachment; filename="trail-\d{4}-\d{2}-\d{2}\.csv"$/);
    const text = await response.text();
    expect(text.endsWith("\r\n")).toBe(true);
    const rows = Papa.parse<string[]>(text.trimEnd(), { newline: "\r\n" }).data;
    expect(rows[0]).toEqual(["at (UTC)", "site", "site id", "by", "by ref", "action", "record", "record id", "before", "after"]);
    expect(rows).toHaveLength(2);
    expect(rows[1]).toEqual([
      "2026-04-01T00:00:00.000Z",
      site.name,
      site.id,
      `'=HYPERLINK("http://x.example"), "quoted"`,
      "user:t",
      "site.updated",
      "site",
      site.id,
      JSON.stringify({ address: "1 Road,\nLine 2" }),
      JSON.stringify({ address: 'The "New" Road' }),
    ]);
    // The raw text doubles the quotes inside a quoted field.
    expect(text).toContain(`"'=HYPERLINK(""http://x.example""), ""quoted"""`);
  });

  test("streams every matching event across pages (header once), and refuses what the JSON refuses", async () => {
    const { organisation, site } = await makeOrgWithSite(db);
    const actor = someone(organisation.id, "bulk", "Bulk");
    const start = Date.parse("2026-01-01T00:00:00Z");
    await db.$transaction(async (tx) => {
      for (let i = 0; i < 1203; i++) await writeTrail(tx, actor, { siteId: site.id, action: "unit.received", entity: "unit", entityId: `b${i}`, at: new Date(start + i * 60_000) });
    });
    const compliance = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "compliance" })).key;
    const text = await (await trail.GET(apiRequest("/api/v1/trail?format=csv", { key: compliance }))).text();
    const rows = Papa.parse<string[]>(text.trimEnd(), { newline: "\r\n" }).data;
    expect(rows).toHaveLength(1 + 1203);
    expect(rows.filter((r) => r[0] === "at (UTC)")).toHaveLength(1);
    expect(rows[1]![7]).toBe("b1202");
    expect(rows.at(-1)![7]).toBe("b0");

    const clerk = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" })).key;
    expect((await trail.GET(apiRequest("/api/v1/trail?format=csv", { key: clerk }))).status).toBe(403);
    const foreign = await makeOrgWithSite(db);
    expect((await trail.GET(apiRequest(`/api/v1/trail?format=csv&site=${foreign.site.id}`, { key: compliance }))).status).toBe(404);
  });
});
