// Every API route × every role × (own site, another site of the same organisation, another organisation's
// site): the status each cell must answer. Requests are made with an API key per role at the own site (and,
// for the routes that only a signed-in person may use, with a session per role too), straight into the
// handlers. The route files are discovered under app/api/v1: a route or method missing from TABLE fails the
// run, so a new route cannot land without saying who may call it.
//
// Expected roles are written out here, from the role design (lib/auth/permissions.ts GRANTS: clerk logs
// units and deposits at the counter; yard works the yard; compliance reads everything, plans loads and issues
// papers; admin does all), not computed from can(), so the table is a second statement of the rules.
import { randomUUID } from "node:crypto";
import { readdirSync } from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import type { TActor, TRole } from "@/lib/auth/permissions";
import type { TDb } from "@/lib/db/client";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite } from "../helpers/factories";
import { makeSealedContainer } from "./loads-fixtures";
import { makePerson, signIn } from "../security/sessions";

const ROOT = path.resolve(import.meta.dirname, "../..");
const API_DIR = path.join(ROOT, "app/api/v1");
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;
type TMethod = (typeof METHODS)[number];
const ROLES: readonly TRole[] = ["clerk", "yard", "compliance", "admin"];
type TTarget = "own" | "sibling" | "foreign";

const ALL = ROLES;
const CLERK_YARD_ADMIN: TRole[] = ["clerk", "yard", "admin"];
const CLERK_ADMIN: TRole[] = ["clerk", "admin"];
const YARD_ADMIN: TRole[] = ["yard", "admin"];
const READERS: TRole[] = ["yard", "compliance", "admin"];
const COMPLIANCE_ADMIN: TRole[] = ["compliance", "admin"];
const ADMIN: TRole[] = ["admin"];

/** A statuses set that means "authorised and handled": the body or the record's state may still be refused. */
const OK = [200, 201];
const OK_OR_INVALID = [200, 201, 400];
const OK_OR_STATE = [200, 201, 400, 409];

type TWorld = {
  orgId: string;
  sites: Record<TTarget, string>;
  orgOf: Record<TTarget, string>;
  facility: { own: string; foreign: string };
  carrier: { own: string; foreign: string };
  keys: Record<TRole, string>;
  cookies: Record<TRole, string>;
};
type TCell = { w: TWorld; target: TTarget; siteId: string; orgId: string };
type TReq = { path: string; params?: Record<string, string>; body?: unknown; contentType?: string };
type TCase = {
  roles: readonly TRole[];
  ok: readonly number[];
  /**
   * site (default): the request names a site or a record at one — own/sibling/foreign.
   * org: an organisation-level record (facilities, carriers): own organisation or a foreign one; no sibling.
   * org-list: organisation-level list or create: own organisation only.
   * any-actor: any signed-in actor or key; public: no credentials needed; off: answers 404 to everyone.
   */
  scope?: "site" | "org" | "org-list" | "any-actor" | "public" | "off";
  /** Only a signed-in person may: every API key is refused (403) whatever its role. */
  personOnly?: boolean;
  request: (c: TCell) => Promise<TReq> | TReq;
};

let db: TDb;

const uid = () => randomUUID().slice(0, 8);
const system = (c: TCell): TActor => ({ kind: "system", id: "matrix", ref: "system:matrix", label: "Matrix fixture", organisationId: c.orgId, roles: new Map([[c.siteId, "admin"]]) });
const intake = (site: string, extra: Record<string, unknown> = {}) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return", ...extra });
const facilityOf = (c: TCell) => (c.target === "foreign" ? c.w.facility.foreign : c.w.facility.own);

