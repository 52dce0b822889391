import { randomUUID } from "node:crypto";
import { z } from "zod";
import { can, type TAction, type TActor } from "@/lib/auth/permissions";
import { kindInfo, isBatteryKind } from "@/lib/chemistry";
import { AppError, type TFieldIssue } from "@/lib/errors";
import { reconcileWeights, type TWeightReconciliation } from "@/lib/loads/reconcile";
import { summariseLoad, type TLoadContainer, type TLoadSummary, type TLoadUnit } from "@/lib/loads/summarise-load";
import {
  TRANSPORT_BASIS_IDS,
  applicableItems,
  checkBasis,
  loadFactsOf,
  transportBasis,
  type TBasisCheck,
  type TTransportBasis,
  type TTransportBasisId,
} from "@/lib/loads/transport-basis";
import { lbToKg } from "@/lib/units";
import { db, type TDb, type TTx } from "./client";
import { fromPrismaError } from "./errors";
import { siteFor } from "./sites";
import { addTotals, changeSiteLevel, incrementBy, negate, ZERO_TOTALS, type TTotals } from "./totals";
import { writeTrail } from "./trail";

/** DESIGN.md §3: a load's life. */
export const LOAD_STATES = ["planning", "ready", "departed", "delivered", "reconciled"] as const;
export type TLoadState = (typeof LOAD_STATES)[number];

const MAX_KG = 100_000;
const siteId = z.string({ error: "site is required" }).trim().min(1, "site is required");
const id = (what: string) => z.string({ error: `${what} is required` }).trim().min(1, `${what} is required`);
const REFERENCE_MESSAGE = "the reference must be 1 to 40 plain characters (letters, digits, - / .)";
const reference = z.string({ error: REFERENCE_MESSAGE }).trim().regex(/^[\x21-\x7e](?:[\x20-\x7e]{0,38}[\x21-\x7e])?$/, REFERENCE_MESSAGE);
const vehicle = z.string({ error: "vehicle must be text" }).trim().max(120, "vehicle must be at most 120 characters");
const basis = z.enum(TRANSPORT_BASIS_IDS, { error: `basis must be one of: ${TRANSPORT_BASIS_IDS.join(", ")}` });
const kg = (what: string) =>
  z.number({ error: `${what} must be a number of kg` }).positive(`${what} must be more than 0 kg`).max(MAX_KG, `${what} must be at most 100 000 kg`);
const lb = (what: string) =>
  z.number({ error: `${what} must be a number of lb` }).positive(`${what} must be more than 0 lb`).max(MAX_KG / 0.45359237, `${what} must be at most 220 462 lb`);
const isoDate = z.iso.date({ message: "must be a date as YYYY-MM-DD" });
const note = z.string({ error: "the note must be text" }).trim().max(500, "the note must be at most 500 characters");

export const ZLoadCreate = z.object({
  site: siteId,
  facilityId: id("the receiving facility"),
  carrierId: z.string().trim().min(1).optional(),
  /** Left out: the next free reference at the site, LD-<year>-<nnnn>. */
  reference: reference.optional(),
  vehicle: vehicle.default(""),
  basis: basis.optional(),
});
export type TLoadCreate = z.output<typeof ZLoadCreate>;

/** Edits while planning, or a state change on its own: `ready` (through the checklist gate) or back to `planning`. */
export const ZLoadPatch = z
  .object({
    facilityId: id("the receiving facility").optional(),
    carrierId: z.string().trim().min(1).nullable().optional(),
    vehicle: vehicle.optional(),
    basis: basis.optional(),
    /** Ticks (true) and unticks (false) checklist items of the load's basis; items not named keep their state. */
    checklist: z.record(z.string(), z.boolean({ error: "each checklist item is true (confirmed) or false" })).optional(),
    state: z.enum(["planning", "ready"], { error: "state can be set to ready or back to planning here; departure and receipt have their own routes" }).optional(),
  })
  .superRefine((v, ctx) => {
    const fields = (["facilityId", "carrierId", "vehicle", "basis", "checklist"] as const).filter((k) => v[k] !== undefined);
    if (v.state !== undefined && fields.length > 0) ctx.addIssue({ code: "custom", path: ["state"], message: "send a state change on its own, without other changes" });
    if (v.state === undefined && fields.length === 0) ctx.addIssue({ code: "custom", path: ["(body)"], message: "send at least one of: facilityId, carrierId, vehicle, basis, checklist, state" });
  });
export type TLoadPatch = z.output<typeof ZLoadPatch>;

export const ZLoadContainersAdd = z.object({
  containerIds: z.array(z.string().trim().min(1, "a container id is empty"), { error: "containerIds must be a list of container ids" }).min(1, "choose at least one container").max(200, "at most 200 containers at a time"),
});

const nowWithin = (d: Date) => d.getTime() <= Date.now() + 5 * 60_000;

/** Departure: the time it left (default now) and, if the load was weighed on the way out, the scale weight in kg or lb. */
export const ZDeparture = z
  .object({
    departedAt: z.iso.datetime({ offset: true, message: "departedAt must be an ISO 8601 date-time" }).optional(),
    departureScaleKg: kg("the departure scale weight").optional(),
    departureScaleLb: lb("the departure scale weight").optional(),
  })
  .superRefine((v, ctx) => {
    if (v.departureScaleKg !== undefined && v.departureScaleLb !== undefined) ctx.addIssue({ code: "custom", path: ["departureScaleLb"], message: "give the weight in kg or in lb, not both" });
    if (v.departedAt !== undefined && !nowWithin(new Date(v.departedAt))) ctx.addIssue({ code: "custom", path: ["departedAt"], message: "the departure time cannot be in the future" });
  })
  .transform((v) => ({
    departedAt: v.departedAt === undefined ? undefined : new Date(v.departedAt),
    departureScaleKg: v.departureScaleKg ?? (v.departureScaleLb === undefined ? undefined : lbToKg(v.departureScaleLb)),
  }));
