import { z } from "zod";
import { ZIdempotencyKey, ZUnitIntake, ZUnitQuery } from "@/lib/intake/schema";
import { ZCorrection, ZDeparture, ZLoadContainersAdd, ZLoadCreate, ZLoadPatch, ZLoadQuery, ZReceipt, ZReconcile } from "@/lib/db/loads";
import { ZDocumentQuery, ZRecordsQuery } from "@/lib/db/papers";
import { ZCarrierCreate, ZCarrierPatch, ZFacilityCreate, ZFacilityPatch } from "@/lib/db/facilities";
import { ZCustomRule } from "@/lib/rules/rule";
import { ZCounterReturn, ZDepositPost, ZDepositQuery, ZDepositRuleChoice, ZForfeitRun, ZReturnCheckQuery } from "@/lib/db/deposits";
import { ZSalesImportQuery } from "@/lib/db/sales-import";
import { ZAnnualQuery, ZBayCreate, ZContainerCreate, ZContainerPatch, ZContainerQuery, ZLotCreate, ZSiteQuery, ZStow } from "@/lib/yard/schema";
import { ZMembership, ZPeopleQuery, ZPersonCreate, ZPersonPatch } from "@/lib/db/people";
import { ZApiKeyCreate, ZApiKeyQuery } from "@/lib/db/api-keys";
import { ZSiteSettingsPatch } from "@/lib/db/site-settings";
import { ZTrailQuery } from "@/lib/db/trail-query";

/**
 * The API description, generated from the same zod schemas the routes parse with (never written by hand).
 * Each route family lists its operations in OPERATIONS.
 */
type TOperation = {
  method: "get" | "post" | "put" | "patch" | "delete";
  path: string;
  summary: string;
  tag: string;
  body?: { id: string; schema: z.ZodType };
  query?: z.ZodObject;
  headers?: Record<string, { schema: z.ZodType; description: string }>;
  pathParams?: string[];
  responses: Record<string, string>;
};

const ERRORS = { "400": "Invalid input: `{ error: { code, message, issues: [{ field, message }] } }`; nothing was written", "401": "Not signed in and no valid API key", "403": "Your role at this site does not allow it", "404": "No such record in your organisation" };