async function container(c: TCell, { inBay = false } = {}) {
  const bayId = inBay ? (await db.bay.create({ data: { siteId: c.siteId, name: `Bay ${uid()}` } })).id : null;
  return db.container.create({ data: { siteId: c.siteId, labelNumber: `M-${uid()}`, kind: "pallet", bayId } });
}
async function receivedUnit(c: TCell) {
  const { recordIntake } = await import("@/lib/db/units");
  const { ZUnitIntake } = await import("@/lib/intake/schema");
  const result = await recordIntake(system(c), ZUnitIntake.parse(intake(c.siteId)));
  return (result.body as { unit: { id: string } }).unit.id;
}
async function sealed(c: TCell) {
  return makeSealedContainer(db, { siteId: c.siteId, units: [{ batteryKg: 18 }, { batteryKg: 20 }] });
}
async function load(c: TCell, { withContainer = false } = {}) {
  const row = await db.load.create({ data: { siteId: c.siteId, facilityId: facilityOf(c), reference: `LD-M-${uid()}` } });
  let containerId: string | undefined;
  if (withContainer) {
    const { addContainers } = await import("@/lib/db/loads");
    containerId = (await sealed(c)).id;
    await addContainers(system(c), row.id, { containerIds: [containerId] });
  }
  return { id: row.id, containerId };
}
async function documentAt(c: TCell) {
  const { issueReceiptForm } = await import("@/lib/db/papers");
  const { id } = await load(c, { withContainer: true });
  return (await issueReceiptForm(system(c), id)).document.id;
}
async function sale(c: TCell) {
  const saleRef = `S-${uid()}`;
  await db.sale.create({ data: { siteId: c.siteId, saleRef, soldAt: new Date(Date.now() - 3 * 86_400_000), product: "Starter 12 V", quantity: 1, depositCents: 1500 } });
  return saleRef;
}
async function member(c: TCell, role: TRole = "clerk") {
  return makePerson(db, { organisationId: c.orgId, memberships: [{ siteId: c.siteId, role }] });
}
const siteQuery = (pathname: string) => (c: TCell): TReq => ({ path: `${pathname}?site=${c.siteId}` });
const siteParam = (suffix: string) => (c: TCell): TReq => ({ path: `/api/v1/sites/${c.siteId}${suffix}`, params: { id: c.siteId } });