export type TDeparture = z.output<typeof ZDeparture>;

/** The receiving facility's scale weight (net, kg or lb) and the date it received the load. */
export const ZReceipt = z
  .object({
    receivedKg: kg("the received weight").optional(),
    receivedLb: lb("the received weight").optional(),
    receivedAt: isoDate,
  })
  .superRefine((v, ctx) => {
    if ((v.receivedKg === undefined) === (v.receivedLb === undefined)) ctx.addIssue({ code: "custom", path: ["receivedKg"], message: "give the received weight, in kg or in lb (one of them)" });
  })
  .transform((v) => ({ receivedKg: v.receivedKg ?? lbToKg(v.receivedLb!), receivedAt: v.receivedAt }));
export type TReceipt = z.output<typeof ZReceipt>;

export const ZReconcile = z.object({ note: note.default("") });

/** A correction never overwrites: it is a trail event of its own, and the load shows the corrected value beside the recorded one. */
export const ZCorrection = z.discriminatedUnion(
  "field",
  [
    z.object({ field: z.literal("receivedKg"), value: kg("the corrected received weight"), note: note.min(1, "say why: e.g. the facility reissued its scale ticket") }),
    z.object({ field: z.literal("departureScaleKg"), value: kg("the corrected departure scale weight"), note: note.min(1, "say why: e.g. the facility reissued its scale ticket") }),
    z.object({ field: z.literal("receivedAt"), value: isoDate, note: note.min(1, "say why: e.g. the facility reissued its scale ticket") }),
  ],
  { error: "field must be one of: receivedKg, departureScaleKg, receivedAt" },
);
export type TCorrection = z.output<typeof ZCorrection>;

export const ZLoadQuery = z.object({
  site: siteId,
  state: z.enum(LOAD_STATES, { error: `state must be one of: ${LOAD_STATES.join(", ")}` }).optional(),
});

const conflict = (message: string, issues: TFieldIssue[] = []) => new AppError("conflict", message, issues);
const invalid = (field: string, message: string, summary = "Some fields need fixing.") => new AppError("invalid_input", summary, [{ field, message }]);

/** The bases offered under a site's rulebook: US bases under the US federal one, ADR bases under the EU one, all under a custom one. */
export function basesForRulebook(rulebookId: string): TTransportBasis[] {
  const region = rulebookId.startsWith("us") ? "us" : rulebookId.startsWith("eu") ? "eu" : null;
  return TRANSPORT_BASIS_IDS.map((b) => transportBasis(b)).filter((b) => region === null || b.region === region);
}

/** A load for an action, or refused as siteFor does: another organisation's (or none) is "not found"; a site without the role is "forbidden". */
export async function loadFor(actor: TActor, loadId: string, action: TAction) {
  const load = await db().load.findUnique({ where: { id: loadId }, include: { site: true } });
  if (!load || load.site.organisationId !== actor.organisationId) throw new AppError("not_found", "No such load.");
  if (!can(actor, action, load.siteId)) throw new AppError("forbidden", "Your role at this site does not allow that.");
  return load;
}

type TLoadRow = NonNullable<Awaited<ReturnType<TDb["load"]["findUnique"]>>>;

const STATE_WORDS: Record<string, string> = { planning: "being planned", ready: "ready", departed: "departed", delivered: "delivered", reconciled: "reconciled" };

/** Refuses a change in a state that does not allow it; a reconciled load refuses every change. */
function assertState(load: { state: string; reference: string }, allowed: readonly TLoadState[], what: string) {
  if (load.state === "reconciled") throw conflict(`Load ${load.reference} is reconciled and read-only; record a correction instead.`, [{ field: "state", message: "a reconciled load cannot be changed" }]);
  if (!(allowed as readonly string[]).includes(load.state)) {
    throw conflict(`Load ${load.reference} is ${STATE_WORDS[load.state] ?? load.state}; ${what} only while it is ${allowed.join(" or ")}.`, [{ field: "state", message: `the load is ${load.state}` }]);
  }
}

/**
 * Locks the load row for the rest of the transaction, guarded on the state read before it: a concurrent
 * transition makes this one fail with 409 instead of acting on a state that is gone. Reads that decide the
 * change come after it.
 */
async function guard(tx: TTx, load: { id: string; state: string; reference: string }, data: Record<string, unknown> = {}) {
  const { count } = await tx.load.updateMany({ where: { id: load.id, state: load.state }, data: { state: load.state, ...data } });
  if (count !== 1) throw conflict(`Load ${load.reference} changed meanwhile; reload and try again.`);
}

type TKindLabel = { kind: string; isNonSpillable: boolean };

/** A unit's kind as the papers list it, e.g. "Flooded starting 12 V", and its default transport class (lib/chemistry KINDS). */
export function kindLabel(kind: string, nominalVoltage: number): TKindLabel {
  if (!isBatteryKind(kind)) return { kind: `${kind} ${nominalVoltage} V`, isNonSpillable: false };
  const info = kindInfo(kind);
  return { kind: `${info.label} ${nominalVoltage} V`, isNonSpillable: info.isNonSpillable };
}

type TLotMixPart = { kind: string; nominalVoltage: number; units: number; massKg: number };

