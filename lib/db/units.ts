import { randomUUID } from "node:crypto";
import { estimateComposition } from "@/lib/chemistry";
import { sitesWhere, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { needsClosedContainer, type TUnitIntake } from "@/lib/intake/schema";
import { db, type TTx } from "./client";
import { requireSite, siteFor } from "./sites";
import { fastIntake } from "./fast-intake";
import { changeSiteLevel, incrementBy, type TTotals } from "./totals";
import { writeTrail } from "./trail";

export type TIntakeResult = { status: number; body: unknown; isReplay: boolean };

const INTAKE_SCOPE = "POST /api/v1/units";

/** The composition stored with a unit, flattened to columns. */
function compositionColumns(input: TUnitIntake) {
  const c = estimateComposition({
    kind: input.kind,
    nominalVoltage: input.nominalVoltage,
    capacityAh: input.capacityAh,
    cca: input.cca,
    groupSize: input.groupSize,
    weightKg: input.weightKg,
    specificGravity: input.specificGravity,
  });
  return {
    composition: c,
    columns: {
      method: c.method,
      batteryKg: c.batteryKg.value,
      batteryKgLow: c.batteryKg.low,
      batteryKgHigh: c.batteryKg.high,
      leadKg: c.leadKg.value,
      leadKgLow: c.leadKg.low,
      leadKgHigh: c.leadKg.high,
      electrolyteKg: c.electrolyteKg.value,
      electrolyteKgLow: c.electrolyteKg.low,
      electrolyteKgHigh: c.electrolyteKg.high,
      acidKg: c.sulfuricAcidKg.value,
      acidKgLow: c.sulfuricAcidKg.low,
      acidKgHigh: c.sulfuricAcidKg.high,
      polymerKg: c.polymerKg.value,
      otherKg: c.otherKg.value,
    },
  };
}

async function replay(scope: string, key: string): Promise<TIntakeResult | null> {
  const row = await db().idempotencyKey.findUnique({ where: { scope_key: { scope, key } } });
  return row ? { status: row.status, body: JSON.parse(row.body), isReplay: true } : null;
}

export type TIntakeOptions = {
  /** Backdates the intake (the demo loader, imports); the API always uses the current time. */
  at?: Date;
  /**
   * More work that belongs to this intake (the deposit side of a return at the Counter): it runs inside the same
   * Prisma transaction, after the unit, its totals and its trail event and before the idempotency record, and its
   * result is merged into the response body (so it is stored with the key). A throw rolls the whole intake back.
   */
  within?: (tx: TTx, unit: { id: string; at: Date }) => Promise<Record<string, unknown>>;
  /** The request an idempotency key is filed under, when it is not `POST /api/v1/units`. */
  idempotencyScope?: string;
};

/**
 * Logs one unit: stores it with its composition, moves the site's (and container's) totals by exactly that
 * unit, writes the trail event and the idempotency record — all in one transaction, `within`'s work included.
 */
export async function recordIntake(
  actor: TActor,
  input: TUnitIntake,
  idempotencyKey?: string,
  { at, within, idempotencyScope = INTAKE_SCOPE }: TIntakeOptions = {},
): Promise<TIntakeResult> {
  const siteId = await requireSite(actor, input.site, "units.create");
  const scope = `${actor.ref} ${idempotencyScope}`;
  const { composition, columns } = compositionColumns(input);
  const id = randomUUID();
  // `at` lets the demo loader and imports backdate an intake; the API always uses the current time.
  const now = at ?? new Date();
  const delta: TTotals = { unitCount: 1, batteryKg: columns.batteryKg, leadKg: columns.leadKg, electrolyteKg: columns.electrolyteKg, acidKg: columns.acidKg };
  const unitData = {
    id,
    siteId,
    kind: input.kind,
    nominalVoltage: input.nominalVoltage,
    capacityAh: input.capacityAh ?? null,
    cca: input.cca ?? null,
    groupSize: input.groupSize ?? null,
    weightKg: input.weightKg ?? null,
    condition: input.condition,
    source: input.source,
    saleRef: input.saleRef ?? null,
    note: input.note ?? null,
    senderName: input.senderName ?? null,
    senderAddress: input.senderAddress ?? null,
    receivedAt: now,
    receivedBy: actor.ref,
    ...columns,
  };
  // The response: the unit, its composition, then the site's totals after it (always last; fastIntake adds them).
  const bodyOf = (unit: object) => ({ unit: { ...unit, notes: composition.notes, warnings: composition.warnings }, composition });
  try {
    if (!input.containerId && !within) {
      // The common case goes through the raw hot path (lib/db/fast-intake.ts); a stow into a container (its checks
      // and totals) and an intake with work `within` its transaction stay on Prisma.
      const unit = { ...unitData, containerId: null, state: "received" };
      const { body } = await fastIntake(db(), {
        unit,
        delta,
        trail: { organisationId: actor.organisationId, actor: actor.ref, actorLabel: actor.label },
        idempotency: idempotencyKey ? { scope, key: idempotencyKey } : undefined,
        body: bodyOf(unit),
      });
      return { status: 201, body, isReplay: false };
    }
    return await db().$transaction(async (tx) => {
      const container = input.containerId ? await stowTarget(tx, siteId, input.containerId, input.condition) : null;
      const unit = await tx.unit.create({ data: { ...unitData, containerId: container?.id ?? null, state: container ? "stowed" : "received" } });
      if (container) {
        await tx.container.update({ where: { id: container.id }, data: { ...incrementBy(delta), accumulationStart: container.accumulationStart ?? now } });
        if (container.bayId) await tx.bay.update({ where: { id: container.bayId }, data: incrementBy(delta) });
      }
      const totals = await changeSiteLevel(tx, { siteId, delta, reason: "intake", refId: id, at: now });
      await writeTrail(tx, actor, { siteId, action: "unit.received", entity: "unit", entityId: id, after: unit, at: now });
      const body = { ...bodyOf(unit), siteTotals: totals, ...(within ? await within(tx, { id, at: now }) : {}) };
      // A used key fails here on the unique (scope, key), rolling all of this back; the catch answers with the first response.
      if (idempotencyKey) await tx.idempotencyKey.create({ data: { scope, key: idempotencyKey, status: 201, body: JSON.stringify(body) }, select: { id: true } });
      return { status: 201, body, isReplay: false };
    });
  } catch (error) {
    // A used key (a retry, or two requests at once): answer with the first response. With `within`, the later of two
    // requests at once can fail sooner, in that work (the first one's refund already booked): it looks too.
    if (idempotencyKey && ((error as { code?: string }).code === "P2002" || within)) {
      const earlier = await replay(scope, idempotencyKey);
      if (earlier) return earlier;
    }
    throw error;
  }
}

async function stowTarget(tx: TTx, siteId: string, containerId: string, condition: string) {
  const container = await tx.container.findUnique({ where: { id: containerId } });
  if (!container || container.siteId !== siteId) {
    throw new AppError("invalid_input", "That container is not at this site.", [{ field: "containerId", message: "choose a container at this site" }]);
  }
  if (container.state !== "open") {
    throw new AppError("invalid_input", "That container is not open.", [{ field: "containerId", message: `container ${container.labelNumber} is ${container.state}; choose an open one` }]);
  }
  if (needsClosedContainer(condition) && !container.isClosed) {
    throw new AppError("invalid_input", "Leaking or cracked units go only into a closed, compatible container.", [
      { field: "containerId", message: `container ${container.labelNumber} is not a closed container` },
    ]);
  }
  return container;
}

export async function listUnits(actor: TActor, { siteId, from, to, limit = 50 }: { siteId?: string; from?: Date; to?: Date; limit?: number }) {
  if (siteId) await siteFor(actor, siteId, "units.read");
  const scope = sitesWhere(actor, "units.read");
  return db().unit.findMany({
    where: {
      siteId: siteId ? siteId : { in: scope },
      site: { organisationId: actor.organisationId },
      receivedAt: { gte: from, lte: to },
    },
    orderBy: { receivedAt: "desc" },
    take: Math.min(limit, 500),
  });
}