const TABLE: Record<string, Partial<Record<TMethod, TCase>>> = {
  "units/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/units") },
    POST: { roles: CLERK_YARD_ADMIN, ok: [201], request: (c) => ({ path: "/api/v1/units", body: intake(c.siteId) }) },
  },
  "sites/[id]/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: siteParam("") },
    PATCH: { roles: ADMIN, ok: OK, request: (c) => ({ ...siteParam("")(c), body: { address: `${uid()} Matrix Road` } }) },
  },
  "sites/[id]/totals/route.ts": { GET: { roles: ALL, ok: OK, request: siteParam("/totals") } },
  "sites/[id]/limits/route.ts": { GET: { roles: ALL, ok: OK, request: siteParam("/limits") } },
  "sites/[id]/rules/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteParam("/rules") },
    POST: {
      roles: ADMIN,
      ok: [201],
      request: (c) => ({ ...siteParam("/rules")(c), body: { title: "Fire code limit", metric: "battery-kg", threshold: 4000, unit: "kg", citation: "Local fire permit 12 (matrix test)" } }),
    },
  },
  "sites/[id]/annual/route.ts": { GET: { roles: READERS, ok: OK, request: (c) => ({ path: `/api/v1/sites/${c.siteId}/annual?year=2026`, params: { id: c.siteId } }) } },
  "bays/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/bays") },
    POST: { roles: YARD_ADMIN, ok: [201], request: (c) => ({ path: "/api/v1/bays", body: { site: c.siteId, name: `Bay ${uid()}` } }) },
  },
  "containers/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/containers") },
    POST: { roles: YARD_ADMIN, ok: [201], request: (c) => ({ path: "/api/v1/containers", body: { site: c.siteId, kind: "pallet" } }) },
  },
  "containers/[id]/route.ts": {
    GET: { roles: ALL, ok: OK, request: async (c) => { const { id } = await container(c); return { path: `/api/v1/containers/${id}`, params: { id } }; } },
    PATCH: { roles: YARD_ADMIN, ok: OK, request: async (c) => { const { id } = await container(c, { inBay: true }); return { path: `/api/v1/containers/${id}`, params: { id }, body: { bayId: null } }; } },
  },
  "containers/[id]/units/route.ts": {
    POST: {
      roles: YARD_ADMIN,
      ok: OK,
      request: async (c) => {
        const { id } = await container(c);
        const unitId = c.target === "own" ? await receivedUnit(c) : `unit-${uid()}`;
        return { path: `/api/v1/containers/${id}/units`, params: { id }, body: { unitIds: [unitId] } };
      },
    },
  },
  "containers/[id]/label.pdf/route.ts": {
    GET: { roles: ALL, ok: OK, request: async (c) => { const { id } = await container(c); return { path: `/api/v1/containers/${id}/label.pdf`, params: { id } }; } },
  },
  "lots/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/lots") },
    POST: {
      roles: YARD_ADMIN,
      ok: [201],
      request: (c) => ({ path: "/api/v1/lots", body: { site: c.siteId, ticketNumber: `T-${uid()}`, grossKg: 1025, tareKg: 25, unitCount: 50, mix: [{ kind: "flooded", nominalVoltage: 12, count: 50 }] } }),
    },
  },
  "loads/route.ts": {
    GET: { roles: READERS, ok: OK, request: siteQuery("/api/v1/loads") },
    POST: { roles: COMPLIANCE_ADMIN, ok: [201], request: (c) => ({ path: "/api/v1/loads", body: { site: c.siteId, facilityId: facilityOf(c) } }) },
  },
  "loads/[id]/route.ts": {
    GET: { roles: READERS, ok: OK, request: async (c) => { const { id } = await load(c); return { path: `/api/v1/loads/${id}`, params: { id } }; } },
    PATCH: { roles: COMPLIANCE_ADMIN, ok: OK, request: async (c) => { const { id } = await load(c); return { path: `/api/v1/loads/${id}`, params: { id }, body: { vehicle: "Truck 7" } }; } },
  },
  "loads/[id]/containers/route.ts": {
    POST: {
      roles: COMPLIANCE_ADMIN,
      ok: OK,
      request: async (c) => { const { id } = await load(c); const box = await sealed(c); return { path: `/api/v1/loads/${id}/containers`, params: { id }, body: { containerIds: [box.id] } }; },
    },
  },
  "loads/[id]/containers/[containerId]/route.ts": {
    DELETE: {
      roles: COMPLIANCE_ADMIN,
      ok: OK,
      request: async (c) => { const { id, containerId } = await load(c, { withContainer: true }); return { path: `/api/v1/loads/${id}/containers/${containerId}`, params: { id, containerId: containerId! } }; },
    },
  },
  // The state routes below answer 409 when the load is not in the state they need: that still means the
  // request got past authorisation, which is what this table checks (the loads tests check the states).
  "loads/[id]/depart/route.ts": {
    POST: { roles: COMPLIANCE_ADMIN, ok: OK_OR_STATE, request: async (c) => { const { id } = await load(c, { withContainer: true }); return { path: `/api/v1/loads/${id}/depart`, params: { id }, body: {} }; } },
  },
  "loads/[id]/receive/route.ts": {
    POST: { roles: COMPLIANCE_ADMIN, ok: OK_OR_STATE, request: async (c) => { const { id } = await load(c); return { path: `/api/v1/loads/${id}/receive`, params: { id }, body: { receivedKg: 38, receivedAt: "2026-01-05" } }; } },
  },
  "loads/[id]/reconcile/route.ts": {
    POST: { roles: COMPLIANCE_ADMIN, ok: OK_OR_STATE, request: async (c) => { const { id } = await load(c); return { path: `/api/v1/loads/${id}/reconcile`, params: { id }, body: {} }; } },
  },
  "loads/[id]/corrections/route.ts": {
    POST: {
      roles: COMPLIANCE_ADMIN,
      ok: OK_OR_STATE,
      request: async (c) => { const { id } = await load(c); return { path: `/api/v1/loads/${id}/corrections`, params: { id }, body: { field: "receivedKg", value: 40, note: "reissued ticket" } }; },
    },
  },
  "loads/[id]/manifest.pdf/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK_OR_STATE, request: async (c) => { const { id } = await load(c, { withContainer: true }); return { path: `/api/v1/loads/${id}/manifest.pdf`, params: { id } }; } },
  },
  "loads/[id]/receipt-form.pdf/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: async (c) => { const { id } = await load(c, { withContainer: true }); return { path: `/api/v1/loads/${id}/receipt-form.pdf`, params: { id } }; } },
  },
  "records/route.ts": { GET: { roles: READERS, ok: OK, request: (c) => ({ path: `/api/v1/records?site=${c.siteId}&from=2026-01-01&to=2026-12-31` }) } },
  "records/documents/route.ts": { GET: { roles: READERS, ok: OK, request: siteQuery("/api/v1/records/documents") } },
  "records/documents/[id]/route.ts": {
    GET: { roles: READERS, ok: OK, request: async (c) => { const id = await documentAt(c); return { path: `/api/v1/records/documents/${id}`, params: { id } }; } },
  },
  "records/documents/[id]/regenerated.pdf/route.ts": {
    GET: { roles: READERS, ok: OK, request: async (c) => { const id = await documentAt(c); return { path: `/api/v1/records/documents/${id}/regenerated.pdf`, params: { id } }; } },
  },
  "facilities/route.ts": {
    GET: { scope: "org-list", roles: READERS, ok: OK, request: () => ({ path: "/api/v1/facilities" }) },
    POST: { scope: "org-list", roles: ADMIN, ok: [201], request: () => ({ path: "/api/v1/facilities", body: { name: `Smelter ${uid()}`, address: "1 Furnace Way" } }) },
  },
  "facilities/[id]/route.ts": {
    GET: { scope: "org", roles: READERS, ok: OK, request: (c) => ({ path: `/api/v1/facilities/${facilityOf(c)}`, params: { id: facilityOf(c) } }) },
    PATCH: { scope: "org", roles: ADMIN, ok: OK, request: (c) => ({ path: `/api/v1/facilities/${facilityOf(c)}`, params: { id: facilityOf(c) }, body: { tolerancePct: 3 } }) },
  },
  "carriers/route.ts": {
    GET: { scope: "org-list", roles: READERS, ok: OK, request: () => ({ path: "/api/v1/carriers" }) },
    POST: { scope: "org-list", roles: ADMIN, ok: [201], request: () => ({ path: "/api/v1/carriers", body: { name: `Haulage ${uid()}` } }) },
  },
  "carriers/[id]/route.ts": {
    GET: { scope: "org", roles: READERS, ok: OK, request: (c) => { const id = c.target === "foreign" ? c.w.carrier.foreign : c.w.carrier.own; return { path: `/api/v1/carriers/${id}`, params: { id } }; } },
    PATCH: { scope: "org", roles: ADMIN, ok: OK, request: (c) => { const id = c.target === "foreign" ? c.w.carrier.foreign : c.w.carrier.own; return { path: `/api/v1/carriers/${id}`, params: { id }, body: { name: `Haulage ${uid()}` } }; } },
  },
  "deposits/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/deposits") },
    POST: { roles: CLERK_ADMIN, ok: [201], request: (c) => ({ path: "/api/v1/deposits", body: { kind: "charge", site: c.siteId, saleRef: `S-${uid()}`, product: "Starter 12 V", quantity: 1, chargeCents: 1500 } }) },
  },
  "deposits/check/route.ts": { GET: { roles: ALL, ok: OK, request: async (c) => ({ path: `/api/v1/deposits/check?site=${c.siteId}&sale=${c.target === "own" ? await sale(c) : "S-none"}` }) } },
  "deposits/forfeits/route.ts": {
    GET: { roles: ALL, ok: OK, request: siteQuery("/api/v1/deposits/forfeits") },
    POST: { roles: CLERK_ADMIN, ok: OK, request: (c) => ({ path: "/api/v1/deposits/forfeits", body: { site: c.siteId } }) },
  },
  "deposits/returns/route.ts": {
    POST: {
      roles: CLERK_ADMIN,
      ok: [201],
      request: async (c) => ({ path: "/api/v1/deposits/returns", body: { unit: intake(c.siteId, { saleRef: c.target === "own" ? await sale(c) : "S-none" }), action: "refund" } }),
    },
  },
  "deposits/rule/route.ts": {
    // The built-in rules are the same published list for everyone: any key or person may read it.
    GET: { scope: "any-actor", roles: ALL, ok: OK, request: () => ({ path: "/api/v1/deposits/rule" }) },
    PUT: { roles: ADMIN, ok: OK, request: (c) => ({ path: "/api/v1/deposits/rule", body: { site: c.siteId, ruleId: null } }) },
  },
  "deposits/reports/[name]/route.ts": {
    GET: { roles: ALL, ok: OK, request: (c) => ({ path: `/api/v1/deposits/reports/outstanding.csv?site=${c.siteId}`, params: { name: "outstanding.csv" } }) },
  },
  "imports/sales/route.ts": {
    POST: {
      roles: CLERK_ADMIN,
      ok: OK,
      request: (c) => ({
        path: `/api/v1/imports/sales?site=${c.siteId}&preview=1`,
        body: `date,sale_id,product,group_size,quantity,deposit\r\n2026-01-02,S-${uid()},Starter 12 V,24F,1,15.00\r\n`,
        contentType: "text/csv",
      }),
    },
  },
  "people/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: siteQuery("/api/v1/people") },
    POST: {
      roles: ADMIN,
      personOnly: true,
      ok: [201],
      request: (c) => ({ path: "/api/v1/people", body: { email: `m-${uid()}@test.example`, name: "Matrix Person", password: "temporary-pass-1", memberships: [{ site: c.siteId, role: "clerk" }] } }),
    },
  },
  "people/[id]/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: async (c) => { const { id } = await member(c); return { path: `/api/v1/people/${id}`, params: { id } }; } },
    PATCH: { roles: ADMIN, personOnly: true, ok: OK, request: async (c) => { const { id } = await member(c); return { path: `/api/v1/people/${id}`, params: { id }, body: { name: "Renamed" } }; } },
  },
  "people/[id]/memberships/route.ts": {
    PUT: { roles: ADMIN, personOnly: true, ok: OK, request: async (c) => { const { id } = await member(c); return { path: `/api/v1/people/${id}/memberships`, params: { id }, body: { site: c.siteId, role: "yard" } }; } },
    DELETE: { roles: ADMIN, personOnly: true, ok: OK, request: async (c) => { const { id } = await member(c); return { path: `/api/v1/people/${id}/memberships?site=${c.siteId}`, params: { id } }; } },
  },
  "api-keys/route.ts": {
    GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: siteQuery("/api/v1/api-keys") },
    POST: { roles: ADMIN, personOnly: true, ok: [201], request: (c) => ({ path: "/api/v1/api-keys", body: { site: c.siteId, role: "clerk", name: "Matrix till" } }) },
  },
  "api-keys/[id]/route.ts": {
    DELETE: {
      roles: ADMIN,
      personOnly: true,
      ok: OK,
      request: async (c) => { const { id } = await makeKey(db, { organisationId: c.orgId, siteId: c.siteId, role: "clerk" }); return { path: `/api/v1/api-keys/${id}`, params: { id } }; },
    },
  },
  "trail/route.ts": { GET: { roles: COMPLIANCE_ADMIN, ok: OK, request: siteQuery("/api/v1/trail") } },
  "openapi.json/route.ts": { GET: { scope: "public", roles: ALL, ok: OK, request: () => ({ path: "/api/v1/openapi.json" }) } },
  // Exists only while the intake benchmark sets LEADGER_BENCH_FLOOR=1; otherwise a 404 for everyone.
  "bench-floor/route.ts": { POST: { scope: "off", roles: [], ok: [404], request: (c) => ({ path: `/api/v1/bench-floor?site=${c.siteId}` }) } },
};