/**
 * A weighed lot as entries by kind: its count split by the stored mix (largest remainder, so the counts add
 * up to the lot's), its net weight by the mix's mass shares, and its lead in proportion to mass.
 */
export function lotEntries(lot: { id: string; unitCount: number; netKg: number; leadKg: number; leadKgLow: number; leadKgHigh: number; mix: string }, containerLabel: string): TLoadUnit[] {
  let parts: TLotMixPart[] = [];
  try {
    parts = (JSON.parse(lot.mix) as TLotMixPart[]).filter((p) => p && p.units > 0 && p.massKg > 0);
  } catch {
    parts = [];
  }
  if (parts.length === 0) parts = [{ kind: "flooded", nominalVoltage: 12, units: lot.unitCount, massKg: lot.netKg }];
  const unitSum = parts.reduce((s, p) => s + p.units, 0);
  const massSum = parts.reduce((s, p) => s + p.massKg, 0);
  const exact = parts.map((p) => (p.units / unitSum) * lot.unitCount);
  const counts = exact.map(Math.floor);
  let left = lot.unitCount - counts.reduce((s, c) => s + c, 0);
  [...exact.keys()].sort((a, b) => exact[b]! - Math.floor(exact[b]!) - (exact[a]! - Math.floor(exact[a]!))).forEach((i) => {
    if (left > 0) {
      counts[i]!++;
      left--;
    }
  });
  // A kind whose share rounds to no unit is counted with the largest part, so no mass goes missing.
  const largest = counts.indexOf(Math.max(...counts));
  const mass = parts.map((p) => (p.massKg / massSum) * lot.netKg);
  const entries: TLoadUnit[] = [];
  parts.forEach((p, i) => {
    if (counts[i] === 0) {
      mass[largest]! += mass[i]!;
      mass[i] = 0;
    }
  });
  parts.forEach((p, i) => {
    if (counts[i] === 0) return;
    const share = mass[i]! / lot.netKg;
    entries.push({
      id: `${lot.id}#${i + 1}`,
      ...kindLabel(p.kind, p.nominalVoltage),
      containerLabel,
      count: counts[i]!,
      massKg: mass[i]!,
      leadKg: lot.leadKg * share,
      leadKgLow: lot.leadKgLow * share,
      leadKgHigh: lot.leadKgHigh * share,
      condition: "intact",
    });
  });
  return entries;
}

export type TLoadEntries = { containers: (TLoadContainer & { id: string })[]; units: TLoadUnit[] };

/**
 * What a load carries, as the pure load libraries take it: its containers (by label) and one entry per unit
 * (mass = the unit's battery mass) or per kind of a weighed lot. The order is fixed — containers by label,
 * units by intake time then id — so a paper built from it is the same every time.
 */
export async function loadEntries(client: TDb | TTx, loadId: string): Promise<TLoadEntries> {
  const containers = await client.container.findMany({ where: { loadId }, orderBy: { labelNumber: "asc" }, select: { id: true, labelNumber: true, kind: true, isClosed: true } });
  const ids = containers.map((c) => c.id);
  const [units, lots] = await Promise.all([
    client.unit.findMany({
      where: { containerId: { in: ids } },
      orderBy: [{ receivedAt: "asc" }, { id: "asc" }],
      select: { id: true, containerId: true, kind: true, nominalVoltage: true, condition: true, batteryKg: true, leadKg: true, leadKgLow: true, leadKgHigh: true },
    }),
    client.lot.findMany({ where: { containerId: { in: ids } }, orderBy: [{ receivedAt: "asc" }, { id: "asc" }] }),
  ]);
  const order = new Map(ids.map((cid, i) => [cid, i]));
  const label = new Map(containers.map((c) => [c.id, c.labelNumber]));
  const entries: { at: number; entry: TLoadUnit }[] = [];
  for (const u of units) {
    entries.push({
      at: order.get(u.containerId!)!,
      entry: {
        id: u.id,
        ...kindLabel(u.kind, u.nominalVoltage),
        containerLabel: label.get(u.containerId!)!,
        count: 1,
        massKg: u.batteryKg,
        leadKg: u.leadKg,
        leadKgLow: u.leadKgLow,
        leadKgHigh: u.leadKgHigh,
        condition: u.condition as TLoadUnit["condition"],
      },
    });
  }
  for (const l of lots) for (const entry of lotEntries(l, label.get(l.containerId!)!)) entries.push({ at: order.get(l.containerId!)!, entry });
  // Array.prototype.sort is stable: within a container, units keep their intake order, then lots.
  entries.sort((a, b) => a.at - b.at);
  return {
    containers: containers.map((c) => ({ id: c.id, labelNumber: c.labelNumber, kind: c.kind as TLoadContainer["kind"], isClosed: c.isClosed })),
    units: entries.map((e) => e.entry),
  };
}

export const checklistOf = (load: { checklist: string }): Record<string, boolean> => {
  try {
    const parsed = JSON.parse(load.checklist) as unknown;
    if (parsed && typeof parsed === "object" && !Array.isArray(parsed)) return Object.fromEntries(Object.entries(parsed).filter(([, v]) => v === true)) as Record<string, boolean>;
  } catch {
    // an unreadable checklist counts as nothing ticked
  }
  return {};
};

export type TGate = {
  /** the checklist gate of the basis (null until a basis is chosen) */
  check: TBasisCheck | null;
  isReady: boolean;
  issues: TFieldIssue[];
};

