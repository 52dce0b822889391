import { spawnSync } from "node:child_process";
import path from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, params } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { changeSiteLevel, incrementBy, negate, pickTotals } from "@/lib/db/totals";
import { verifyTotals } from "@/lib/db/verify-totals";

let db: TDb;
let units: typeof import("@/app/api/v1/units/route");
let lots: typeof import("@/app/api/v1/lots/route");
let stow: typeof import("@/app/api/v1/containers/[id]/units/route");
let container: typeof import("@/app/api/v1/containers/[id]/route");

beforeAll(async () => {
  db = await testDb();
  units = await import("@/app/api/v1/units/route");
  lots = await import("@/app/api/v1/lots/route");
  stow = await import("@/app/api/v1/containers/[id]/units/route");
  container = await import("@/app/api/v1/containers/[id]/route");
});

const root = path.resolve(import.meta.dirname, "../..");

/** A mixed day at a yard, through the routes: intakes, lots, stows, moves, a seal, a bay change, and one departure. */
async function mixedSequence() {
  const { organisation, site } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "yard" });
  const [bayA, bayB] = await Promise.all(["A", "B"].map((name) => db.bay.create({ data: { siteId: site.id, name } })));
  const [p1, p2, p3] = await Promise.all([0, 1, 2].map(() => makeContainer(db, { siteId: site.id, bayId: bayA!.id })));
  const drum = await makeContainer(db, { siteId: site.id, isClosed: true, bayId: bayB!.id });
  const ok = async (response: Response | Promise<Response>) => {
    const r = await response;
    expect(r.status, await r.clone().text()).toBeLessThan(300);
    return r.json();
  };
  const intake = (change: Record<string, unknown> = {}) =>
    ok(units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: { site: site.id, kind: "agm", nominalVoltage: 12, capacityAh: 70, condition: "intact", source: "fleet", ...change } })));
  const into = (id: string, body: unknown) => ok(stow.POST(apiRequest(`/api/v1/containers/${id}/units`, { method: "POST", key, body }), params({ id })));

  const loose = [];
  for (let i = 0; i < 6; i++) loose.push((await intake({ weightKg: 15 + i })).unit.id as string);
  await intake({ condition: "leaking", containerId: drum.id });
  const lotA = (await ok(lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body: { site: site.id, ticketNumber: "MX-1", grossKg: 3_210.5, tareKg: 2_010, unitCount: 60, mix: [{ kind: "flooded", count: 45 }, { kind: "powersport", count: 15 }] } })))).lot;
  await ok(lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body: { site: site.id, ticketNumber: "MX-2", grossKg: 900, tareKg: 300, unitCount: 30, mixBasis: "share", mix: [{ kind: "deep-cycle", sharePct: 50 }, { kind: "agm", sharePct: 50 }], containerId: p2!.id } })));
  await into(p1!.id, { unitIds: loose.slice(0, 3) });
  await into(p1!.id, { scan: "MX-1" });
  await into(p2!.id, { scan: loose[3]! });
  await into(p3!.id, { scan: p1!.labelNumber }); // everything in p1, lot included, into p3
  await into(p1!.id, { unitIds: [loose[4]!] });
  await into(p2!.id, { lotId: lotA.id }); // the lot moves again
  await ok(container.PATCH(apiRequest(`/api/v1/containers/${p2!.id}`, { method: "PATCH", key, body: { bayId: bayB!.id } }), params({ id: p2!.id })));
  await ok(container.PATCH(apiRequest(`/api/v1/containers/${p3!.id}`, { method: "PATCH", key, body: { state: "sealed" } }), params({ id: p3!.id })));
  // A departure of p3 as the loads module will make it: its contents leave the site, its bay and the ledger together.
  await db.$transaction(async (tx) => {
    const c = await tx.container.update({ where: { id: p3!.id }, data: { state: "departed", bayId: null } });
    await tx.unit.updateMany({ where: { containerId: c.id }, data: { state: "departed" } });
    await tx.lot.updateMany({ where: { containerId: c.id }, data: { state: "departed" } });
    await tx.bay.update({ where: { id: bayA!.id }, data: incrementBy(negate(pickTotals(c))) });
    await changeSiteLevel(tx, { siteId: site.id, delta: negate(pickTotals(c)), reason: "departure", refId: c.id, at: new Date() });
  });
  return { site, p2: p2! };
}

describe("running totals against a recount of the records", () => {
  test("no drift after a mixed sequence; a hand-made change shows up as drift of that total only", async () => {
    const { site, p2 } = await mixedSequence();
    const clean = await verifyTotals(db, { siteIds: [site.id] });
    expect(clean.drift).toEqual([]);
    expect(clean.checked).toEqual({ sites: 1, bays: 2, containers: 3 });
    const siteRow = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    // p1: one unit; one loose; the drum: one; p2: lot MX-2 (30), one unit and lot MX-1 (60). p3's three units left.
    expect(siteRow.unitCount).toBe(1 + 1 + 1 + 30 + 1 + 60);

    await db.container.update({ where: { id: p2.id }, data: { leadKg: { increment: 0.5 } } });
    const dirty = await verifyTotals(db, { siteIds: [site.id] });
    expect(dirty.hasDrift).toBe(true);
    expect(dirty.drift.map((d) => [d.scope, d.id, d.fields.map((f) => f.field)])).toEqual([["container", p2.id, ["leadKg"]]]);
    expect(dirty.drift[0]!.fields[0]!.difference).toBeCloseTo(0.5, 9);
  });

  test("npm run verify:totals exits 0 when clean and 1 with the drifted total named", async () => {
    const { site } = await mixedSequence();
    const run = () =>
      spawnSync(process.execPath, ["--import", "tsx", "scripts/verify-totals.ts", "--site", site.id], { cwd: root, env: { ...process.env }, encoding: "utf8" });
    const clean = run();
    expect(clean.stdout).toContain("No drift");
    expect(clean.status).toBe(0);
    await db.site.update({ where: { id: site.id }, data: { unitCount: { increment: 1 } } });
    const dirty = run();
    expect(dirty.status).toBe(1);
    expect(dirty.stdout).toContain(`DRIFT site ${site.name}`);
    expect(dirty.stdout).toContain("unitCount: recorded");
  });
});