function routeFiles(dir = API_DIR): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return routeFiles(full);
    return entry.name === "route.ts" ? [path.relative(API_DIR, full).split(path.sep).join("/")] : [];
  });
}

const FILES = routeFiles().sort();

type TActorKind = "key" | "session";
type TExpectation = { who: string; target: TTarget | "—"; expected: readonly number[]; run: () => Promise<Response> };

async function callRoute(mod: Record<string, unknown>, method: TMethod, req: TReq, auth: { key?: string; cookie?: string }) {
  const headers: Record<string, string> = {};
  if (auth.cookie) headers.cookie = auth.cookie;
  if (req.contentType) headers["content-type"] = req.contentType;
  const request = apiRequest(req.path, { method, key: auth.key, body: req.body, headers });
  if (req.contentType) request.headers.set("content-type", req.contentType);
  const handler = mod[method] as (request: Request, ctx: unknown) => Promise<Response>;
  return handler(request, { params: Promise.resolve(req.params ?? {}) });
}

/** The cells of one route method, each with the statuses it may answer. */
function cells(w: TWorld, mod: Record<string, unknown>, method: TMethod, spec: TCase): TExpectation[] {
  const scope = spec.scope ?? "site";
  const cell = (target: TTarget): TCell => ({ w, target, siteId: w.sites[target], orgId: w.orgOf[target] });
  const out: TExpectation[] = [];
  const noCredentials = scope === "public" ? OK : scope === "off" ? [404] : [401];
  out.push({ who: "no credentials", target: "—", expected: noCredentials, run: async () => callRoute(mod, method, await spec.request(cell("own")), {}) });
  const kinds: TActorKind[] = spec.personOnly ? ["key", "session"] : ["key"];
  const targets: TTarget[] = scope === "org" ? ["own", "foreign"] : scope === "site" ? ["own", "sibling", "foreign"] : ["own"];
  for (const kind of kinds) {
    for (const role of ROLES) {
      const mayAct = spec.roles.includes(role) && !(kind === "key" && spec.personOnly);
      for (const target of targets) {
        let expected: readonly number[];
        if (scope === "public" || scope === "any-actor") expected = OK;
        else if (scope === "off") expected = [404];
        else if (target === "own") expected = mayAct ? spec.ok : [403];
        else if (target === "sibling") expected = [403];
        // Another organisation's record is never confirmed: 404. An organisation-level route may refuse a
        // role that cannot use it at all with 403 before looking the record up, which confirms nothing either.
        else expected = scope === "org" && !mayAct ? [403, 404] : [404];
        const auth = kind === "key" ? { key: w.keys[role] } : { cookie: w.cookies[role] };
        out.push({ who: `${role} ${kind}`, target, expected, run: async () => callRoute(mod, method, await spec.request(cell(target)), auth) });
      }
    }
  }
  return out;
}