/** Whether a load may be marked ready: a basis chosen, and checkBasis complete with no blockers. */
export function gateOf({ basis: basisId, checklist, summary, emergencyPhone }: { basis: string | null; checklist: Record<string, boolean>; summary: TLoadSummary; emergencyPhone: string | null }): TGate {
  if (!basisId) return { check: null, isReady: false, issues: [{ field: "basis", message: "choose a transport basis" }] };
  const check = checkBasis({ basis: basisId, checklist, load: loadFactsOf({ summary, emergencyPhone }) });
  const issues: TFieldIssue[] = [
    ...check.blockers.map((b) => ({ field: "load", message: `${b.message} (${b.citation})` })),
    ...check.missing.map((m) => ({ field: `checklist.${m.id}`, message: `not yet confirmed: ${m.text}` })),
  ];
  return { check, isReady: check.isReady, issues };
}

type TCorrectionEvent = { at: Date; actorLabel: string; field: TCorrection["field"]; from: unknown; to: unknown; note: string };

export type TEffective = { departureScaleKg: number | null; receivedKg: number | null; receivedAt: string | null };

const isoDay = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : null);

/** The recorded values with every correction applied in order: corrections never overwrite the load itself. */
function effectiveValues(load: { departureScaleKg: number | null; receivedKg: number | null; receivedAt: Date | null }, corrections: TCorrectionEvent[]): TEffective {
  const values: TEffective = { departureScaleKg: load.departureScaleKg, receivedKg: load.receivedKg, receivedAt: isoDay(load.receivedAt) };
  for (const c of corrections) {
    if (c.field === "receivedAt") values.receivedAt = String(c.to);
    else values[c.field] = Number(c.to);
  }
  return values;
}

async function correctionsOf(client: TDb | TTx, loadId: string): Promise<TCorrectionEvent[]> {
  const events = await client.trailEvent.findMany({ where: { entity: "load", entityId: loadId, action: "load.corrected" }, orderBy: { at: "asc" } });
  return events.map((e) => {
    const after = JSON.parse(e.after ?? "{}") as { field: TCorrection["field"]; value: unknown; note: string };
    const before = JSON.parse(e.before ?? "{}") as { value: unknown };
    return { at: e.at, actorLabel: e.actorLabel, field: after.field, from: before.value, to: after.value, note: after.note };
  });
}

function reconciliationOf(summary: TLoadSummary, effective: TEffective, tolerancePct: number): TWeightReconciliation | null {
  if (effective.receivedKg === null || summary.massKg <= 0) return null;
  return reconcileWeights({ estimatedKg: summary.massKg, departureScaleKg: effective.departureScaleKg, receivedKg: effective.receivedKg, tolerancePct });
}

/** Everything the load page and the API show about one load. */
export async function getLoad(actor: TActor, loadId: string) {
  const found = await loadFor(actor, loadId, "loads.read");
  return loadView(found.id);
}

export type TLoadView = Awaited<ReturnType<typeof loadView>>;

async function loadView(loadId: string) {
  const client = db();
  const load = await client.load.findUniqueOrThrow({
    where: { id: loadId },
    include: { site: { include: { organisation: { select: { id: true, name: true, emergencyPhone: true } } } }, facility: true, carrier: true },
  });
  const [entries, containers, corrections, documents, history] = await Promise.all([
    loadEntries(client, load.id),
    client.container.findMany({ where: { loadId: load.id }, orderBy: { labelNumber: "asc" }, include: { bay: { select: { id: true, name: true } } } }),
    correctionsOf(client, load.id),
    client.document.findMany({ where: { loadId: load.id }, orderBy: { issuedAt: "desc" }, select: { id: true, kind: true, rulebookId: true, rulebookVersion: true, sha256: true, issuedAt: true, issuedBy: true } }),
    client.trailEvent.findMany({ where: { entity: "load", entityId: load.id }, orderBy: { at: "asc" }, take: 500 }),
  ]);
  const summary = summariseLoad(entries.units, entries.containers);
  const checklist = checklistOf(load);
  const emergencyPhone = load.site.organisation.emergencyPhone;
  const gate = gateOf({ basis: load.basis, checklist, summary, emergencyPhone });
  const basis = load.basis ? transportBasis(load.basis) : null;
  const facts = loadFactsOf({ summary, emergencyPhone });
  const effective = effectiveValues(load, corrections);
  const { site, facility, carrier, ...row } = load;
  return {
    load: { ...row, checklist },
    site: { id: site.id, name: site.name, address: site.address, unitSystem: site.unitSystem, rulebookId: site.rulebookId },
    facility,
    carrier,
    emergencyPhone,
    containers: containers.map((c) => ({
      id: c.id,
      labelNumber: c.labelNumber,
      kind: c.kind,
      isClosed: c.isClosed,
      state: c.state,
      bay: c.bay,
      sealedAt: c.sealedAt,
      accumulationStart: c.accumulationStart,
      unitCount: c.unitCount,
      batteryKg: c.batteryKg,
      leadKg: c.leadKg,
    })),
    summary,
    bases: basesForRulebook(site.rulebookId).map((b) => ({ id: b.id, title: b.title, citation: b.citation, region: b.region })),
    basis: basis && {
      id: basis.id,
      title: basis.title,
      citation: basis.citation,
      statement: basis.statement,
      items: applicableItems(basis, facts).map((item) => ({ id: item.id, text: item.text, citation: item.citation, isConfirmed: checklist[item.id] === true })),
    },
    gate,
    effective,
    corrections,
    reconciliation: reconciliationOf(summary, effective, facility.tolerancePct),
    documents,
    history: history.map((e) => ({ id: e.id, at: e.at, actorLabel: e.actorLabel, action: e.action, before: e.before ? JSON.parse(e.before) : null, after: e.after ? JSON.parse(e.after) : null })),
  };
}

