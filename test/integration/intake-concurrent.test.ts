// Intakes that arrive at the same moment. On SQLite they share one commit (lib/db/fast-intake.ts, a group
// commit), each in its own savepoint; on PostgreSQL each is its own statement, several at once on the pool. Either way every intake must
// stand or fall on its own, and the site's totals must move by exactly the units stored. The expected totals are
// sums of the per-unit figures the engine returned (the site starts empty), not numbers kept in this file.
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { fastIntake, type TUnitRow } from "@/lib/db/fast-intake";

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

/** A unit row as recordIntake would hand it to the raw path: 18 kg, its parts in round figures. */
const row = (siteId: string): TUnitRow => ({
  id: randomUUID(), siteId, containerId: null, kind: "flooded", nominalVoltage: 12, capacityAh: 60, cca: null, groupSize: null, weightKg: 18,
  condition: "intact", source: "core-return", state: "received", saleRef: null, note: null, senderName: null, senderAddress: null,
  receivedAt: new Date(), receivedBy: "test", method: "weighed", batteryKg: 18, batteryKgLow: 18, batteryKgHigh: 18, leadKg: 11, leadKgLow: 10,
  leadKgHigh: 12, electrolyteKg: 4, electrolyteKgLow: 3, electrolyteKgHigh: 5, acidKg: 1.5, acidKgLow: 1.2, acidKgHigh: 1.8, polymerKg: 1.5, otherKg: 1.5,
});

const rawIntake = (organisationId: string, unit: TUnitRow, idempotencyKey?: string) => ({
  unit,
  delta: { unitCount: 1, batteryKg: 18, leadKg: 11, electrolyteKg: 4, acidKg: 1.5 },
  trail: { organisationId, actor: "test", actorLabel: "test" },
  idempotency: idempotencyKey ? { scope: "test intake", key: idempotencyKey } : undefined,
  body: { unit: { id: unit.id } },
});

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
    const intake = (siteId: string) => fastIntake(db, rawIntake(organisation.id, row(siteId)));
    // A site that is not there (deleted between the check and the write): the unit's foreign key refuses it.
    const outcomes = await Promise.allSettled([intake(site.id), intake(randomUUID()), intake(site.id)]);
    expect(outcomes.map((o) => o.status)).toEqual(["fulfilled", "rejected", "fulfilled"]);
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(2);
    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect(after.unitCount).toBe(2);
    expect(after.batteryKg).toBeCloseTo(36, 9);
  });

  test("intakes handed over in one turn are written together; a used key among them fails alone", async () => {
    const { organisation, site } = await siteWithKey();
    const key = randomUUID();
    // Sent in the same turn of the event loop: on SQLite one group commit; on PostgreSQL five statements at once.
    const outcomes = await Promise.allSettled([
      fastIntake(db, rawIntake(organisation.id, row(site.id))),
      fastIntake(db, rawIntake(organisation.id, row(site.id), key)),
      fastIntake(db, rawIntake(organisation.id, row(site.id))),
      fastIntake(db, rawIntake(organisation.id, row(site.id), key)),
      fastIntake(db, rawIntake(organisation.id, row(site.id))),
    ]);
    // One of the two with the key is refused (on SQLite the later one; on PostgreSQL whichever commits second).
    const refused = outcomes.flatMap((o, i) => (o.status === "rejected" ? [i] : []));
    expect(refused.length === 1 && [1, 3].includes(refused[0]!)).toBe(true);
    expect((outcomes[refused[0]!] as PromiseRejectedResult).reason.code).toBe("P2002"); // reported as Prisma reports a used key
    const keptIndex = refused[0] === 1 ? 3 : 1;
    const done = outcomes.flatMap((o) => (o.status === "fulfilled" ? [o.value] : []));
    expect(done.map((d) => d.siteTotals.unitCount).sort()).toEqual([1, 2, 3, 4]);
    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect(after.unitCount).toBe(4);
    expect(after.batteryKg).toBeCloseTo(4 * 18, 9);
    expect(done.find((d) => d.siteTotals.unitCount === 4)!.siteTotals.batteryKg).toBeCloseTo(after.batteryKg, 9);
    // The stored body for the key is the answer its intake got, totals included.
    const stored = await db.idempotencyKey.findUniqueOrThrow({ where: { scope_key: { scope: "test intake", key } } });
    expect(JSON.parse(stored.body)).toEqual((outcomes[keptIndex] as PromiseFulfilledResult<{ body: object }>).value.body);
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(4);
    expect(await db.trailEvent.count({ where: { siteId: site.id } })).toBe(4);
  });

  test("intakes handed over in one turn with nothing wrong are all stored, each with the totals after its own unit", async () => {
    const { organisation, site } = await siteWithKey();
    const keys = [randomUUID(), randomUUID(), randomUUID()];
    const done = await Promise.all(keys.map((k) => fastIntake(db, rawIntake(organisation.id, row(site.id), k))));
    // Each saw the ones written before it: counts 1, 2, 3 and 18, 36, 54 kg, in some order.
    expect(done.map((d) => [d.siteTotals.unitCount, d.siteTotals.batteryKg]).sort((x, y) => x[0]! - y[0]!)).toEqual(
      [1, 2, 3].map((n) => [n, expect.closeTo(18 * n, 9)]),
    );
    for (const [i, key] of keys.entries()) {
      const stored = await db.idempotencyKey.findUniqueOrThrow({ where: { scope_key: { scope: "test intake", key } } });
      expect(JSON.parse(stored.body)).toEqual(done[i]!.body);
    }
    const after = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect({ unitCount: after.unitCount, levels: await db.levelChange.count({ where: { siteId: site.id } }) }).toEqual({ unitCount: 3, levels: 3 });
  });
});
