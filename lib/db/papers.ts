import { randomUUID } from "node:crypto";
import { z } from "zod";
import { can, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { SOURCES } from "@/lib/intake/schema";
import { summariseLoad, type TLoadUnit } from "@/lib/loads/summarise-load";
import { sha256, type TParty } from "@/lib/papers/pdf-base";
import { renderAnnualWorksheet, type TAnnualWorksheetInput } from "@/lib/papers/render-annual-worksheet";
import { renderContainerLabel, type TContainerLabelInput } from "@/lib/papers/render-container-label";
import { renderManifest, type TManifestInput } from "@/lib/papers/render-manifest";
import { renderReceiptForm, type TReceiptFormInput } from "@/lib/papers/render-receipt-form";
import { renderShipmentRecords, shipmentRecordRows, shipmentRecordsCsv, type TShipmentRecordRow, type TShipmentRecordsInput } from "@/lib/papers/render-shipment-records";
import { getRulebook } from "@/lib/rules/rulebooks";
import { db } from "./client";
import { kindLabel, loadEntries, loadFor, lotEntries } from "./loads";
import { siteFor } from "./sites";
import { writeTrail } from "./trail";

/**
 * Issued papers. Every paper is rendered from a plain input that is stored with it (the snapshot), with the
 * rulebook id and version and the sha256 of the bytes, so that it can be made again byte for byte years later
 * and shown to be the same document. Documents are never deleted or changed.
 */

export const DOCUMENT_KINDS = ["manifest", "receipt-form", "records", "label", "annual"] as const;
export type TDocumentKind = (typeof DOCUMENT_KINDS)[number];

const RENDERERS: Record<TDocumentKind, (input: never) => Promise<Buffer>> = {
  manifest: renderManifest as (input: TManifestInput) => Promise<Buffer>,
  "receipt-form": renderReceiptForm as (input: TReceiptFormInput) => Promise<Buffer>,
  records: renderShipmentRecords as (input: TShipmentRecordsInput) => Promise<Buffer>,
  label: renderContainerLabel as (input: TContainerLabelInput) => Promise<Buffer>,
  annual: renderAnnualWorksheet as (input: TAnnualWorksheetInput) => Promise<Buffer>,
};

/**
 * How many papers are made at once in this process. Making one is CPU work on the event loop from end to end:
 * reading the load's units through Prisma, building and comparing the snapshot, laying out with pdfkit. Fifty
 * side by side each hold the loop for a slice in turn, so every request (and every other route) waits behind
 * all of them. Two at a time keeps one paper's database reads overlapping another's layout while the rest
 * queue in order and other routes get the loop between slices; past MAX_WAITING the answer is 429 rather than
 * an ever longer queue.
 */
export const RENDER_SLOTS = 2;
const MAX_WAITING = 256;

type TSlots = { active: number; waiting: (() => void)[] };
// On globalThis: every route bundle that imports this module shares the one queue.
const slots = ((globalThis as { __leadgerRenderSlots?: TSlots }).__leadgerRenderSlots ??= { active: 0, waiting: [] });

export async function withRenderSlot<T>(work: () => Promise<T>): Promise<T> {
  if (slots.active < RENDER_SLOTS) slots.active++;
  else {
    if (slots.waiting.length >= MAX_WAITING) throw new AppError("rate_limited", "Too many papers are being made at once; try again in a moment.");
    // The slot is handed over by the one that finishes, so `active` does not change here.
    await new Promise<void>((resolve) => slots.waiting.push(resolve));
  }
  try {
    return await work();
  } finally {
    const next = slots.waiting.shift();
    if (next) next();
    else slots.active--;
  }
}

/** Renders a stored (or new) snapshot with the renderer of its kind (callers hold a render slot). */
export function renderSnapshot(kind: string, input: unknown): Promise<Buffer> {
  const render = RENDERERS[kind as TDocumentKind];
  if (!render) throw new AppError("internal", `No renderer for documents of kind "${kind}".`);
  return (render as (i: unknown) => Promise<Buffer>)(input);
}

const DOCUMENT_META = { id: true, siteId: true, loadId: true, kind: true, rulebookId: true, rulebookVersion: true, sha256: true, issuedAt: true, issuedBy: true } as const;
export type TDocumentMeta = { id: string; siteId: string; loadId: string | null; kind: string; rulebookId: string; rulebookVersion: string; sha256: string; issuedAt: Date; issuedBy: string };

export type TIssued = { document: TDocumentMeta; pdf: Buffer; isNew: boolean };

const party = (p: { name: string; address: string; regulatoryIds: string }): TParty => ({ name: p.name, address: p.address, regulatoryIds: p.regulatoryIds });
const isoDay = (d: Date) => d.toISOString().slice(0, 10);
const withoutStamp = (input: Record<string, unknown>) => {
  const { issuedAt: _a, documentSeed: _s, ...rest } = input;
  return rest;
};

/**
 * Issues a paper from its content, or hands back the one already issued: when the newest document of the same
 * kind (for the same load) was made from the same content under the same rulebook version, and makes the same
 * bytes again, that document is the answer and nothing new is written. Otherwise a new document is rendered,
 * stored with its snapshot and hash, and its trail event written in the same transaction.
 */
async function issue({
  actor,
  siteId,
  loadId,
  kind,
  content,
  reuseLatest = false,
}: {
  actor: TActor;
  siteId: string;
  loadId: string | null;
  kind: TDocumentKind;
  content: Record<string, unknown> & { rulebook: { id: string; version: string } };
  /** hand back the newest document of the kind even if the content has changed since (a load that has left) */
  reuseLatest?: boolean;
}): Promise<TIssued> {
  const latest = await db().document.findFirst({ where: { siteId, loadId, kind }, orderBy: { issuedAt: "desc" } });
  if (latest) {
    const stored = JSON.parse(latest.input) as Record<string, unknown>;
    const sameRulebook = latest.rulebookId === content.rulebook.id && latest.rulebookVersion === content.rulebook.version;
    if (reuseLatest || (sameRulebook && JSON.stringify(withoutStamp(stored)) === JSON.stringify(content))) {
      const pdf = await renderSnapshot(kind, stored);
      const { input: _input, ...meta } = latest;
      // A renderer that no longer makes the same bytes gets a new document rather than a copy that would not match its hash.
      if (sha256(pdf) === latest.sha256 || reuseLatest) return { document: meta, pdf, isNew: false };
    }
  }
  const id = randomUUID();
  const issuedAt = new Date();
  const input = { ...content, issuedAt: issuedAt.toISOString(), documentSeed: id };
  const pdf = await renderSnapshot(kind, input);
  const hash = sha256(pdf);
  const document = await db().$transaction(async (tx) => {
    const row = await tx.document.create({
      data: { id, siteId, loadId, kind, rulebookId: content.rulebook.id, rulebookVersion: content.rulebook.version, input: JSON.stringify(input), sha256: hash, issuedAt, issuedBy: actor.ref },
      select: DOCUMENT_META,
    });
    await writeTrail(tx, actor, {
      siteId,
      action: "document.issued",
      entity: "document",
      entityId: id,
      after: { kind, loadId, sha256: hash, rulebookId: row.rulebookId, rulebookVersion: row.rulebookVersion },
      at: issuedAt,
    });
    return row;
  });
  return { document, pdf, isNew: true };
}

async function loadPaperContext(actor: TActor, loadId: string) {
  const found = await loadFor(actor, loadId, "papers.issue");
  const load = await db().load.findUniqueOrThrow({
    where: { id: found.id },
    include: { site: { include: { organisation: { select: { emergencyPhone: true } } } }, facility: true, carrier: true },
  });
  const entries = await loadEntries(db(), load.id);
  if (entries.units.length === 0) {
    throw new AppError("conflict", `Load ${load.reference} has nothing on it yet: add sealed containers before making its papers.`, [{ field: "containerIds", message: "the load has no containers" }]);
  }
  const rulebook = getRulebook(load.site.rulebookId);
  return {
    load,
    base: {
      rulebook: { id: rulebook.id, version: rulebook.version },
      reference: load.reference,
      // Before departure the paper carries the day it was made; after, the day the load left.
      shipDate: isoDay(load.departedAt ?? new Date()),
      shipper: party(load.site),
      consignee: party(load.facility),
      ...(load.carrier ? { carrier: party(load.carrier) } : {}),
      vehicle: load.vehicle,
      containers: entries.containers.map(({ id: _id, ...c }) => c),
      units: entries.units,
      ...(load.departureScaleKg !== null ? { departureScaleKg: load.departureScaleKg } : {}),
    },
  };
}

const HAS_LEFT = new Set(["departed", "delivered", "reconciled"]);

/**
 * The load manifest (shipping paper and bill of lading). Until the load leaves, a change to the load makes the
 * next request issue a new manifest; once it has left, the manifest that went with it is the answer.
 */
export function issueManifest(actor: TActor, loadId: string): Promise<TIssued & { reference: string }> {
  return withRenderSlot(() => manifestOf(actor, loadId));
}

async function manifestOf(actor: TActor, loadId: string): Promise<TIssued & { reference: string }> {
  const { load, base } = await loadPaperContext(actor, loadId);
  if (!load.basis) throw new AppError("conflict", `Load ${load.reference} has no transport basis yet: choose one before making its manifest.`, [{ field: "basis", message: "choose a transport basis" }]);
  const content = { ...base, basis: load.basis, checklist: JSON.parse(load.checklist) as Record<string, boolean>, emergencyPhone: load.site.organisation.emergencyPhone ?? "" };
  const issued = await issue({ actor, siteId: load.siteId, loadId: load.id, kind: "manifest", content, reuseLatest: HAS_LEFT.has(load.state) && (await hasDocument(load.id, "manifest")) });
  return { ...issued, reference: load.reference };
}

/** The form the receiving facility fills in on arrival, with the shipped weights and the tolerance band. */
export function issueReceiptForm(actor: TActor, loadId: string): Promise<TIssued & { reference: string }> {
  return withRenderSlot(() => receiptFormOf(actor, loadId));
}

async function receiptFormOf(actor: TActor, loadId: string): Promise<TIssued & { reference: string }> {
  const { load, base } = await loadPaperContext(actor, loadId);
  const { vehicle, ...rest } = base;
  const content = { ...rest, vehicle, tolerancePct: load.facility.tolerancePct };
  const issued = await issue({ actor, siteId: load.siteId, loadId: load.id, kind: "receipt-form", content, reuseLatest: HAS_LEFT.has(load.state) && (await hasDocument(load.id, "receipt-form")) });
  return { ...issued, reference: load.reference };
}

const hasDocument = async (loadId: string, kind: TDocumentKind) => (await db().document.count({ where: { loadId, kind } })) > 0;

export const RECORDS_FORMATS = ["csv", "pdf", "json"] as const;
const MAX_PERIOD_DAYS = 3 * 366 + 1;

export const ZRecordsQuery = z
  .object({
    site: z.string({ error: "site is required" }).trim().min(1, "site is required"),
    from: z.iso.date({ message: "from must be a date as YYYY-MM-DD" }),
    to: z.iso.date({ message: "to must be a date as YYYY-MM-DD" }),
    format: z.enum(RECORDS_FORMATS, { error: "format must be csv, pdf or json" }).default("csv"),
  })
  .superRefine((v, ctx) => {
    if (v.to < v.from) ctx.addIssue({ code: "custom", path: ["to"], message: "the end of the period must not be before its start" });
    else if ((Date.parse(v.to) - Date.parse(v.from)) / 86_400_000 + 1 > MAX_PERIOD_DAYS) ctx.addIssue({ code: "custom", path: ["to"], message: "a period of at most 3 years at a time (the retention period of 40 CFR 273.39)" });
  });
export type TRecordsQuery = z.output<typeof ZRecordsQuery>;

/**
 * Where units came from when no sender was recorded with them. A core return across the counter without one is
 * taken to come from a member of the public, who needs no sender line: a household is not a universal waste
 * handler (the project's reading, from memory of 40 CFR 273.8 and 273.9; not in REFERENCES.md). Every other row
 * without a sender says so plainly.
 */
export const NO_SENDER_ORIGIN: Record<string, string> = {
  "core-return": "Core returns across the counter (members of the public: no sender, the project's reading)",
  "drop-off": "Drop-offs (sender not recorded)",
  fleet: "Fleet returns (sender not recorded)",
  "purchased-scrap": "Purchased scrap (sender not recorded)",
};
export const LOT_NO_SENDER = "Weighed lot (sender not recorded)";
/** Printed with the name of a sender whose address was not given. */
export const ADDRESS_NOT_RECORDED = "(address not recorded)";
const SOURCE_LABEL = new Map<string, string>(SOURCES.map((s) => [s.id, s.label]));

/** Said under the shipments received when a row has no sender; the caution of DESIGN.md §6 is in every page's footer too. */
export const RECORDS_NOTES = {
  household:
    "Core returns without a sender came across the counter from members of the public. The project reads 40 CFR 273.39 as asking for the sender of a shipment from a handler, and a household is not one, so no sender is listed for them. " +
    "This is the project's reading, not a ruling: state rules may ask for more; confirm it with the authority having jurisdiction.",
  notRecorded:
    "Rows marked \"sender not recorded\" were logged without the name and address of the one who sent them, which 40 CFR 273.39 asks for each shipment received: complete them from the scale tickets or delivery papers, and give the sender when logging the next ones.",
} as const;

const origin = (name: string | null, address: string | null, fallback: string): TParty =>
  name ? { name, address: address ?? ADDRESS_NOT_RECORDED, regulatoryIds: "" } : { name: fallback, address: "", regulatoryIds: "" };

const typeOf = (u: { kind: string; isNonSpillable: boolean }) => `lead-acid batteries, ${u.kind} (${u.isNonSpillable ? "UN2800" : "UN2794"})`;

function quantities(units: TLoadUnit[]) {
  const byType = new Map<string, { type: string; count: number; massKg: number }>();
  for (const u of units) {
    const type = typeOf(u);
    const q = byType.get(type) ?? { type, count: 0, massKg: 0 };
    q.count += u.count ?? 1;
    q.massKg += u.massKg;
    byType.set(type, q);
  }
  return [...byType.values()];
}

/**
 * The shipment records of a site for a period with the fields of 40 CFR 273.39: each shipment received
 * (origin name and address, quantity by type, date received) and each shipment sent (destination name and
 * address, quantity by type, date it left). Units logged at the site are grouped per day, source and sender; each
 * weighed lot is a shipment of its own; each load that left is a shipment sent.
 */
export async function shipmentRecordsContent(actor: TActor, { site: siteId, from, to }: Pick<TRecordsQuery, "site" | "from" | "to">) {
  const site = await siteFor(actor, siteId, "loads.read");
  const rulebook = getRulebook(site.rulebookId);
  const start = new Date(`${from}T00:00:00.000Z`);
  const end = new Date(Date.parse(`${to}T00:00:00.000Z`) + 86_400_000);
  const [units, lots, loads] = await Promise.all([
    db().unit.findMany({
      where: { siteId: site.id, receivedAt: { gte: start, lt: end }, state: { not: "rejected" } },
      select: { id: true, kind: true, nominalVoltage: true, source: true, senderName: true, senderAddress: true, receivedAt: true, batteryKg: true },
      orderBy: [{ receivedAt: "asc" }, { id: "asc" }],
    }),
    db().lot.findMany({ where: { siteId: site.id, receivedAt: { gte: start, lt: end } }, orderBy: [{ receivedAt: "asc" }, { id: "asc" }] }),
    db().load.findMany({
      where: { siteId: site.id, departedAt: { gte: start, lt: end }, state: { in: [...HAS_LEFT] } },
      include: { facility: true },
      orderBy: [{ departedAt: "asc" }, { reference: "asc" }],
    }),
  ]);

  // One shipment received per day, source and sender: units logged one by one from the same sender that day.
  const byDaySource = new Map<string, { date: string; source: string; senderName: string | null; senderAddress: string | null; units: TLoadUnit[] }>();
  for (const u of units) {
    const date = isoDay(u.receivedAt);
    const key = JSON.stringify([date, u.source, u.senderName, u.senderAddress]);
    const group = byDaySource.get(key) ?? { date, source: u.source, senderName: u.senderName, senderAddress: u.senderAddress, units: [] };
    group.units.push({ ...kindLabel(u.kind, u.nominalVoltage), containerLabel: "-", count: 1, massKg: u.batteryKg, leadKg: 0 });
    byDaySource.set(key, group);
  }
  const received = [
    ...[...byDaySource.values()].map((g) => ({
      date: g.date,
      counterpart: origin(g.senderName, g.senderAddress, NO_SENDER_ORIGIN[g.source] ?? `${SOURCE_LABEL.get(g.source) ?? g.source} (sender not recorded)`),
      quantities: quantities(g.units),
      reference: `units logged (${SOURCE_LABEL.get(g.source) ?? g.source})`,
    })),
    ...lots.map((l) => ({
      date: isoDay(l.receivedAt),
      counterpart: origin(l.senderName, l.senderAddress, LOT_NO_SENDER),
      quantities: quantities(lotEntries(l, "-")),
      reference: `scale ticket ${l.ticketNumber}`,
    })),
  ];
  const notes = [
    ...(units.some((u) => u.source === "core-return" && !u.senderName) ? [RECORDS_NOTES.household] : []),
    ...(units.some((u) => u.source !== "core-return" && !u.senderName) || lots.some((l) => !l.senderName) ? [RECORDS_NOTES.notRecorded] : []),
  ];
  const sent = [];
  for (const load of loads) {
    const entries = await loadEntries(db(), load.id);
    const summary = summariseLoad(entries.units, entries.containers);
    sent.push({
      date: isoDay(load.departedAt!),
      counterpart: party(load.facility),
      quantities: summary.byKind.map((k) => ({ type: typeOf(k), count: k.count, massKg: k.massKg })),
      reference: load.reference,
    });
  }
  const content = {
    rulebook: { id: rulebook.id, version: rulebook.version },
    handler: party(site),
    from,
    to,
    received,
    sent,
    ...(notes.length ? { notes } : {}),
  };
  return { site, content };
}

export type TShipmentRecords = { rows: TShipmentRecordRow[]; notes: string[]; csv: string; from: string; to: string };

/** The records as rows and CSV (not an issued paper: the CSV is an export of the records as they stand). */
export async function shipmentRecords(actor: TActor, query: Pick<TRecordsQuery, "site" | "from" | "to">): Promise<TShipmentRecords> {
  const { content } = await shipmentRecordsContent(actor, query);
  const input = { ...content, issuedAt: new Date().toISOString() };
  return { rows: shipmentRecordRows(input), notes: content.notes ?? [], csv: shipmentRecordsCsv(input), from: query.from, to: query.to };
}

/** The records as an issued paper (PDF), stored with its snapshot like every other paper. */
export function issueShipmentRecords(actor: TActor, query: Pick<TRecordsQuery, "site" | "from" | "to">): Promise<TIssued> {
  return withRenderSlot(async () => {
    const { site, content } = await shipmentRecordsContent(actor, query);
    if (!can(actor, "papers.issue", site.id)) throw new AppError("forbidden", "Your role at this site does not allow issuing papers.");
    return issue({ actor, siteId: site.id, loadId: null, kind: "records", content });
  });
}

export const ZDocumentQuery = z.object({
  site: z.string({ error: "site is required" }).trim().min(1, "site is required"),
  load: z.string().trim().min(1).optional(),
  kind: z.enum(DOCUMENT_KINDS, { error: `kind must be one of: ${DOCUMENT_KINDS.join(", ")}` }).optional(),
});

/** Issued documents of a site, newest first, with the person who issued each (from the trail). */
export async function listDocuments(actor: TActor, { siteId, loadId, kind, limit = 100 }: { siteId: string; loadId?: string; kind?: string; limit?: number }) {
  const site = await siteFor(actor, siteId, "loads.read");
  const documents = await db().document.findMany({
    where: { siteId: site.id, loadId, kind },
    orderBy: { issuedAt: "desc" },
    take: Math.min(limit, 500),
    select: { ...DOCUMENT_META, load: { select: { reference: true } } },
  });
  const events = await db().trailEvent.findMany({ where: { entity: "document", entityId: { in: documents.map((d) => d.id) }, action: "document.issued" }, select: { entityId: true, actorLabel: true } });
  const who = new Map(events.map((e) => [e.entityId, e.actorLabel]));
  return documents.map(({ load, ...d }) => ({ ...d, loadReference: load?.reference ?? null, issuedByLabel: who.get(d.id) ?? d.issuedBy }));
}

async function documentFor(actor: TActor, documentId: string) {
  const document = await db().document.findUnique({ where: { id: documentId } });
  const site = document ? await db().site.findUnique({ where: { id: document.siteId }, select: { organisationId: true } }) : null;
  if (!document || site?.organisationId !== actor.organisationId) throw new AppError("not_found", "No such document.");
  if (!can(actor, "loads.read", document.siteId)) throw new AppError("forbidden", "Your role at this site does not allow that.");
  return document;
}

export type TRegenerated = { document: TDocumentMeta; pdf: Buffer; regeneratedSha256: string; isIdentical: boolean };

/** Makes a stored document again from its snapshot and compares the bytes' hash with the one stored at issue. */
export function regenerateDocument(actor: TActor, documentId: string): Promise<TRegenerated> {
  return withRenderSlot(async () => {
    const { input, ...document } = await documentFor(actor, documentId);
    const pdf = await renderSnapshot(document.kind, JSON.parse(input));
    const regeneratedSha256 = sha256(pdf);
    return { document, pdf, regeneratedSha256, isIdentical: regeneratedSha256 === document.sha256 };
  });
}

/** A file name for a paper: kind and reference, plain characters only. */
export const paperFileName = (kind: string, reference: string) => `${kind}-${reference}`.replace(/[^A-Za-z0-9._-]/g, "_") + ".pdf";

/** The headers every served paper carries: which document it is and the hash it was issued with. */
export function paperHeaders(document: TDocumentMeta, fileName: string): Record<string, string> {
  return {
    "content-type": "application/pdf",
    "content-disposition": `inline; filename="${fileName}"`,
    "x-document-id": document.id,
    "x-document-sha256": document.sha256,
    "x-rulebook": `${document.rulebookId} ${document.rulebookVersion}`,
    "cache-control": "private, no-store",
  };
}