/** Loads at a site, newest first, with what each carries from its containers' running totals. */
export async function listLoads(actor: TActor, { siteId, state }: { siteId: string; state?: TLoadState }) {
  const site = await siteFor(actor, siteId, "loads.read");
  const loads = await db().load.findMany({
    where: { siteId: site.id, state },
    orderBy: { createdAt: "desc" },
    take: 200,
    include: { facility: { select: { id: true, name: true, tolerancePct: true } }, carrier: { select: { id: true, name: true } }, containers: { select: { unitCount: true, batteryKg: true, leadKg: true } } },
  });
  return loads.map(({ containers, ...l }) => {
    const carried = containers.reduce((s, c) => ({ unitCount: s.unitCount + c.unitCount, batteryKg: s.batteryKg + c.batteryKg, leadKg: s.leadKg + c.leadKg }), { unitCount: 0, batteryKg: 0, leadKg: 0 });
    const reconciliation =
      l.receivedKg !== null && carried.batteryKg > 0
        ? reconcileWeights({ estimatedKg: carried.batteryKg, departureScaleKg: l.departureScaleKg, receivedKg: l.receivedKg, tolerancePct: l.facility.tolerancePct })
        : null;
    return { ...l, checklist: checklistOf(l), containerCount: containers.length, ...carried, isFlagged: reconciliation?.isFlagged ?? null };
  });
}

async function nextReference(tx: TTx, siteId: string, year: number) {
  const prefix = `LD-${year}-`;
  const taken = await tx.load.findMany({ where: { siteId, reference: { startsWith: prefix } }, select: { reference: true } });
  const highest = taken.reduce((max, l) => Math.max(max, Number(l.reference.slice(prefix.length)) || 0), 0);
  return `${prefix}${String(highest + 1).padStart(4, "0")}`;
}

async function facilityOf(client: TDb | TTx, actor: TActor, facilityId: string) {
  const facility = await client.facility.findUnique({ where: { id: facilityId } });
  if (!facility || facility.organisationId !== actor.organisationId) throw invalid("facilityId", "choose a receiving facility of your organisation (Setup → Receiving facilities)");
  return facility;
}

async function carrierOf(client: TDb | TTx, actor: TActor, carrierId: string) {
  const carrier = await client.carrier.findUnique({ where: { id: carrierId } });
  if (!carrier || carrier.organisationId !== actor.organisationId) throw invalid("carrierId", "choose a carrier of your organisation (Setup → Carriers)");
  return carrier;
}

function assertBasisAllowed(rulebookId: string, basisId: string) {
  const allowed = basesForRulebook(rulebookId).map((b) => b.id);
  if (!allowed.includes(basisId as TTransportBasisId)) throw invalid("basis", `under the site's rulebook (${rulebookId}) the basis is one of: ${allowed.join(", ")}`);
}

/** Plans a new load at a site for a receiving facility. A reference left out is the next LD-<year>-<nnnn>. */
export async function createLoad(actor: TActor, input: TLoadCreate, { at }: { at?: Date } = {}) {
  const site = await siteFor(actor, input.site, "loads.write");
  const facility = await facilityOf(db(), actor, input.facilityId);
  if (input.carrierId) await carrierOf(db(), actor, input.carrierId);
  if (input.basis) assertBasisAllowed(site.rulebookId, input.basis);
  if (input.reference && (await db().load.findUnique({ where: { siteId_reference: { siteId: site.id, reference: input.reference } } }))) {
    throw invalid("reference", `reference ${input.reference} is already used by a load at this site`);
  }
  const now = at ?? new Date();
  // Two loads planned at once may pick the same next reference: the unique index refuses one, which tries again.
  for (let attempt = 1; ; attempt++) {
    try {
      const created = await db().$transaction(async (tx) => {
        const load = await tx.load.create({
          data: {
            id: randomUUID(),
            siteId: site.id,
            facilityId: facility.id,
            carrierId: input.carrierId ?? null,
            reference: input.reference ?? (await nextReference(tx, site.id, now.getUTCFullYear())),
            vehicle: input.vehicle,
            basis: input.basis ?? null,
            createdAt: now,
          },
        });
        await writeTrail(tx, actor, { siteId: site.id, action: "load.created", entity: "load", entityId: load.id, after: load, at: now });
        return load;
      });
      return loadView(created.id);
    } catch (error) {
      const mapped = fromPrismaError(error);
      if (mapped?.code === "conflict" && !input.reference && attempt < 5) continue;
      if (mapped?.code === "conflict") throw invalid("reference", "that reference is already used by a load at this site");
      throw error;
    }
  }
}

