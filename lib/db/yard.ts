import { randomUUID } from "node:crypto";
import { can, type TAction, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { needsClosedContainer } from "@/lib/intake/schema";
import { containerAge } from "@/lib/limits/container-age";
import { isoDateOfUtcDay, utcDay } from "@/lib/limits/utc-day";
import { renderContainerLabel } from "@/lib/papers/render-container-label";
import { ZCustomRule, type TRule } from "@/lib/rules/rule";
import { getRulebook } from "@/lib/rules/rulebooks";
import { accumulationStartAfter, itemAccumulationDate } from "@/lib/yard/earliest-date";
import { nextLabelNumber } from "@/lib/yard/next-label-number";
import { CONTAINER_KINDS, ON_SITE_ITEM_STATES, type TBayCreate, type TContainerCreate, type TContainerPatch, type TStow } from "@/lib/yard/schema";
import { db, type TTx } from "./client";
import type { Container } from "./generated/sqlite/client";
import { withDbErrors } from "./errors";
import { siteFor } from "./sites";
import { addTotals, incrementBy, negate, pickTotals, ZERO_TOTALS, type TTotals } from "./totals";
import { writeTrail } from "./trail";

/** Unit and lot states that can still be put into a container (not yet on a load). */
const MOVABLE_STATES = ["received", "stowed"];

const invalid = (field: string, message: string, summary = "That cannot go there.") => new AppError("invalid_input", summary, [{ field, message }]);

/**
 * Loads a container for an action, or refuses as siteFor does: another organisation's container (or none) is
 * "not found"; one at a site where the role does not allow the action is "forbidden".
 */
export async function containerFor(actor: TActor, containerId: string, action: TAction) {
  const container = await db().container.findUnique({ where: { id: containerId }, include: { site: true, bay: true } });
  if (!container || container.site.organisationId !== actor.organisationId) throw new AppError("not_found", "No such container.");
  if (!can(actor, action, container.siteId)) throw new AppError("forbidden", "Your role at this site does not allow that.");
  return container;
}

export async function listBays(actor: TActor, siteId: string) {
  const site = await siteFor(actor, siteId, "yard.read");
  return db().bay.findMany({ where: { siteId: site.id }, orderBy: { name: "asc" } });
}

export async function createBay(actor: TActor, input: TBayCreate) {
  const site = await siteFor(actor, input.site, "yard.write");
  const taken = await db().bay.findUnique({ where: { siteId_name: { siteId: site.id, name: input.name } } });
  if (taken) throw invalid("name", `there is already a bay called "${input.name}" at this site`, "Choose another name.");
  return withDbErrors(
    () =>
      db().$transaction(async (tx) => {
        const bay = await tx.bay.create({ data: { id: randomUUID(), siteId: site.id, name: input.name } });
        await writeTrail(tx, actor, { siteId: site.id, action: "bay.created", entity: "bay", entityId: bay.id, after: bay });
        return bay;
      }),
    { conflict: "There is already a bay with that name." },
  );
}

export async function listContainers(actor: TActor, { siteId, state, bayId }: { siteId: string; state?: string; bayId?: string }) {
  const site = await siteFor(actor, siteId, "yard.read");
  return db().container.findMany({
    where: { siteId: site.id, state, bayId },
    include: { bay: { select: { id: true, name: true } } },
    orderBy: { labelNumber: "asc" },
  });
}

export async function getContainer(actor: TActor, containerId: string) {
  const container = await containerFor(actor, containerId, "yard.read");
  const [units, lots] = await Promise.all([
    db().unit.findMany({
      where: { containerId: container.id },
      select: { id: true, kind: true, nominalVoltage: true, condition: true, state: true, receivedAt: true, batteryKg: true, leadKg: true, acidKg: true },
      orderBy: { receivedAt: "asc" },
      take: 500,
    }),
    db().lot.findMany({ where: { containerId: container.id }, orderBy: { receivedAt: "asc" } }),
  ]);
  const { site, ...rest } = container;
  return { container: { ...rest, site: { id: site.id, name: site.name, unitSystem: site.unitSystem } }, units, lots };
}

async function bayAt(tx: TTx, siteId: string, bayId: string) {
  const bay = await tx.bay.findUnique({ where: { id: bayId } });
  if (!bay || bay.siteId !== siteId) throw invalid("bayId", "choose a bay at this site");
  return bay;
}

export async function createContainer(actor: TActor, input: TContainerCreate) {
  const site = await siteFor(actor, input.site, "yard.write");
  return withDbErrors(
    () =>
      db().$transaction(async (tx) => {
        if (input.bayId) await bayAt(tx, site.id, input.bayId);
        let labelNumber = input.labelNumber;
        if (labelNumber) {
          const taken = await tx.container.findUnique({ where: { siteId_labelNumber: { siteId: site.id, labelNumber } } });
          if (taken) throw invalid("labelNumber", `label ${labelNumber} is already in use at this site`, "Choose another label number.");
        } else {
          const existing = await tx.container.findMany({ where: { siteId: site.id }, select: { labelNumber: true } });
          labelNumber = nextLabelNumber({ kind: input.kind, existing: existing.map((c) => c.labelNumber) });
        }
        const container = await tx.container.create({
          data: { id: randomUUID(), siteId: site.id, bayId: input.bayId ?? null, labelNumber, kind: input.kind, isClosed: input.isClosed },
        });
        await writeTrail(tx, actor, { siteId: site.id, action: "container.created", entity: "container", entityId: container.id, after: container });
        return container;
      }),
    { conflict: "That label number is already in use at this site." },
  );
}

/** Seals an open container (it takes nothing more) and/or moves it to another bay, carrying its totals with it. */
export async function updateContainer(actor: TActor, containerId: string, patch: TContainerPatch, { at }: { at?: Date } = {}) {
  const found = await containerFor(actor, containerId, "yard.write");
  const now = at ?? new Date();
  return db().$transaction(async (tx) => {
    const before = await tx.container.findUniqueOrThrow({ where: { id: found.id } });
    const data: { state?: string; sealedAt?: Date; bayId?: string | null } = {};
    if (patch.state === "sealed") {
      if (before.state !== "open") throw invalid("state", `container ${before.labelNumber} is ${before.state}; only an open container can be sealed`, "It cannot be sealed.");
      if (before.unitCount <= 0) throw invalid("state", `container ${before.labelNumber} is empty; put something in before sealing it`, "It cannot be sealed.");
      Object.assign(data, { state: "sealed", sealedAt: now });
    }
    if (patch.bayId !== undefined && patch.bayId !== before.bayId) {
      if (before.state !== "open" && before.state !== "sealed") throw invalid("bayId", `container ${before.labelNumber} is ${before.state}; it is no longer in a bay`);
      if (patch.bayId) await bayAt(tx, before.siteId, patch.bayId);
      const totals = pickTotals(before);
      if (before.bayId) await tx.bay.update({ where: { id: before.bayId }, data: incrementBy(negate(totals)) });
      if (patch.bayId) await tx.bay.update({ where: { id: patch.bayId }, data: incrementBy(totals) });
      data.bayId = patch.bayId;
    }
    if (Object.keys(data).length === 0) return before; // nothing to change: no write, no trail event
    // Guarded on the state read above: a concurrent seal or load makes this one fail instead of overwriting it.
    const { count } = await tx.container.updateMany({ where: { id: before.id, state: before.state }, data });
    if (count !== 1) throw new AppError("conflict", "The container changed meanwhile; reload and try again.");
    const after = await tx.container.findUniqueOrThrow({ where: { id: before.id } });
    await writeTrail(tx, actor, {
      siteId: before.siteId,
      action: patch.state === "sealed" ? "container.sealed" : "container.moved",
      entity: "container",
      entityId: before.id,
      before: { state: before.state, bayId: before.bayId },
      after: { state: after.state, bayId: after.bayId, sealedAt: after.sealedAt },
      at: now,
    });
    return after;
  });
}

type TItem = { kind: "unit" | "lot"; id: string; containerId: string | null; receivedAt: Date; state: string; hasLeak: boolean; delta: TTotals; label: string };

const unitItem = (u: { id: string; containerId: string | null; receivedAt: Date; state: string; condition: string; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number }): TItem => ({
  kind: "unit",
  id: u.id,
  containerId: u.containerId,
  receivedAt: u.receivedAt,
  state: u.state,
  hasLeak: needsClosedContainer(u.condition),
  delta: { unitCount: 1, batteryKg: u.batteryKg, leadKg: u.leadKg, electrolyteKg: u.electrolyteKg, acidKg: u.acidKg },
  label: `unit ${u.id.slice(0, 8)}`,
});

const lotItem = (l: { id: string; containerId: string | null; receivedAt: Date; state: string; ticketNumber: string; unitCount: number; netKg: number; leadKg: number; electrolyteKg: number; acidKg: number }): TItem => ({
  kind: "lot",
  id: l.id,
  containerId: l.containerId,
  receivedAt: l.receivedAt,
  state: l.state,
  hasLeak: false,
  delta: { unitCount: l.unitCount, batteryKg: l.netKg, leadKg: l.leadKg, electrolyteKg: l.electrolyteKg, acidKg: l.acidKg },
  label: `lot ${l.ticketNumber}`,
});

const UNIT_COLUMNS = { id: true, siteId: true, containerId: true, receivedAt: true, state: true, condition: true, batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } as const;

const UNIT_ID_PREFIX = /^[0-9a-f-]{8,}$/i;

/** A scanned code at a site: a unit id (or its first 8+ characters), a container label, or a scale ticket number. */
async function resolveScan(tx: TTx, siteId: string, code: string, targetId: string): Promise<{ items: TItem[]; field: string; fromContainerId?: string }> {
  const unit = await tx.unit.findUnique({ where: { id: code }, select: UNIT_COLUMNS });
  if (unit && unit.siteId === siteId) return { items: [unitItem(unit)], field: "scan" };
  const container =
    (await tx.container.findUnique({ where: { siteId_labelNumber: { siteId, labelNumber: code } } })) ??
    (await tx.container.findUnique({ where: { siteId_labelNumber: { siteId, labelNumber: code.toUpperCase() } } }));
  if (container) {
    if (container.id === targetId) throw invalid("scan", `${container.labelNumber} is the container you are filling; scan what goes into it`);
    return { items: await contentsOf(tx, container), field: "scan", fromContainerId: container.id };
  }
  const lot = await tx.lot.findUnique({ where: { siteId_ticketNumber: { siteId, ticketNumber: code } } });
  if (lot) return { items: [lotItem(lot)], field: "scan" };
  // Only something shaped like the start of a unit id (hex digits and dashes) is looked up as a prefix, so a code
  // holding LIKE's wildcards (% or _) can never match more than it says.
  if (UNIT_ID_PREFIX.test(code)) {
    // Unit ids are lower case; PostgreSQL's LIKE is case-sensitive where SQLite's is not.
    const matches = await tx.unit.findMany({ where: { siteId, id: { startsWith: code.toLowerCase() } }, select: UNIT_COLUMNS, take: 2 });
    if (matches.length === 1) return { items: [unitItem(matches[0]!)], field: "scan" };
    if (matches.length > 1) throw invalid("scan", `more than one unit starts with "${code}": scan the whole id`);
  }
  throw invalid("scan", `nothing at this site answers to "${code}": scan a unit id, a container label or a scale ticket number`, "Not found at this site.");
}

async function contentsOf(tx: TTx, container: { id: string; labelNumber: string; state: string }): Promise<TItem[]> {
  if (container.state !== "open") throw invalid("scan", `container ${container.labelNumber} is ${container.state}; its contents stay in it`);
  const [units, lots] = await Promise.all([
    tx.unit.findMany({ where: { containerId: container.id }, select: UNIT_COLUMNS }),
    tx.lot.findMany({ where: { containerId: container.id } }),
  ]);
  const items = [...units.map(unitItem), ...lots.map(lotItem)];
  if (items.length === 0) throw invalid("scan", `container ${container.labelNumber} is empty`);
  return items;
}

async function itemsOf(tx: TTx, siteId: string, input: TStow, targetId: string): Promise<{ items: TItem[]; field: string; fromContainerId?: string }> {
  if (input.scan !== undefined) return resolveScan(tx, siteId, input.scan, targetId);
  if (input.unitIds) {
    const ids = [...new Set(input.unitIds)];
    const units = await tx.unit.findMany({ where: { id: { in: ids }, siteId }, select: UNIT_COLUMNS });
    const found = new Set(units.map((u) => u.id));
    const missing = ids.filter((id) => !found.has(id));
    // The same answer whether the id exists elsewhere or not at all: another site's records are never confirmed.
    if (missing.length) throw invalid("unitIds", `not at this site: ${missing.slice(0, 5).join(", ")}${missing.length > 5 ? ` and ${missing.length - 5} more` : ""}`, "Not found at this site.");
    return { items: units.map(unitItem), field: "unitIds" };
  }
  if (input.lotId) {
    const lot = await tx.lot.findUnique({ where: { id: input.lotId } });
    if (!lot || lot.siteId !== siteId) throw invalid("lotId", "that lot is not at this site", "Not found at this site.");
    return { items: [lotItem(lot)], field: "lotId" };
  }
  const from = await tx.container.findUnique({ where: { id: input.fromContainerId! } });
  if (!from || from.siteId !== siteId) throw invalid("fromContainerId", "that container is not at this site", "Not found at this site.");
  if (from.id === targetId) throw invalid("fromContainerId", "a container cannot be emptied into itself");
  return { items: await contentsOf(tx, from), field: "fromContainerId", fromContainerId: from.id };
}

export type TStowResult = {
  container: Container;
  moved: { units: number; lots: number; unitCount: number };
  from: string[];
  items: { kind: "unit" | "lot"; id: string; label: string }[];
};

/**
 * Puts units and lots into an open container, from loose or from other open containers, in one transaction:
 * each source container (and its bay) loses exactly what the target (and its bay) gains; the site's totals do
 * not change. The target's accumulation start becomes the earliest of its own and the items' own dates (each
 * brings the start of the container it left, or its receipt date). A source left empty loses its date.
 * Leaking or cracked units go only into a closed container (40 CFR 273.13(a)(1), 273.33(a)(1)).
 */
export async function stowIntoContainer(actor: TActor, containerId: string, input: TStow, { at }: { at?: Date } = {}): Promise<TStowResult> {
  const found = await containerFor(actor, containerId, "yard.write");
  const now = at ?? new Date();
  return db().$transaction(async (tx) => {
    const target = await tx.container.findUniqueOrThrow({ where: { id: found.id } });
    const { items, field } = await itemsOf(tx, target.siteId, input, target.id);
    if (target.state !== "open") throw invalid(field, `container ${target.labelNumber} is ${target.state}; choose an open one`, "That container is not open.");

    const sourceIds = [...new Set(items.map((i) => i.containerId).filter((id): id is string => id !== null))];
    const sources = new Map((await tx.container.findMany({ where: { id: { in: sourceIds } } })).map((c) => [c.id, c]));
    for (const item of items) {
      if (item.containerId === target.id) throw invalid(field, `${item.label} is already in ${target.labelNumber}`, "Already there.");
      if (!MOVABLE_STATES.includes(item.state)) throw invalid(field, `${item.label} is ${item.state}; it can no longer be moved`);
      const source = item.containerId ? sources.get(item.containerId) : undefined;
      if (source && source.state !== "open") throw invalid(field, `${item.label} is in ${source.labelNumber}, which is ${source.state}`);
      if (item.hasLeak && !target.isClosed) {
        throw invalid(field, `${item.label} is leaking or cracked: it goes only into a closed container, and ${target.labelNumber} is not one`, "Leaking or cracked units go only into a closed, compatible container.");
      }
    }

    // Move each group; the update is guarded on where each item was read, so a concurrent move fails this one.
    const groups = new Map<string | null, TItem[]>();
    for (const item of items) {
      const group = groups.get(item.containerId);
      if (group) group.push(item);
      else groups.set(item.containerId, [item]);
    }
    let gained = ZERO_TOTALS;
    for (const [sourceId, group] of groups) {
      const delta = group.reduce((sum, i) => addTotals(sum, i.delta), ZERO_TOTALS);
      gained = addTotals(gained, delta);
      const unitIds = group.filter((i) => i.kind === "unit").map((i) => i.id);
      const lotIds = group.filter((i) => i.kind === "lot").map((i) => i.id);
      const where = { containerId: sourceId, state: { in: MOVABLE_STATES } };
      const movedUnits = unitIds.length ? (await tx.unit.updateMany({ where: { id: { in: unitIds }, ...where }, data: { containerId: target.id, state: "stowed" } })).count : 0;
      const movedLots = lotIds.length ? (await tx.lot.updateMany({ where: { id: { in: lotIds }, ...where }, data: { containerId: target.id, state: "stowed" } })).count : 0;
      if (movedUnits !== unitIds.length || movedLots !== lotIds.length) throw new AppError("conflict", "Some of these were moved meanwhile; scan again.");
      if (sourceId) {
        const source = sources.get(sourceId)!;
        const left = await tx.container.update({ where: { id: sourceId }, data: incrementBy(negate(delta)) });
        if (left.unitCount <= 0) await tx.container.update({ where: { id: sourceId }, data: { accumulationStart: null } });
        if (source.bayId) await tx.bay.update({ where: { id: source.bayId }, data: incrementBy(negate(delta)) });
      }
    }
    const incoming = items.map((i) => itemAccumulationDate({ receivedAt: i.receivedAt, containerStart: i.containerId ? sources.get(i.containerId)?.accumulationStart : null }));
    const accumulationStart = accumulationStartAfter({ current: target.accumulationStart, incoming });
    const container = await tx.container.update({ where: { id: target.id }, data: { ...incrementBy(gained), accumulationStart } });
    if (target.bayId) await tx.bay.update({ where: { id: target.bayId }, data: incrementBy(gained) });

    for (const item of items) {
      const from = item.containerId ? sources.get(item.containerId)!.labelNumber : null;
      await writeTrail(tx, actor, {
        siteId: target.siteId,
        action: `${item.kind}.${from ? "moved" : "stowed"}`,
        entity: item.kind,
        entityId: item.id,
        before: { containerId: item.containerId, container: from, state: item.state },
        after: { containerId: target.id, container: target.labelNumber, state: "stowed" },
        at: now,
      });
    }
    return {
      container,
      moved: { units: items.filter((i) => i.kind === "unit").length, lots: items.filter((i) => i.kind === "lot").length, unitCount: gained.unitCount },
      from: sourceIds.map((id) => sources.get(id)!.labelNumber),
      items: items.map((i) => ({ kind: i.kind, id: i.id, label: i.label })),
    };
  });
}

export type TYardUnitScope = "on-hand" | "loose" | "damaged";

/** Units (and lots) on hand at a site for the drill-down lists: all, loose (not in a container), damaged, or one container's. */
export async function listYardUnits(actor: TActor, siteId: string, { containerId, scope = "on-hand", limit = 500 }: { containerId?: string; scope?: TYardUnitScope; limit?: number }) {
  const site = await siteFor(actor, siteId, "yard.read");
  const onHand = { in: [...ON_SITE_ITEM_STATES] as string[] };
  const where = {
    siteId: site.id,
    state: onHand,
    ...(containerId ? { containerId } : {}),
    ...(scope === "loose" ? { containerId: null } : {}),
    ...(scope === "damaged" ? { condition: { in: ["leaking", "cracked"] } } : {}),
  };
  const lotWhere = { siteId: site.id, state: onHand, ...(containerId ? { containerId } : {}), ...(scope === "loose" ? { containerId: null } : {}) };
  const [units, count, lots] = await Promise.all([
    db().unit.findMany({ where, orderBy: { receivedAt: "asc" }, take: Math.min(limit, 1000), include: { container: { select: { id: true, labelNumber: true } } } }),
    db().unit.count({ where }),
    // Damaged units are logged one by one: a lot is never the answer to that question.
    scope === "damaged" ? [] : db().lot.findMany({ where: lotWhere, orderBy: { receivedAt: "asc" }, take: 200, include: { container: { select: { id: true, labelNumber: true } } } }),
  ]);
  return { site, units, count, lots };
}

const isoDate = (d: Date) => isoDateOfUtcDay(utcDay(d));

/**
 * A container's label as a PDF: the rulebook's label wording (40 CFR 273.14(a), 273.34(a) under the US rulebook),
 * the accumulation start date, the last day under the strictest age rule of the site, the label number as
 * Code 128, the site, and the handling note when it holds leaking or cracked units.
 */
export async function containerLabelPdf(actor: TActor, containerId: string, { issuedAt = new Date() }: { issuedAt?: Date } = {}) {
  const container = await containerFor(actor, containerId, "yard.read");
  const { site } = container;
  const rulebook = getRulebook(site.rulebookId);
  const [customRules, damaged] = await Promise.all([
    db().customRule.findMany({ where: { siteId: site.id, metric: "container-age-days" } }),
    db().unit.count({ where: { containerId: container.id, condition: { in: ["leaking", "cracked"] } } }),
  ]);
  const ageRules: TRule[] = [...rulebook.rules.filter((r) => r.metric === "container-age-days"), ...customRules.map((r) => ({ ...ZCustomRule.parse(r), id: r.id }))];
  let keepUntil: { date: Date; citation: string } | null = null;
  if (container.accumulationStart) {
    for (const rule of ageRules) {
      const age = containerAge({ accumulationStart: container.accumulationStart, asOf: issuedAt, rule });
      if (!keepUntil || age.deadline < keepUntil.date) keepUntil = { date: age.deadline, citation: rule.citation };
    }
  }
  const kind = (CONTAINER_KINDS as readonly string[]).includes(container.kind) ? (container.kind as (typeof CONTAINER_KINDS)[number]) : "pallet";
  const pdf = await renderContainerLabel({
    issuedAt: issuedAt.toISOString(),
    rulebook: { id: rulebook.id, version: rulebook.version },
    documentSeed: container.id,
    labelNumber: container.labelNumber,
    wording: rulebook.labelWording,
    wordingCitation: rulebook.labelCitation,
    accumulationStart: container.accumulationStart ? isoDate(container.accumulationStart) : null,
    keepUntil: keepUntil ? isoDate(keepUntil.date) : undefined,
    // "40 CFR 273.15(a) (small quantity handler), …" → "40 CFR 273.15(a), …": the sections, without the glosses.
    keepUntilCitation: keepUntil?.citation.replace(/ \([^)]*\)/g, "") ?? "",
    site: { name: site.name, address: site.address, regulatoryIds: site.regulatoryIds },
    containerKind: kind,
    bay: container.bay?.name ?? "",
    holdsLeakingOrDamaged: damaged > 0,
  });
  return { pdf, labelNumber: container.labelNumber };
}