let world: TWorld;

beforeAll(async () => {
  db = await testDb();
  const a = await makeOrgWithSite(db, { kind: "yard" });
  const sibling = await makeSite(db, a.organisation.id);
  const b = await makeOrgWithSite(db, { kind: "yard" });
  // A jurisdiction with a built-in deposit rule, so the deposit routes can act (lib/deposits/rules.ts).
  for (const id of [a.site.id, sibling.id, b.site.id]) await db.site.update({ where: { id }, data: { jurisdiction: "US-WA" } });
  const facility = async (organisationId: string) => (await db.facility.create({ data: { organisationId, name: `Smelter ${uid()}`, address: "1 Furnace Way" } })).id;
  const carrier = async (organisationId: string) => (await db.carrier.create({ data: { organisationId, name: `Haulage ${uid()}` } })).id;
  const keys = {} as Record<TRole, string>;
  const cookies = {} as Record<TRole, string>;
  for (const role of ROLES) {
    keys[role] = (await makeKey(db, { organisationId: a.organisation.id, siteId: a.site.id, role })).key;
    cookies[role] = await signIn(await makePerson(db, { organisationId: a.organisation.id, memberships: [{ siteId: a.site.id, role }] }));
  }
  world = {
    orgId: a.organisation.id,
    sites: { own: a.site.id, sibling: sibling.id, foreign: b.site.id },
    orgOf: { own: a.organisation.id, sibling: a.organisation.id, foreign: b.organisation.id },
    facility: { own: await facility(a.organisation.id), foreign: await facility(b.organisation.id) },
    carrier: { own: await carrier(a.organisation.id), foreign: await carrier(b.organisation.id) },
    keys,
    cookies,
  };
}, 120_000);