/** Edits a planning load, or moves it to ready (through the gate) or back to planning. */
export async function updateLoad(actor: TActor, loadId: string, patch: TLoadPatch) {
  const load = await loadFor(actor, loadId, "loads.write");
  if (patch.state === "ready") return markReady(actor, load);
  if (patch.state === "planning") return backToPlanning(actor, load);
  assertState(load, ["planning"], "it can be edited");

  const data: { facilityId?: string; carrierId?: string | null; vehicle?: string; basis?: string; checklist?: string } = {};
  if (patch.facilityId !== undefined && patch.facilityId !== load.facilityId) data.facilityId = (await facilityOf(db(), actor, patch.facilityId)).id;
  if (patch.carrierId !== undefined && patch.carrierId !== load.carrierId) data.carrierId = patch.carrierId === null ? null : (await carrierOf(db(), actor, patch.carrierId)).id;
  if (patch.vehicle !== undefined && patch.vehicle !== load.vehicle) data.vehicle = patch.vehicle;
  let checklist = checklistOf(load);
  let basisId = load.basis;
  if (patch.basis !== undefined && patch.basis !== load.basis) {
    assertBasisAllowed(load.site.rulebookId, patch.basis);
    // Another basis asks other questions: a person confirms its checklist afresh.
    basisId = data.basis = patch.basis;
    checklist = {};
    data.checklist = "{}";
  }
  if (patch.checklist !== undefined) {
    if (!basisId) throw invalid("basis", "choose a transport basis before ticking its checklist");
    const known = new Set(transportBasis(basisId).checklist.map((i) => i.id));
    const unknown = Object.keys(patch.checklist).filter((k) => !known.has(k));
    if (unknown.length) {
      throw new AppError("invalid_input", "Some checklist items are not part of this basis.", unknown.map((k) => ({ field: `checklist.${k}`, message: `not an item of the ${basisId} checklist` })));
    }
    checklist = { ...checklist };
    for (const [k, v] of Object.entries(patch.checklist)) {
      if (v) checklist[k] = true;
      else delete checklist[k];
    }
    data.checklist = JSON.stringify(checklist);
  }
  if (Object.keys(data).length > 0) {
    await db().$transaction(async (tx) => {
      await guard(tx, load, data);
      const before = Object.fromEntries(Object.keys(data).map((k) => [k, k === "checklist" ? checklistOf(load) : load[k as keyof typeof data]]));
      const after = { ...data, ...(data.checklist !== undefined ? { checklist } : {}) };
      await writeTrail(tx, actor, { siteId: load.siteId, action: "load.updated", entity: "load", entityId: load.id, before, after });
    });
  }
  return loadView(load.id);
}

async function markReady(actor: TActor, load: TLoadRow & { reference: string }) {
  if (load.state === "ready") return loadView(load.id);
  assertState(load, ["planning"], "it can be marked ready");
  await db().$transaction(async (tx) => {
    await guard(tx, load);
    const gate = await gateIn(tx, load);
    if (!gate.isReady) throw conflict(`Load ${load.reference} is not ready to ship yet.`, gate.issues);
    await tx.load.update({ where: { id: load.id }, data: { state: "ready" } });
    await writeTrail(tx, actor, { siteId: load.siteId, action: "load.ready", entity: "load", entityId: load.id, before: { state: "planning" }, after: { state: "ready", basis: load.basis, checklist: checklistOf(load) } });
  });
  return loadView(load.id);
}

async function backToPlanning(actor: TActor, load: TLoadRow & { reference: string }) {
  if (load.state === "planning") return loadView(load.id);
  assertState(load, ["ready"], "it can go back to planning");
  await db().$transaction(async (tx) => {
    await guard(tx, load, { state: "planning" });
    await writeTrail(tx, actor, { siteId: load.siteId, action: "load.unready", entity: "load", entityId: load.id, before: { state: "ready" }, after: { state: "planning" } });
  });
  return loadView(load.id);
}

/** The gate, read inside a transaction (after the guard), from what is on the load now. */
async function gateIn(tx: TTx, load: { id: string; siteId: string; basis: string | null; checklist: string }) {
  const [entries, site] = await Promise.all([
    loadEntries(tx, load.id),
    tx.site.findUniqueOrThrow({ where: { id: load.siteId }, include: { organisation: { select: { emergencyPhone: true } } } }),
  ]);
  const fresh = await tx.load.findUniqueOrThrow({ where: { id: load.id }, select: { basis: true, checklist: true } });
  return gateOf({ basis: fresh.basis, checklist: checklistOf(fresh), summary: summariseLoad(entries.units, entries.containers), emergencyPhone: site.organisation.emergencyPhone });
}

/**
 * Puts sealed containers on a planning load. Each is claimed with one conditional update (sealed and on no
 * load) inside the transaction: when two loads claim the same container at once exactly one update matches,
 * and the other request fails with 409, its whole transaction rolled back. Their units and lots become `loaded`.
 */
export async function addContainers(actor: TActor, loadId: string, { containerIds }: z.output<typeof ZLoadContainersAdd>, { at }: { at?: Date } = {}) {
  const load = await loadFor(actor, loadId, "loads.write");
  assertState(load, ["planning"], "containers can be added");
  const ids = [...new Set(containerIds)];
  const now = at ?? new Date();
  await db().$transaction(async (tx) => {
    await guard(tx, load);
    const found = await tx.container.findMany({ where: { id: { in: ids }, siteId: load.siteId } });
    const byId = new Map(found.map((c) => [c.id, c]));
    const missing = ids.filter((cid) => !byId.has(cid));
    // The same answer whether the id exists at another site or not at all.
    if (missing.length) throw invalid("containerIds", `not at this site: ${missing.slice(0, 5).join(", ")}${missing.length > 5 ? ` and ${missing.length - 5} more` : ""}`, "Not found at this site.");
    const refused = found.filter((c) => c.state !== "sealed" || c.loadId !== null);
    if (refused.length) {
      throw conflict(
        "Only sealed containers that are on no other load can be added.",
        refused.map((c) => ({ field: "containerIds", message: c.loadId === load.id ? `${c.labelNumber} is already on this load` : c.loadId ? `${c.labelNumber} is already on another load` : `${c.labelNumber} is ${c.state}; seal it in the Yard first` })),
      );
    }
    for (const c of found) {
      const { count } = await tx.container.updateMany({ where: { id: c.id, state: "sealed", loadId: null }, data: { state: "loaded", loadId: load.id } });
      if (count !== 1) throw conflict(`Container ${c.labelNumber} was put on another load meanwhile; nothing was changed.`, [{ field: "containerIds", message: `${c.labelNumber} is already on another load` }]);
      await tx.unit.updateMany({ where: { containerId: c.id, state: "stowed" }, data: { state: "loaded" } });
      await tx.lot.updateMany({ where: { containerId: c.id, state: "stowed" }, data: { state: "loaded" } });
      await writeTrail(tx, actor, {
        siteId: load.siteId,
        action: "load.container-added",
        entity: "load",
        entityId: load.id,
        before: { containerId: c.id, labelNumber: c.labelNumber, state: c.state },
        after: { containerId: c.id, labelNumber: c.labelNumber, state: "loaded", unitCount: c.unitCount, batteryKg: c.batteryKg },
        at: now,
      });
    }
  });
  return loadView(load.id);
}

