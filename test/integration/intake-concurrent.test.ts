// Intakes that arrive at the same moment. On SQLite they share one commit (lib/db/fast-intake.ts, a group
// commit), each in its own savepoint; on PostgreSQL each is its own statement. Either way every intake must
// stand or fall on its own, and the site's totals must move by exactly the units stored. The expected totals are
// sums of the per-unit figures the engine returned (the site starts empty), not numbers kept in this file.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { fastIntake, type TUnitRow } from "@/lib/db/fast-intake";
import { db as appDb } from "@/lib/db/client";

let db: TDb;
let units: typeof import("@/app/api/v1/units/route");

beforeAll(async () => {
  db = await testDb();
  units = await import("@/app/api/v1/units/route");
});

const unitBody = (site: string, weightKg: number) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg, condition: "intact", source: "core-return" });

async function siteWithKey() {
  const { organisation, site } = await makeOrgWithSite(db);
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
  return { organisation, site, key };
}

const post = (key: string, body: unknown, headers: Record<string, string> = {}) =>
  units.POST(apiRequest("/api/v1/units", { method: "POST", key, body, headers }));

describe("intakes sent at the same moment", () => {
  test("all are stored, each answer carries the totals after its own unit, and the totals are the sum", async () => {
    const { site, key } = await siteWithKey();
    const weights = Array.from({ length: 12 }, (_, i) => 14 + i); // different units, so a lost or doubled one shows
    const responses = await Promise.all(weights.map((w) => post(key, unitBody(site.id, w))));
    expect(responses.map((r) => r.status)).toEqual(weights.map(() => 201));
    const bodies = await Promise.all(responses.map((r) => r.json()));

    // The answers' running counts are 1…12, each once: every intake saw the ones before it, and only those.
    expect(bodies.map((b) => b.siteTotals.unitCount).sort((a: number, b: number) => a - b)).toEqual(weights.map((_, i) => i + 1));
    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect(after.unitCount).toBe(12);
    const sum = (pick: (b: { unit: { batteryKg: number; leadKg: number } }) => number) => bodies.reduce((s, b) => s + pick(b), 0);
    expect(after.batteryKg).toBeCloseTo(sum((b) => b.unit.batteryKg), 9);
    expect(after.leadKg).toBeCloseTo(sum((b) => b.unit.leadKg), 9);
    // The answer with the highest count saw every unit: its totals are the site's.
    const last = bodies.find((b) => b.siteTotals.unitCount === 12)!;
    expect(last.siteTotals.batteryKg).toBeCloseTo(after.batteryKg, 9);
    const [stored, trail, levels] = await Promise.all([
      db.unit.count({ where: { siteId: site.id } }),
      db.trailEvent.count({ where: { siteId: site.id, action: "unit.received" } }),
      db.levelChange.count({ where: { siteId: site.id } }),
    ]);
    expect({ stored, trail, levels }).toEqual({ stored: 12, trail: 12, levels: 12 });
  });

  test("two sends of one Idempotency-Key among others store one unit for it and answer both with it", async () => {
    const { site, key } = await siteWithKey();
    const retryKey = randomUUID();
    const responses = await Promise.all([
      post(key, unitBody(site.id, 20)),
      post(key, unitBody(site.id, 18), { "idempotency-key": retryKey }),
      post(key, unitBody(site.id, 21)),
      post(key, unitBody(site.id, 18), { "idempotency-key": retryKey }),
      post(key, unitBody(site.id, 22)),
    ]);
    expect(responses.map((r) => r.status)).toEqual([201, 201, 201, 201, 201]);
    const [first, second] = await Promise.all([responses[1]!.json(), responses[3]!.json()]);
    expect(second.unit.id).toBe(first.unit.id);
    // Exactly one of the two is the replay.
    expect([responses[1]!, responses[3]!].map((r) => r.headers.get("Idempotent-Replayed")).filter((h) => h === "true")).toHaveLength(1);
    // The refused duplicate left nothing behind, and did not take its neighbours down with it.
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(4);
    expect((await db.site.findUniqueOrThrow({ where: { id: site.id } })).unitCount).toBe(4);
  });

  test("one intake that fails in the database fails alone; the others sent with it are stored", async () => {
    const { organisation, site } = await siteWithKey();
    const row = (siteId: string): TUnitRow => ({
      id: randomUUID(), siteId, containerId: null, kind: "flooded", nominalVoltage: 12, capacityAh: 60, cca: null, groupSize: null, weightKg: 18,
      condition: "intact", source: "core-return", state: "received", saleRef: null, note: null, senderName: null, senderAddress: null,
      receivedAt: new Date(), receivedBy: "test", method: "weighed", batteryKg: 18, batteryKgLow: 18, batteryKgHigh: 18, leadKg: 11, leadKgLow: 10,
      leadKgHigh: 12, electrolyteKg: 4, electrolyteKgLow: 3, electrolyteKgHigh: 5, acidKg: 1.5, acidKgLow: 1.2, acidKgHigh: 1.8, polymerKg: 1.5, otherKg: 1.5,
    });
    const intake = (siteId: string) =>
      fastIntake(appDb(), {
        unit: row(siteId),
        delta: { unitCount: 1, batteryKg: 18, leadKg: 11, electrolyteKg: 4, acidKg: 1.5 },
        trail: { organisationId: organisation.id, actor: "test", actorLabel: "test" },
        body: {},
      });
    // A site that is not there (deleted between the check and the write): the unit's foreign key refuses it.
    const outcomes = await Promise.allSettled([intake(site.id), intake(randomUUID()), intake(site.id)]);
    expect(outcomes.map((o) => o.status)).toEqual(["fulfilled", "rejected", "fulfilled"]);
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(2);
    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect(after.unitCount).toBe(2);
    expect(after.batteryKg).toBeCloseTo(36, 9);
  });
});
