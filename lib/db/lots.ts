import { randomUUID } from "node:crypto";
import type { TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { earliestDate } from "@/lib/yard/earliest-date";
import { lotComposition, type TLotComposition } from "@/lib/yard/lot-composition";
import { netKgOf, type TLotCreate } from "@/lib/yard/schema";
import { db } from "./client";
import { withDbErrors } from "./errors";
import type { Lot } from "./generated/sqlite/client";
import { siteFor } from "./sites";
import { changeSiteLevel, incrementBy, type TTotals } from "./totals";
import { writeTrail } from "./trail";

export type TLotResult = { lot: Lot; composition: TLotComposition; siteTotals: TTotals };

/**
 * Receives a weighed lot from a scale ticket: stores it with its estimated composition, moves the site's totals
 * (and the level ledger) by the lot, and — when a container is given — stows it there in the same transaction.
 * A ticket number already recorded at the site is refused before anything is written.
 */
export async function receiveLot(actor: TActor, input: TLotCreate, { at }: { at?: Date } = {}): Promise<TLotResult> {
  const site = await siteFor(actor, input.site, "yard.write");
  const existing = await db().lot.findUnique({ where: { siteId_ticketNumber: { siteId: site.id, ticketNumber: input.ticketNumber } } });
  if (existing) {
    throw new AppError("invalid_input", "That scale ticket is already recorded.", [
      { field: "ticketNumber", message: `ticket ${input.ticketNumber} is already recorded at this site (received ${existing.receivedAt.toISOString().slice(0, 10)}); check the number` },
    ]);
  }
  const netKg = netKgOf(input.grossKg, input.tareKg);
  const composition = lotComposition({ netKg, unitCount: input.unitCount, mixBasis: input.mixBasis, mix: input.mix });
  const now = at ?? new Date();
  const id = randomUUID();
  const delta: TTotals = {
    unitCount: input.unitCount,
    batteryKg: netKg,
    leadKg: composition.leadKg.value,
    electrolyteKg: composition.electrolyteKg.value,
    acidKg: composition.acidKg.value,
  };
  return withDbErrors(
    () =>
      db().$transaction(async (tx) => {
        const container = input.containerId ? await tx.container.findUnique({ where: { id: input.containerId } }) : null;
        if (input.containerId && (!container || container.siteId !== site.id)) {
          throw new AppError("invalid_input", "That container is not at this site.", [{ field: "containerId", message: "choose a container at this site" }]);
        }
        if (container && container.state !== "open") {
          throw new AppError("invalid_input", "That container is not open.", [{ field: "containerId", message: `container ${container.labelNumber} is ${container.state}; choose an open one` }]);
        }
        const lot = await tx.lot.create({
          data: {
            id,
            siteId: site.id,
            containerId: container?.id ?? null,
            ticketNumber: input.ticketNumber,
            senderName: input.senderName ?? null,
            senderAddress: input.senderAddress ?? null,
            note: input.note ?? null,
            grossKg: input.grossKg,
            tareKg: input.tareKg,
            netKg,
            unitCount: input.unitCount,
            // Stored per kind with its share of the units and of the net weight, for loads to split by kind.
            mix: JSON.stringify(
              composition.parts.map((p) => ({ kind: p.kind, nominalVoltage: p.nominalVoltage, share: p.units / input.unitCount, units: p.units, massKg: p.massKg })),
            ),
            state: container ? "stowed" : "received",
            receivedAt: now,
            receivedBy: actor.ref,
            leadKg: composition.leadKg.value,
            leadKgLow: composition.leadKg.low,
            leadKgHigh: composition.leadKg.high,
            electrolyteKg: composition.electrolyteKg.value,
            electrolyteKgLow: composition.electrolyteKg.low,
            electrolyteKgHigh: composition.electrolyteKg.high,
            acidKg: composition.acidKg.value,
            acidKgLow: composition.acidKg.low,
            acidKgHigh: composition.acidKg.high,
          },
        });
        if (container) {
          await tx.container.update({ where: { id: container.id }, data: { ...incrementBy(delta), accumulationStart: earliestDate(container.accumulationStart, now) } });
          if (container.bayId) await tx.bay.update({ where: { id: container.bayId }, data: incrementBy(delta) });
        }
        const siteTotals = await changeSiteLevel(tx, { siteId: site.id, delta, reason: "lot", refId: id, at: now });
        await writeTrail(tx, actor, { siteId: site.id, action: "lot.received", entity: "lot", entityId: id, after: { ...lot, container: container?.labelNumber ?? null }, at: now });
        return { lot, composition, siteTotals };
      }),
    { conflict: "That scale ticket is already recorded at this site." },
  );
}

export async function listLots(actor: TActor, siteId: string, { limit = 50 }: { limit?: number } = {}) {
  const site = await siteFor(actor, siteId, "yard.read");
  return db().lot.findMany({
    where: { siteId: site.id },
    include: { container: { select: { id: true, labelNumber: true } } },
    orderBy: { receivedAt: "desc" },
    take: Math.min(limit, 500),
  });
}