/** Takes a container off a planning load: it is sealed again and free for another load; its units go back to `stowed`. */
export async function removeContainer(actor: TActor, loadId: string, containerId: string) {
  const load = await loadFor(actor, loadId, "loads.write");
  assertState(load, ["planning"], "containers can be taken off");
  await db().$transaction(async (tx) => {
    await guard(tx, load);
    const c = await tx.container.findUnique({ where: { id: containerId } });
    if (!c || c.loadId !== load.id) throw new AppError("not_found", "That container is not on this load.");
    const { count } = await tx.container.updateMany({ where: { id: c.id, loadId: load.id, state: "loaded" }, data: { state: "sealed", loadId: null } });
    if (count !== 1) throw conflict(`Container ${c.labelNumber} changed meanwhile; reload and try again.`);
    await tx.unit.updateMany({ where: { containerId: c.id, state: "loaded" }, data: { state: "stowed" } });
    await tx.lot.updateMany({ where: { containerId: c.id, state: "loaded" }, data: { state: "stowed" } });
    await writeTrail(tx, actor, {
      siteId: load.siteId,
      action: "load.container-removed",
      entity: "load",
      entityId: load.id,
      before: { containerId: c.id, labelNumber: c.labelNumber, state: "loaded" },
      after: { containerId: c.id, labelNumber: c.labelNumber, state: "sealed" },
    });
  });
  return loadView(load.id);
}

/**
 * The load leaves the site: in one transaction the containers become `departed`, their units and lots
 * `departed`, each bay gives up what its containers held, and the site's on-hand totals go down by exactly
 * what left — recounted from the units and lots on the load — through the level ledger (reason `departure`).
 */
