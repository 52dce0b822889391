// Factories for the loads and papers tests: a yard with a facility, a carrier and keys for each role, and
// sealed containers holding units (and lots) written straight through Prisma, with the site's, bay's and
// container's running totals and the level ledger moved exactly as intake and stowing move them.
import { randomUUID } from "node:crypto";
import type { TRole } from "@/lib/auth/permissions";
import type { TDb } from "@/lib/db/client";
import { changeSiteLevel, incrementBy, type TTotals } from "@/lib/db/totals";
import { apiRequest, makeKey, makeOrgWithSite, params } from "../helpers/factories";

export { apiRequest, params };

/** Shares of battery mass for invented test units: lead inside the 65–75 wt % of the Basel technical guidelines (REFERENCES.md). */
const LEAD_SHARE = 0.68;
const ELECTROLYTE_SHARE = 0.2;
const ACID_SHARE = 0.07;

export type TTestUnit = { kind?: string; nominalVoltage?: number; batteryKg: number; condition?: string };

export async function makeShippingSite(db: TDb, { emergencyPhone = "+1 555 0100 (test duty desk)", tolerancePct = 2, rulebookId = "us-federal" }: { emergencyPhone?: string | null; tolerancePct?: number; rulebookId?: string } = {}) {
  const { organisation, site, tag } = await makeOrgWithSite(db, { kind: "yard", rulebookId });
  await db.organisation.update({ where: { id: organisation.id }, data: { emergencyPhone } });
  const facility = await db.facility.create({
    data: { organisationId: organisation.id, name: `Test smelter ${tag}`, address: `${tag} Furnace Way\nSlagton`, regulatoryIds: `EPA ID TST${tag}`, tolerancePct },
  });
  const carrier = await db.carrier.create({ data: { organisationId: organisation.id, name: `Test haulage ${tag}`, address: `${tag} Depot Road`, regulatoryIds: "USDOT 0000000" } });
  const bay = await db.bay.create({ data: { siteId: site.id, name: `Bay ${tag}` } });
  const keys = {} as Record<TRole, string>;
  for (const role of ["clerk", "yard", "compliance", "admin"] as const) keys[role] = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role })).key;
  return { organisation, site, facility, carrier, bay, keys, tag };
}

/**
 * A sealed container with the given units (and optionally one weighed lot), everything counted into the
 * container, its bay and the site, and the site's level ledger, as the Yard would have left it.
 */
export async function makeSealedContainer(
  db: TDb,
  { siteId, bayId, units, lot, isClosed = false, state = "sealed", label }: { siteId: string; bayId?: string; units: TTestUnit[]; lot?: { unitCount: number; netKg: number; kind?: string; mix?: { kind: string; nominalVoltage: number; units: number; massKg: number }[] }; isClosed?: boolean; state?: string; label?: string },
) {
  return db.$transaction(async (tx) => {
    const container = await tx.container.create({
      data: { siteId, bayId: bayId ?? null, labelNumber: label ?? `P-${randomUUID().slice(0, 8)}`, kind: isClosed ? "drum" : "pallet", isClosed, state: "open", accumulationStart: new Date(Date.now() - 20 * 86_400_000) },
    });
    const at = new Date(Date.now() - 10 * 86_400_000);
    for (const [i, u] of units.entries()) {
      const delta: TTotals = { unitCount: 1, batteryKg: u.batteryKg, leadKg: u.batteryKg * LEAD_SHARE, electrolyteKg: u.batteryKg * ELECTROLYTE_SHARE, acidKg: u.batteryKg * ACID_SHARE };
      const id = randomUUID();
      await tx.unit.create({
        data: {
          id,
          siteId,
          containerId: container.id,
          kind: u.kind ?? "flooded",
          nominalVoltage: u.nominalVoltage ?? 12,
          weightKg: u.batteryKg,
          condition: u.condition ?? "intact",
          source: "fleet",
          state: "stowed",
          receivedAt: new Date(at.getTime() + i * 1000),
          receivedBy: "test",
          method: "weighed",
          batteryKg: delta.batteryKg,
          batteryKgLow: delta.batteryKg,
          batteryKgHigh: delta.batteryKg,
          leadKg: delta.leadKg,
          leadKgLow: u.batteryKg * 0.65,
          leadKgHigh: u.batteryKg * 0.75,
          electrolyteKg: delta.electrolyteKg,
          electrolyteKgLow: delta.electrolyteKg,
          electrolyteKgHigh: delta.electrolyteKg,
          acidKg: delta.acidKg,
          acidKgLow: delta.acidKg,
          acidKgHigh: delta.acidKg,
          polymerKg: u.batteryKg * 0.07,
          otherKg: u.batteryKg * 0.05,
        },
      });
      await tx.container.update({ where: { id: container.id }, data: incrementBy(delta) });
      if (bayId) await tx.bay.update({ where: { id: bayId }, data: incrementBy(delta) });
      await changeSiteLevel(tx, { siteId, delta, reason: "intake", refId: id, at });
    }
    if (lot) {
      const id = randomUUID();
      const delta: TTotals = { unitCount: lot.unitCount, batteryKg: lot.netKg, leadKg: lot.netKg * LEAD_SHARE, electrolyteKg: lot.netKg * ELECTROLYTE_SHARE, acidKg: lot.netKg * ACID_SHARE };
      await tx.lot.create({
        data: {
          id,
          siteId,
          containerId: container.id,
          ticketNumber: `T-${randomUUID().slice(0, 8)}`,
          grossKg: lot.netKg + 25,
          tareKg: 25,
          netKg: lot.netKg,
          unitCount: lot.unitCount,
          mix: JSON.stringify(lot.mix ?? [{ kind: lot.kind ?? "flooded", nominalVoltage: 12, share: 1, units: lot.unitCount, massKg: lot.netKg }]),
          state: "stowed",
          receivedAt: at,
          receivedBy: "test",
          leadKg: delta.leadKg,
          leadKgLow: lot.netKg * 0.65,
          leadKgHigh: lot.netKg * 0.75,
          electrolyteKg: delta.electrolyteKg,
          electrolyteKgLow: delta.electrolyteKg,
          electrolyteKgHigh: delta.electrolyteKg,
          acidKg: delta.acidKg,
          acidKgLow: delta.acidKg,
          acidKgHigh: delta.acidKg,
        },
      });
      await tx.container.update({ where: { id: container.id }, data: incrementBy(delta) });
      if (bayId) await tx.bay.update({ where: { id: bayId }, data: incrementBy(delta) });
      await changeSiteLevel(tx, { siteId, delta, reason: "lot", refId: id, at });
    }
    return tx.container.update({ where: { id: container.id }, data: { state, sealedAt: state === "sealed" ? new Date() : null } });
  });
}