export const OPERATIONS: TOperation[] = [
  {
    method: "post",
    path: "/api/v1/units",
    summary: "Log one spent battery; its composition is computed and the site's totals move by exactly that unit",
    tag: "Counter",
    body: { id: "UnitIntake", schema: ZUnitIntake },
    headers: { "Idempotency-Key": { schema: ZIdempotencyKey, description: "A retry with the same key returns the first response and writes nothing new" } },
    responses: { "201": "The unit, its composition and the site's new totals", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/units",
    summary: "List units received, newest first, within the sites you may see",
    tag: "Counter",
    query: ZUnitQuery,
    responses: { "200": "`{ units: [...] }`", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/sites/{id}/totals",
    summary: "On-hand totals of a site: unit count and battery, lead, electrolyte and sulfuric acid mass in kg",
    tag: "Sites",
    pathParams: ["id"],
    responses: { "200": "`{ site, totals }`", ...ERRORS },
  },
  { method: "get", path: "/api/v1/bays", summary: "The bays of a site with their running totals", tag: "Yard", query: ZSiteQuery, responses: { "200": "`{ bays: [...] }`", ...ERRORS } },
  { method: "post", path: "/api/v1/bays", summary: "Add a bay (an area of the site) to hold containers", tag: "Yard", body: { id: "BayCreate", schema: ZBayCreate }, responses: { "201": "`{ bay }`", ...ERRORS } },
  { method: "get", path: "/api/v1/containers", summary: "The containers of a site, by state and bay", tag: "Yard", query: ZContainerQuery, responses: { "200": "`{ containers: [...] }`", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/containers",
    summary: "Add a pallet, box, tote or drum; the label number is the next free one for its kind unless given",
    tag: "Yard",
    body: { id: "ContainerCreate", schema: ZContainerCreate },
    responses: { "201": "`{ container }`", ...ERRORS },
  },
  { method: "get", path: "/api/v1/containers/{id}", summary: "A container with its units and lots", tag: "Yard", pathParams: ["id"], responses: { "200": "`{ container, units, lots }`", ...ERRORS } },
  {
    method: "patch",
    path: "/api/v1/containers/{id}",
    summary: "Seal an open container (`{ state: \"sealed\" }`) or move it to another bay (`{ bayId }`), carrying its totals",
    tag: "Yard",
    pathParams: ["id"],
    body: { id: "ContainerPatch", schema: ZContainerPatch },
    responses: { "200": "`{ container }`", ...ERRORS },
  },
  {
    method: "post",
    path: "/api/v1/containers/{id}/units",
    summary:
      "Stow or move into an open container by scan (unit id, container label or ticket number), unit ids, a lot or another container's contents. Leaking or cracked units only into a closed container; the accumulation start becomes the earliest date",
    tag: "Yard",
    pathParams: ["id"],
    body: { id: "Stow", schema: ZStow },
    responses: { "200": "`{ container, moved, from, items }`", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/containers/{id}/label.pdf",
    summary: "The container label: rulebook wording, accumulation start date, last day, Code 128 of the label number, site, caution",
    tag: "Yard",
    pathParams: ["id"],
    responses: { "200": "application/pdf", ...ERRORS },
  },
  {
    method: "post",
    path: "/api/v1/lots",
    summary: "Receive a weighed lot from a scale ticket: net = gross − tare, 1–80 kg a unit, composition estimated per kind of the mix",
    tag: "Yard",
    body: { id: "LotCreate", schema: ZLotCreate },
    responses: { "201": "`{ lot, composition, siteTotals }`", ...ERRORS },
  },
  { method: "get", path: "/api/v1/lots", summary: "Lots received at a site, newest first", tag: "Yard", query: ZSiteQuery, responses: { "200": "`{ lots: [...] }`", ...ERRORS } },
  {
    method: "get",
    path: "/api/v1/sites/{id}/limits",
    summary: "Each rule of the site's rulebook and its own rules against what it holds: status, margin, forecast date, citation and caution; container deadlines",
    tag: "Limits",
    pathParams: ["id"],
    responses: { "200": "`{ site, status, rules: [...], containers: [...], caution, rulebookId, rulebookVersion, asOf }`", ...ERRORS },
  },
  { method: "get", path: "/api/v1/sites/{id}/rules", summary: "The site's own rules", tag: "Limits", pathParams: ["id"], responses: { "200": "`{ rules: [...] }`", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/sites/{id}/rules",
    summary: "Add a site rule (a permit or fire-code limit) with its citation; administrators only",
    tag: "Limits",
    pathParams: ["id"],
    body: { id: "CustomRule", schema: ZCustomRule },
    responses: { "201": "`{ rule }`", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/sites/{id}/annual",
    summary: "Annual figures (Tier II) for a year: maximum daily amount, average daily amount, days on site; as JSON, CSV or the PDF worksheet",
    tag: "Limits",
    pathParams: ["id"],
    query: ZAnnualQuery,
    responses: { "200": "JSON figures, text/csv or application/pdf", ...ERRORS },
  },
];

// Loads, papers, receiving facilities and carriers (lib/db/loads.ts, lib/db/papers.ts, lib/db/facilities.ts).
OPERATIONS.push(
  { method: "post", path: "/api/v1/loads", summary: "Plan a load at a site for a receiving facility; the reference is the next LD-<year>-<nnnn> unless given", tag: "Loads", body: { id: "LoadCreate", schema: ZLoadCreate }, responses: { "201": "The load view: load, containers, summary by kind, basis and checklist, gate, reconciliation, documents, history", ...ERRORS } },
  { method: "get", path: "/api/v1/loads", summary: "Loads at a site, newest first, with what each carries and whether its receipt is flagged", tag: "Loads", query: ZLoadQuery, responses: { "200": "`{ loads: [...] }`", ...ERRORS } },
  { method: "get", path: "/api/v1/loads/{id}", summary: "One load: containers, count, mass and estimated lead by kind, transport basis and checklist with citations, the gate, the reconciliation, papers and history", tag: "Loads", pathParams: ["id"], responses: { "200": "The load view", ...ERRORS } },
  {
    method: "patch",
    path: "/api/v1/loads/{id}",
    summary: "While planning: facility, carrier, vehicle, transport basis (clears the checklist), checklist ticks. Or a state change on its own: `ready` (only when the checklist is complete with no blockers; 409 lists what is missing) or back to `planning`",
    tag: "Loads",
    pathParams: ["id"],
    body: { id: "LoadPatch", schema: ZLoadPatch },
    responses: { "200": "The load view", "409": "Not allowed in the load's state (a reconciled load is read-only), or the gate's missing items and blockers as issues", ...ERRORS },
  },
  { method: "post", path: "/api/v1/loads/{id}/containers", summary: "Put sealed containers on a planning load; a container on another load (even one claimed at the same moment) is a 409 and nothing changes", tag: "Loads", pathParams: ["id"], body: { id: "LoadContainersAdd", schema: ZLoadContainersAdd }, responses: { "200": "The load view", "409": "A container is not sealed or already on a load", ...ERRORS } },
  { method: "delete", path: "/api/v1/loads/{id}/containers/{containerId}", summary: "Take a container off a planning load; it is sealed again", tag: "Loads", pathParams: ["id", "containerId"], responses: { "200": "The load view", ...ERRORS } },
  { method: "post", path: "/api/v1/loads/{id}/depart", summary: "A ready load leaves: containers and units depart and the site's on-hand totals go down by exactly what left (level ledger reason `departure`)", tag: "Loads", pathParams: ["id"], body: { id: "Departure", schema: ZDeparture }, responses: { "200": "The load view", ...ERRORS } },
  { method: "post", path: "/api/v1/loads/{id}/receive", summary: "The receiving facility's scale weight and date of receipt; compared with the shipped estimate and the departure scale weight against the facility's tolerance", tag: "Loads", pathParams: ["id"], body: { id: "Receipt", schema: ZReceipt }, responses: { "200": "The load view with its reconciliation", ...ERRORS } },
  { method: "post", path: "/api/v1/loads/{id}/reconcile", summary: "Close a delivered load (a flagged difference needs a note); it is read-only afterwards", tag: "Loads", pathParams: ["id"], body: { id: "Reconcile", schema: ZReconcile }, responses: { "200": "The load view", ...ERRORS } },
  { method: "post", path: "/api/v1/loads/{id}/corrections", summary: "Correct a recorded weight or date: a new trail event, never an overwrite of the load", tag: "Loads", pathParams: ["id"], body: { id: "Correction", schema: ZCorrection }, responses: { "201": "The load view with the corrected values", ...ERRORS } },
  { method: "get", path: "/api/v1/loads/{id}/manifest.pdf", summary: "The load manifest (shipping paper and bill of lading), issued and stored with its input snapshot, rulebook version and sha256", tag: "Papers", pathParams: ["id"], responses: { "200": "application/pdf; headers x-document-id, x-document-sha256", ...ERRORS } },
  { method: "get", path: "/api/v1/loads/{id}/receipt-form.pdf", summary: "The receipt form for the receiving facility, issued and stored like the manifest", tag: "Papers", pathParams: ["id"], responses: { "200": "application/pdf", ...ERRORS } },
  { method: "get", path: "/api/v1/records", summary: "Shipment records for a period with the fields of 40 CFR 273.39 (received: origin, quantity by type, date; sent: destination, quantity by type, date left): CSV, JSON or an issued PDF", tag: "Papers", query: ZRecordsQuery, responses: { "200": "text/csv, JSON rows or application/pdf", ...ERRORS } },
  { method: "get", path: "/api/v1/records/documents", summary: "Issued documents of a site: kind, load, rulebook id and version, sha256, who and when", tag: "Papers", query: ZDocumentQuery, responses: { "200": "`{ documents: [...] }`", ...ERRORS } },
  { method: "get", path: "/api/v1/records/documents/{id}", summary: "Make a stored document again from its snapshot and compare its sha256 with the stored one", tag: "Papers", pathParams: ["id"], responses: { "200": "`{ document, verification: { storedSha256, regeneratedSha256, isIdentical } }`", ...ERRORS } },
  { method: "get", path: "/api/v1/records/documents/{id}/regenerated.pdf", summary: "The stored document made again from its snapshot (headers x-regenerated-sha256, x-identical)", tag: "Papers", pathParams: ["id"], responses: { "200": "application/pdf", ...ERRORS } },
  { method: "get", path: "/api/v1/facilities", summary: "Receiving facilities of the organisation", tag: "Setup", responses: { "200": "`{ facilities: [...] }`", ...ERRORS } },
  { method: "post", path: "/api/v1/facilities", summary: "Add a receiving facility: name, address, regulatory IDs, weighing tolerance (default 2 %); administrators only", tag: "Setup", body: { id: "FacilityCreate", schema: ZFacilityCreate }, responses: { "201": "`{ facility }`", ...ERRORS } },
  { method: "get", path: "/api/v1/facilities/{id}", summary: "One receiving facility", tag: "Setup", pathParams: ["id"], responses: { "200": "`{ facility }`", ...ERRORS } },
  { method: "patch", path: "/api/v1/facilities/{id}", summary: "Change a receiving facility (never deleted: loads refer to it)", tag: "Setup", pathParams: ["id"], body: { id: "FacilityPatch", schema: ZFacilityPatch }, responses: { "200": "`{ facility }`", ...ERRORS } },
  { method: "get", path: "/api/v1/carriers", summary: "Carriers of the organisation", tag: "Setup", responses: { "200": "`{ carriers: [...] }`", ...ERRORS } },
  { method: "post", path: "/api/v1/carriers", summary: "Add a carrier: name, address, regulatory IDs; administrators only", tag: "Setup", body: { id: "CarrierCreate", schema: ZCarrierCreate }, responses: { "201": "`{ carrier }`", ...ERRORS } },
  { method: "get", path: "/api/v1/carriers/{id}", summary: "One carrier", tag: "Setup", pathParams: ["id"], responses: { "200": "`{ carrier }`", ...ERRORS } },
  { method: "patch", path: "/api/v1/carriers/{id}", summary: "Change a carrier", tag: "Setup", pathParams: ["id"], body: { id: "CarrierPatch", schema: ZCarrierPatch }, responses: { "200": "`{ carrier }`", ...ERRORS } },
);

// Deposits: the core-charge ledger and the point-of-sale import (lib/db/deposits.ts, lib/db/sales-import.ts). Money in whole cents.
OPERATIONS.push(
  { method: "get", path: "/api/v1/deposits", summary: "A store's deposit balance (cents), its deposit rule with citation, and its latest ledger entries", tag: "Deposits", query: ZDepositQuery, responses: { "200": "`{ site, balanceCents, rule, entries, caution }`", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/deposits",
    summary: "Record a sale with its core charge (kind charge; batteries handed in get a credit each) or with every battery handed in (kind credit), or one battery's refund inside the window (kind refund); the balance moves in the same transaction",
    tag: "Deposits",
    body: { id: "DepositPost", schema: ZDepositPost },
    responses: { "201": "The sale and entries with the new balance, or the refund entry with the window verdict", ...ERRORS },
  },
  { method: "get", path: "/api/v1/deposits/check", summary: "The Counter's check of a returned battery: days since the sale, inside or outside the refund window, the refund due and what the rule allows; writes nothing", tag: "Deposits", query: ZReturnCheckQuery, responses: { "200": "`{ sale, due, options, rule, equivalentSize, caution }`", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/deposits/returns",
    summary: "A used battery at the Counter against a sale: logs the unit and books the refund, credit or forfeit linked to it, in one transaction; a deposit entry the rule does not allow (window passed, sale already refunded) is a 400 and nothing is written",
    tag: "Deposits",
    body: { id: "CounterReturn", schema: ZCounterReturn },
    headers: { "Idempotency-Key": { schema: ZIdempotencyKey, description: "A retry with the same key returns the first response and writes nothing new" } },
    responses: { "201": "The unit as from POST /api/v1/units, with `deposit: { isBooked, action, entry, amountCents, balanceCents, message }`", ...ERRORS },
  },
  { method: "get", path: "/api/v1/deposits/forfeits", summary: "Sales past their refund window with deposit still held", tag: "Deposits", query: ZForfeitRun, responses: { "200": "`{ asOf, forfeitsDue, rule, caution }`", ...ERRORS } },
  { method: "post", path: "/api/v1/deposits/forfeits", summary: "Book a forfeit entry for each sale past its window with deposit held, in one transaction", tag: "Deposits", body: { id: "ForfeitRun", schema: ZForfeitRun }, responses: { "201": "`{ count, totalCents, balanceCents, forfeits }`", ...ERRORS } },
  { method: "get", path: "/api/v1/deposits/rule", summary: "The built-in deposit rules (state core-charge laws) with their citations", tag: "Deposits", responses: { "200": "`{ rules, caution }`", ...ERRORS } },
  { method: "put", path: "/api/v1/deposits/rule", summary: "Choose a store's deposit rule: a built-in rule id, a custom rule (citation required), or null for the rule of its jurisdiction; administrators only", tag: "Deposits", body: { id: "DepositRuleChoice", schema: ZDepositRuleChoice }, responses: { "200": "`{ rule }`", ...ERRORS } },
  { method: "get", path: "/api/v1/deposits/reports/{name}", summary: "A deposit report as CSV: outstanding.csv (by age), returns.csv (returns per sales by month), forfeited.csv, forfeits-due.csv; `?site=` required", tag: "Deposits", pathParams: ["name"], responses: { "200": "text/csv", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/imports/sales",
    summary: "Import a point-of-sale CSV (body, text/csv: date,sale_id,product,group_size,quantity,deposit), streamed; all or nothing; sale ids already held are skipped and counted; `preview=1` checks only. With `Accept: application/x-ndjson` the answer streams progress lines and ends with `{ type: \"result\", status, body }`",
    tag: "Deposits",
    query: ZSalesImportQuery,
    responses: { "200": "Preview: `{ rows, newSales, skipped, errors: [] }`", "201": "Imported: `{ newSales, skipped, chargeCount, creditCount, chargedCents, balanceCents, importId }`", ...ERRORS, "400": "Bad lines: `{ error: { issues: [{ line, field, message }] }, result }`; nothing was imported" },
  },
);

// Accounts and the trail: people and roles, API keys, site settings (lib/db/people.ts, api-keys.ts, site-settings.ts, trail-query.ts).
OPERATIONS.push(
  { method: "get", path: "/api/v1/people", summary: "People of the organisation at sites whose setup you may read, with their role at each of those sites", tag: "Setup", query: ZPeopleQuery, responses: { "200": "`{ people: [{ id, name, email, createdAt, memberships: [{ siteId, siteName, role }] }] }`", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/people",
    summary: "Add a person with a temporary password and a role at one or more sites you administer; signed-in administrators only (not API keys)",
    tag: "Setup",
    body: { id: "PersonCreate", schema: ZPersonCreate },
    responses: { "201": "`{ person }`", "409": "The email is already in use", ...ERRORS },
  },
  { method: "get", path: "/api/v1/people/{id}", summary: "One person, with their roles at the sites whose setup you may read", tag: "Setup", pathParams: ["id"], responses: { "200": "`{ person }`", ...ERRORS } },
  {
    method: "patch",
    path: "/api/v1/people/{id}",
    summary: "Rename a person, or give them a new temporary password (ends all their sessions). Needs administrator at every site the person works at; not for yourself",
    tag: "Setup",
    pathParams: ["id"],
    body: { id: "PersonPatch", schema: ZPersonPatch },
    responses: { "200": "`{ person }`", ...ERRORS },
  },
  {
    method: "put",
    path: "/api/v1/people/{id}/memberships",
    summary: "Give a person a role at a site, or change it (clerk, yard, compliance, admin). Not your own; a site keeps at least one administrator",
    tag: "Setup",
    pathParams: ["id"],
    body: { id: "Membership", schema: ZMembership },
    responses: { "200": "`{ person }`", "409": "It would leave the site without an administrator", ...ERRORS },
  },
  {
    method: "delete",
    path: "/api/v1/people/{id}/memberships",
    summary: "Take a person's role at a site away (`?site=`). Not your own; a site keeps at least one administrator",
    tag: "Setup",
    pathParams: ["id"],
    query: ZPeopleQuery,
    responses: { "200": "`{ person }` (null when you can no longer see them)", "409": "It would leave the site without an administrator", ...ERRORS },
  },
  { method: "get", path: "/api/v1/api-keys", summary: "API keys of the sites whose setup you may read: name, site, role, first characters, who made it, when last used, revoked", tag: "Setup", query: ZApiKeyQuery, responses: { "200": "`{ apiKeys: [...] }` (never the key itself)", ...ERRORS } },
  {
    method: "post",
    path: "/api/v1/api-keys",
    summary: "Make an API key for one site and one role; the key is in this response only (stored as its SHA-256). Signed-in administrators only",
    tag: "Setup",
    body: { id: "ApiKeyCreate", schema: ZApiKeyCreate },
    responses: { "201": "`{ apiKey, key }`", ...ERRORS },
  },
  { method: "delete", path: "/api/v1/api-keys/{id}", summary: "Revoke an API key at once; the record stays for the trail", tag: "Setup", pathParams: ["id"], responses: { "200": "`{ apiKey }`", "409": "Already revoked", ...ERRORS } },
  { method: "get", path: "/api/v1/sites/{id}", summary: "A site's settings: name, kind, address, jurisdiction, rulebook, unit system, consumer-product exemption, regulatory IDs", tag: "Setup", pathParams: ["id"], responses: { "200": "`{ site }`", ...ERRORS } },
  {
    method: "patch",
    path: "/api/v1/sites/{id}",
    summary: "Change a site's settings; the trail keeps the changed fields before and after; administrators only",
    tag: "Setup",
    pathParams: ["id"],
    body: { id: "SiteSettingsPatch", schema: ZSiteSettingsPatch },
    responses: { "200": "`{ site }`", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/trail",
    summary: "Trail events, newest first, of the sites where your role reads the trail (organisation-level events for administrators; `site=organisation` for those alone). Filters: site, actor (user:<id> or key:<id>), action, entity, entityId, from/to (a UTC day, or an instant). Paged by `cursor`; `format=csv` streams every match as CSV",
    tag: "Trail",
    query: ZTrailQuery,
    responses: { "200": "`{ events: [{ id, at, siteId, siteName, actor, actorLabel, action, entity, entityId, before, after }], nextCursor }` or text/csv", ...ERRORS },
  },
);

function strip(schema: Record<string, unknown>) {
  const { $schema: _s, $id: _i, ...rest } = schema;
  return rest;
}

export function openApiDocument(): Record<string, unknown> {
  const registry = z.registry<{ id: string }>();
  for (const op of OPERATIONS) if (op.body && !registry.has(op.body.schema)) registry.add(op.body.schema, { id: op.body.id });
  const components = z.toJSONSchema(registry, { io: "input", uri: (id) => `#/components/schemas/${id}`, unrepresentable: "any" });
  const schemas = Object.fromEntries(Object.entries(components.schemas).map(([id, s]) => [id, strip(s as Record<string, unknown>)]));

  const paths: Record<string, Record<string, unknown>> = {};
  for (const op of OPERATIONS) {
    const parameters: unknown[] = [];
    for (const name of op.pathParams ?? []) parameters.push({ name, in: "path", required: true, schema: { type: "string" } });
    if (op.query) {
      const q = z.toJSONSchema(op.query, { io: "input", unrepresentable: "any" }) as { properties?: Record<string, unknown>; required?: string[] };
      for (const [name, schema] of Object.entries(q.properties ?? {})) {
        parameters.push({ name, in: "query", required: q.required?.includes(name) ?? false, schema });
      }
    }
    for (const [name, h] of Object.entries(op.headers ?? {})) {
      parameters.push({ name, in: "header", required: false, description: h.description, schema: strip(z.toJSONSchema(h.schema, { io: "input" }) as Record<string, unknown>) });
    }
    paths[op.path] ??= {};
    paths[op.path]![op.method] = {
      summary: op.summary,
      tags: [op.tag],
      ...(parameters.length ? { parameters } : {}),
      ...(op.body ? { requestBody: { required: true, content: { "application/json": { schema: { $ref: `#/components/schemas/${op.body.id}` } } } } } : {}),
      responses: Object.fromEntries(Object.entries(op.responses).map(([code, description]) => [code, { description }])),
    };
  }
  return {
    openapi: "3.1.0",
    info: { title: "Leadger API", version: "1", description: "Figures are estimates to support, not replace, a trained person's judgement; local rules may be stricter." },
    components: {
      schemas,
      securitySchemes: { apiKey: { type: "http", scheme: "bearer", description: "An API key made under Setup for one site and role" }, session: { type: "apiKey", in: "cookie", name: "__Secure-better-auth.session_token" } },
    },
    security: [{ apiKey: [] }, { session: [] }],
    paths,
  };
}