export async function departLoad(actor: TActor, loadId: string, input: TDeparture) {
  const load = await loadFor(actor, loadId, "loads.write");
  assertState(load, ["ready"], "it can depart");
  const departedAt = input.departedAt ?? new Date();
  // To the minute: a time typed into a form has no seconds.
  if (departedAt.getTime() < Math.floor(load.createdAt.getTime() / 60_000) * 60_000) {
    throw invalid("departedAt", `the load was planned at ${load.createdAt.toISOString().slice(0, 16)} UTC; it cannot have left before that`);
  }
  await db().$transaction(async (tx) => {
    await guard(tx, load);
    // The gate again: the emergency number or a container may have changed since the load was marked ready.
    const gate = await gateIn(tx, load);
    if (!gate.isReady) throw conflict(`Load ${load.reference} no longer passes its checklist; set it back to planning and check it.`, gate.issues);
    const containers = await tx.container.findMany({ where: { loadId: load.id } });
    const ids = containers.map((c) => c.id);
    const sums = { batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } as const;
    const [unitGroups, lotGroups] = await Promise.all([
      tx.unit.groupBy({ by: ["containerId"], where: { containerId: { in: ids }, state: "loaded" }, _count: { _all: true }, _sum: sums }),
      tx.lot.groupBy({ by: ["containerId"], where: { containerId: { in: ids }, state: "loaded" }, _sum: { unitCount: true, netKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
    ]);
    const left = new Map<string, TTotals>();
    const add = (cid: string | null, t: TTotals) => cid && left.set(cid, addTotals(left.get(cid) ?? ZERO_TOTALS, t));
    for (const g of unitGroups) {
      add(g.containerId, { unitCount: g._count?._all ?? 0, batteryKg: g._sum.batteryKg ?? 0, leadKg: g._sum.leadKg ?? 0, electrolyteKg: g._sum.electrolyteKg ?? 0, acidKg: g._sum.acidKg ?? 0 });
    }
    for (const g of lotGroups) {
      add(g.containerId, { unitCount: g._sum.unitCount ?? 0, batteryKg: g._sum.netKg ?? 0, leadKg: g._sum.leadKg ?? 0, electrolyteKg: g._sum.electrolyteKg ?? 0, acidKg: g._sum.acidKg ?? 0 });
    }
    let total = ZERO_TOTALS;
    for (const c of containers) {
      const t = left.get(c.id) ?? ZERO_TOTALS;
      total = addTotals(total, t);
      if (c.bayId) await tx.bay.update({ where: { id: c.bayId }, data: incrementBy(negate(t)) });
    }
    const moved = await tx.container.updateMany({ where: { loadId: load.id, state: "loaded" }, data: { state: "departed" } });
    if (moved.count !== containers.length) throw conflict(`Load ${load.reference} changed meanwhile; reload and try again.`);
    await tx.unit.updateMany({ where: { containerId: { in: ids }, state: "loaded" }, data: { state: "departed" } });
    await tx.lot.updateMany({ where: { containerId: { in: ids }, state: "loaded" }, data: { state: "departed" } });
    await tx.load.update({ where: { id: load.id }, data: { state: "departed", departedAt, departureScaleKg: input.departureScaleKg ?? null } });
    const siteTotals = await changeSiteLevel(tx, { siteId: load.siteId, delta: negate(total), reason: "departure", refId: load.id, at: departedAt });
    await writeTrail(tx, actor, {
      siteId: load.siteId,
      action: "load.departed",
      entity: "load",
      entityId: load.id,
      before: { state: "ready" },
      after: { state: "departed", departedAt, departureScaleKg: input.departureScaleKg ?? null, left: total, containers: containers.map((c) => c.labelNumber), siteTotals },
      at: departedAt,
    });
  });
  return loadView(load.id);
}

/** The receiving facility's weight and date: containers, units and lots become `delivered`; the weights are compared on the load page. */
export async function receiveLoad(actor: TActor, loadId: string, input: TReceipt) {
  const load = await loadFor(actor, loadId, "loads.write");
  if (load.state === "delivered") throw conflict(`Load ${load.reference} is already received; record a correction instead.`, [{ field: "state", message: "the load is delivered" }]);
  assertState(load, ["departed"], "its receipt can be recorded");
  const receivedAt = new Date(`${input.receivedAt}T00:00:00.000Z`);
  if (load.departedAt && input.receivedAt < isoDay(load.departedAt)!) throw invalid("receivedAt", `the load left on ${isoDay(load.departedAt)}; it cannot have been received before that`);
  if (receivedAt.getTime() > Date.now() + 86_400_000) throw invalid("receivedAt", "the date of receipt cannot be in the future");
  await db().$transaction(async (tx) => {
    await guard(tx, load);
    const ids = (await tx.container.findMany({ where: { loadId: load.id }, select: { id: true } })).map((c) => c.id);
    await tx.container.updateMany({ where: { loadId: load.id, state: "departed" }, data: { state: "delivered" } });
    await tx.unit.updateMany({ where: { containerId: { in: ids }, state: "departed" }, data: { state: "delivered" } });
    await tx.lot.updateMany({ where: { containerId: { in: ids }, state: "departed" }, data: { state: "delivered" } });
    await tx.load.update({ where: { id: load.id }, data: { state: "delivered", receivedKg: input.receivedKg, receivedAt } });
    await writeTrail(tx, actor, { siteId: load.siteId, action: "load.received", entity: "load", entityId: load.id, before: { state: "departed" }, after: { state: "delivered", receivedKg: input.receivedKg, receivedAt: input.receivedAt } });
  });
  return loadView(load.id);
}

/**
 * Closes a delivered load: from here on it is read-only. A difference beyond the facility's tolerance can be
 * accepted, but only with a note saying why; the comparison is kept in the trail event.
 */
export async function reconcileLoad(actor: TActor, loadId: string, { note: text }: z.output<typeof ZReconcile>, { at }: { at?: Date } = {}) {
  const found = await loadFor(actor, loadId, "loads.write");
  assertState(found, ["delivered"], "it can be reconciled");
  const view = await loadView(found.id);
  if (view.reconciliation?.isFlagged && !text) {
    throw invalid("note", `the received weight is beyond the facility's ${view.reconciliation.tolerancePct} % tolerance: say why it is accepted`, "A note is needed.");
  }
  const now = at ?? new Date();
  await db().$transaction(async (tx) => {
    await guard(tx, found, { state: "reconciled", reconciledAt: now });
    await writeTrail(tx, actor, {
      siteId: found.siteId,
      action: "load.reconciled",
      entity: "load",
      entityId: found.id,
      before: { state: "delivered" },
      after: { state: "reconciled", reconciledAt: now, effective: view.effective, estimatedKg: view.summary.massKg, reconciliation: view.reconciliation, note: text },
      at: now,
    });
  });
  return loadView(found.id);
}

/**
 * A correction of a recorded weight or date: appended to the trail, never written over the load, which keeps
 * what was first recorded (and, once reconciled, stays read-only). The load page shows the corrected values.
 */
export async function addCorrection(actor: TActor, loadId: string, input: TCorrection) {
  const load = await loadFor(actor, loadId, "loads.write");
  const needs: TLoadState[] = input.field === "departureScaleKg" ? ["departed", "delivered", "reconciled"] : ["delivered", "reconciled"];
  if (!needs.includes(load.state as TLoadState)) {
    throw conflict(`Load ${load.reference} is ${STATE_WORDS[load.state] ?? load.state}; ${input.field} can be corrected only once it is ${needs.join(", ")}.`, [{ field: "field", message: `nothing recorded to correct while the load is ${load.state}` }]);
  }
  if (input.field === "receivedAt" && load.departedAt && input.value < isoDay(load.departedAt)!) throw invalid("value", `the load left on ${isoDay(load.departedAt)}; it cannot have been received before that`);
  await db().$transaction(async (tx) => {
    const current = effectiveValues(load, await correctionsOf(tx, load.id));
    await writeTrail(tx, actor, {
      siteId: load.siteId,
      action: "load.corrected",
      entity: "load",
      entityId: load.id,
      before: { field: input.field, value: current[input.field] },
      after: { field: input.field, value: input.value, note: input.note },
    });
  });
  return loadView(load.id);
}

/** Sealed containers at a site that are on no load: what the planner can add. */
export async function loadableContainers(actor: TActor, siteId: string) {
  const site = await siteFor(actor, siteId, "loads.read");
  return db().container.findMany({
    where: { siteId: site.id, state: "sealed", loadId: null },
    orderBy: { labelNumber: "asc" },
    select: { id: true, labelNumber: true, kind: true, isClosed: true, sealedAt: true, accumulationStart: true, unitCount: true, batteryKg: true, leadKg: true, bay: { select: { name: true } } },
  });
}