/** The checklist of the US full-paper basis, all ticked (lib/loads/transport-basis.ts; 49 CFR 172.200–172.204). */
export const US_FULL_ALL = {
  "packages-marked-labelled": true,
  "nonspillable-marked": true,
  "short-circuit": true,
  "pallet-stacks": true,
  "emergency-phone": true,
  "certification-signed": true,
};

/** Route modules of the loads API, imported once the worker's database is set. */
export async function loadRoutes() {
  return {
    loads: await import("@/app/api/v1/loads/route"),
    load: await import("@/app/api/v1/loads/[id]/route"),
    containers: await import("@/app/api/v1/loads/[id]/containers/route"),
    container: await import("@/app/api/v1/loads/[id]/containers/[containerId]/route"),
    depart: await import("@/app/api/v1/loads/[id]/depart/route"),
    receive: await import("@/app/api/v1/loads/[id]/receive/route"),
    reconcile: await import("@/app/api/v1/loads/[id]/reconcile/route"),
    corrections: await import("@/app/api/v1/loads/[id]/corrections/route"),
    manifest: await import("@/app/api/v1/loads/[id]/manifest.pdf/route"),
    receiptForm: await import("@/app/api/v1/loads/[id]/receipt-form.pdf/route"),
    records: await import("@/app/api/v1/records/route"),
    documents: await import("@/app/api/v1/records/documents/route"),
    document: await import("@/app/api/v1/records/documents/[id]/route"),
    regenerated: await import("@/app/api/v1/records/documents/[id]/regenerated.pdf/route"),
    facilities: await import("@/app/api/v1/facilities/route"),
    facility: await import("@/app/api/v1/facilities/[id]/route"),
    carriers: await import("@/app/api/v1/carriers/route"),
    carrier: await import("@/app/api/v1/carriers/[id]/route"),
  };
}
export type TRoutes = Awaited<ReturnType<typeof loadRoutes>>;

/** A JSON call to a route handler: method, path, key and body, returning status and parsed body. */
export async function call(
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  handler: (request: Request, ctx: any) => Promise<Response>,
  { path, method = "GET", key, body, ids = {} }: { path: string; method?: string; key?: string; body?: unknown; ids?: Record<string, string> },
) {
  const response = await handler(apiRequest(path, { method, key, body }), params(ids));
  const text = await response.text();
  let json: unknown = null;
  try {
    json = JSON.parse(text);
  } catch {
    json = text;
  }
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  return { status: response.status, body: json as any, headers: response.headers };
}