describe("the matrix covers every route", () => {
  test("every route file under app/api/v1 has an entry, and every entry has its file", () => {
    expect(FILES.filter((f) => !(f in TABLE)), "route files missing from TABLE: add them with the statuses each role must get").toEqual([]);
    expect(Object.keys(TABLE).filter((f) => !FILES.includes(f)), "TABLE entries whose route file is gone").toEqual([]);
  });

  test.each(FILES)("every exported method of %s has an entry", async (file) => {
    const mod = (await import(path.join(API_DIR, file))) as Record<string, unknown>;
    const exported = METHODS.filter((m) => typeof mod[m] === "function");
    expect(exported.filter((m) => !TABLE[file]?.[m]), `methods of ${file} missing from TABLE`).toEqual([]);
    expect(Object.keys(TABLE[file] ?? {}).filter((m) => !exported.includes(m as TMethod)), `TABLE methods that ${file} does not export`).toEqual([]);
  });
});

const ROWS = Object.entries(TABLE).flatMap(([file, methods]) => Object.entries(methods).map(([method, spec]) => ({ name: `${method} ${file.replace(/\/?route\.ts$/, "") || "/"}`, file, method: method as TMethod, spec: spec! })));

describe("status by role and site", () => {
  test.each(ROWS)("$name", async ({ file, method, spec }) => {
    if (!FILES.includes(file)) return; // reported by the coverage test above
    const mod = (await import(path.join(API_DIR, file))) as Record<string, unknown>;
    const wrong: string[] = [];
    for (const c of cells(world, mod, method, spec)) {
      const response = await c.run();
      if (!c.expected.includes(response.status)) {
        const text = (await response.text()).slice(0, 160);
        wrong.push(`${c.who} → ${c.target}: expected ${c.expected.join("/")}, got ${response.status} ${text}`);
      } else await response.body?.cancel();
    }
    expect(wrong, `${method} ${file}`).toEqual([]);
  });
});
