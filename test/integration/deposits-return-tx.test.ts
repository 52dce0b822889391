// A return at the Counter is one transaction: the unit (with its totals, level change and trail event) and
// the deposit entry linked to it commit together or not at all, on SQLite and on PostgreSQL (npm run test:pg).
import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, systemActor } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { addDays, calendarDay } from "@/lib/deposits/calendar-day";
import { ZUnitIntake } from "@/lib/intake/schema";

let db: TDb;
let deposits: typeof import("@/app/api/v1/deposits/route");
let returns: typeof import("@/app/api/v1/deposits/returns/route");

beforeAll(async () => {
  db = await testDb();
  deposits = await import("@/app/api/v1/deposits/route");
  returns = await import("@/app/api/v1/deposits/returns/route");
});

/** A Washington store: core charge at least $5, refund with the receipt within 30 days (RCW 70A.205.515, REFERENCES.md). */
async function store() {
  const { organisation, site } = await makeOrgWithSite(db);
  await db.site.update({ where: { id: site.id }, data: { jurisdiction: "US-WA", depositRuleId: "us-wa" } });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
  return { organisation, site, key };
}

const daysAgo = (n: number) => addDays(calendarDay(new Date(), "America/Los_Angeles"), -n);
const sell = (key: string, site: string, saleRef: string, over: Record<string, unknown> = {}) =>
  deposits.POST(apiRequest("/api/v1/deposits", { method: "POST", key, body: { kind: "charge", site, saleRef, product: "Starter 12 V 60 Ah", groupSize: "24F", quantity: 1, chargeCents: 1_500, ...over } }));
const flooded = (site: string, saleRef: string, over: Record<string, unknown> = {}) => ({
  site,
  kind: "flooded",
  nominalVoltage: 12,
  capacityAh: 60,
  weightKg: 18,
  condition: "intact",
  source: "core-return",
  saleRef,
  ...over,
});
const counterReturn = (key: string, body: unknown, headers: Record<string, string> = {}) =>
  returns.POST(apiRequest("/api/v1/deposits/returns", { method: "POST", key, body, headers }));

/** Everything a return can write at a store. */
async function everything(siteId: string) {
  const [site, units, levels, trail, entries, keys] = await Promise.all([
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
    db.unit.findMany({ where: { siteId }, select: { id: true } }),
    db.levelChange.count({ where: { siteId } }),
    db.trailEvent.findMany({ where: { siteId }, select: { action: true } }),
    db.depositEntry.findMany({ where: { siteId }, select: { kind: true, amountCents: true, unitId: true } }),
    db.idempotencyKey.count({ where: { scope: { contains: "deposits/returns" }, key: { startsWith: siteId } } }),
  ]);
  return {
    totals: { unitCount: site.unitCount, batteryKg: site.batteryKg, leadKg: site.leadKg, acidKg: site.acidKg },
    balanceCents: site.depositBalanceCents,
    units: units.length,
    levels,
    trail: trail.map((t) => t.action).sort(),
    entries,
    keys,
  };
}

describe("a return at the Counter is one transaction", () => {
  test("a successful refund commits the unit, its totals and trail together with the refund entry linked to it", async () => {
    const { site, key } = await store();
    await sell(key, site.id, "TX-1", { soldOn: daysAgo(5) });
    const response = await counterReturn(key, { unit: flooded(site.id, "TX-1"), action: "refund" });
    expect(response.status).toBe(201);
    const body = await response.json();
    const after = await everything(site.id);
    expect(after).toMatchObject({ units: 1, levels: 1, balanceCents: 0, totals: { unitCount: 1 } });
    expect(after.totals.batteryKg).toBeCloseTo(body.unit.batteryKg, 9);
    expect(after.trail).toEqual(["deposit.charged", "deposit.return-refund", "unit.received"]);
    // The $15.00 charge of the sale and its refund, linked to the unit just logged.
    expect(after.entries).toEqual(expect.arrayContaining([{ kind: "charge", amountCents: 1_500, unitId: null }, { kind: "refund", amountCents: -1_500, unitId: body.unit.id }]));
    // One instant for both halves of the return.
    const entry = await db.depositEntry.findUniqueOrThrow({ where: { id: body.deposit.entry.id } });
    const unit = await db.unit.findUniqueOrThrow({ where: { id: body.unit.id } });
    expect(entry.at.toISOString()).toBe(unit.receivedAt.toISOString());
    expect(body.siteTotals.unitCount).toBe(1);
  });

  test.each([
    // A one-battery sale refunds once; the second battery back finds nothing held.
    ["the sale was already refunded", async (key: string, siteId: string) => {
      await sell(key, siteId, "TX-2");
      expect((await counterReturn(key, { unit: flooded(siteId, "TX-2"), action: "refund" })).status).toBe(201);
      return "TX-2";
    }, "action"],
    // Day 31 after the sale is outside Washington's 30-day window (RCW 70A.205.515).
    ["the refund window has closed", async (key: string, siteId: string) => {
      await sell(key, siteId, "TX-3", { soldOn: daysAgo(31) });
      return "TX-3";
    }, "action"],
    ["there is no such sale", async () => "TX-none", "saleRef"],
  ] as Array<[string, (key: string, siteId: string) => Promise<string>, string]>)("a refund refused because %s leaves no unit, no totals change, no trail event", async (_why, setUp, field) => {
    const { site, key } = await store();
    const saleRef = await setUp(key, site.id);
    const before = await everything(site.id);
    const response = await counterReturn(key, { unit: flooded(site.id, saleRef), action: "refund" });
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues[0].field).toBe(field);
    expect(await everything(site.id)).toEqual(before);
  });

  test("a refused refund of a unit stowed into a container rolls the container's totals back too", async () => {
    const { site, key } = await store();
    await sell(key, site.id, "TX-4", { soldOn: daysAgo(31) });
    const drum = await makeContainer(db, { siteId: site.id, isClosed: true });
    const before = await everything(site.id);
    const response = await counterReturn(key, { unit: flooded(site.id, "TX-4", { condition: "leaking", containerId: drum.id }), action: "refund" });
    expect(response.status).toBe(400);
    expect(await everything(site.id)).toEqual(before);
    const container = await db.container.findUniqueOrThrow({ where: { id: drum.id } });
    expect(container).toMatchObject({ unitCount: 0, batteryKg: 0, accumulationStart: null });

    // The rule allows a forfeit on day 31: the same unit then goes in, with its forfeit entry.
    const forfeited = await counterReturn(key, { unit: flooded(site.id, "TX-4", { condition: "leaking", containerId: drum.id }), action: "forfeit" });
    expect(forfeited.status).toBe(201);
    const body = await forfeited.json();
    expect(body.unit).toMatchObject({ state: "stowed", containerId: drum.id });
    expect(body.deposit).toMatchObject({ isBooked: true, entry: { kind: "forfeit", unitId: body.unit.id } });
    expect((await db.container.findUniqueOrThrow({ where: { id: drum.id } })).unitCount).toBe(1);
  });

  test("two returns of a one-battery sale at once: one refund with its unit, and the other writes nothing", async () => {
    const { site, key } = await store();
    await sell(key, site.id, "TX-5");
    const before = await everything(site.id);
    const answers = await Promise.all([0, 1].map(() => counterReturn(key, { unit: flooded(site.id, "TX-5"), action: "refund" })));
    expect(answers.map((a) => a.status).sort()).toEqual([201, 400]);
    const after = await everything(site.id);
    expect(after).toMatchObject({ units: before.units + 1, levels: before.levels + 1, balanceCents: 0, totals: { unitCount: 1 } });
    expect(after.entries.filter((e) => e.kind === "refund")).toHaveLength(1);
    expect(after.trail.filter((a) => a === "unit.received")).toHaveLength(1);
  });

  test("a retry with the same Idempotency-Key, after the sale is fully refunded, answers with the first response and books one refund", async () => {
    const { site, key } = await store();
    await sell(key, site.id, "TX-6");
    const send = () => counterReturn(key, { unit: flooded(site.id, "TX-6"), action: "refund" }, { "idempotency-key": `${site.id}-retry` });
    const first = await send();
    expect(first.status).toBe(201);
    const firstBody = await first.json();
    const afterFirst = await everything(site.id);
    const again = await send();
    expect(again.status).toBe(201);
    expect(again.headers.get("idempotent-replayed")).toBe("true");
    expect(await again.json()).toEqual(firstBody);
    expect(await everything(site.id)).toEqual(afterFirst);
    expect(afterFirst).toMatchObject({ units: 1, keys: 1 });
    expect(afterFirst.entries.filter((e) => e.kind === "refund")).toHaveLength(1);
  });

  test("the same Idempotency-Key twice at once: both answer with one response, one unit and one refund", async () => {
    const { site, key } = await store();
    await sell(key, site.id, "TX-7", { quantity: 2 });
    const send = () => counterReturn(key, { unit: flooded(site.id, "TX-7"), action: "refund" }, { "idempotency-key": `${site.id}-twice` });
    const answers = await Promise.all([send(), send()]);
    expect(answers.map((a) => a.status)).toEqual([201, 201]);
    const bodies = await Promise.all(answers.map((a) => a.json()));
    expect(bodies[1]).toEqual(bodies[0]);
    expect(answers.filter((a) => a.headers.get("idempotent-replayed") === "true")).toHaveLength(1);
    const after = await everything(site.id);
    // Two batteries at $15.00 charged as one $30.00 entry; one battery back refunds half (RCW 70A.205.515 per battery).
    expect(after).toMatchObject({ units: 1, keys: 1, balanceCents: 1_500 });
    expect(after.entries.filter((e) => e.kind === "refund")).toEqual([{ kind: "refund", amountCents: -1_500, unitId: bodies[0].unit.id }]);
  });
});

describe("recordIntake with work within its transaction", () => {

  test("a throw in `within` undoes the unit, its totals, level change, trail event, idempotency record and what it wrote", async () => {
    const { recordIntake } = await import("@/lib/db/units");
    const { organisation, site } = await store();
    const actor = systemActor(organisation.id, site.id);
    const before = await everything(site.id);
    const intake = ZUnitIntake.parse(flooded(site.id, "TX-8"));
    let seenUnit: string | undefined;
    await expect(
      recordIntake(actor, intake, `${site.id}-within`, {
        idempotencyScope: "POST /api/v1/deposits/returns",
        within: async (tx, unit) => {
          seenUnit = unit.id;
          // The unit is visible inside the transaction, and a write of the work itself is rolled back with it.
          expect(await tx.unit.count({ where: { id: unit.id } })).toBe(1);
          await tx.trailEvent.create({ data: { organisationId: organisation.id, siteId: site.id, actor: actor.ref, actorLabel: actor.label, action: "test.within", entity: "unit", entityId: unit.id } });
          throw new Error("booking failed");
        },
      }),
    ).rejects.toThrow("booking failed");
    expect(seenUnit).toBeDefined();
    expect(await db.unit.count({ where: { id: seenUnit } })).toBe(0);
    expect(await everything(site.id)).toEqual(before);
    expect(await db.idempotencyKey.count({ where: { key: `${site.id}-within` } })).toBe(0);
  });

  test("what `within` returns is part of the answer and of the idempotency record", async () => {
    const { recordIntake } = await import("@/lib/db/units");
    const { organisation, site } = await store();
    const actor = systemActor(organisation.id, site.id);
    const intake = ZUnitIntake.parse(flooded(site.id, "TX-9"));
    const first = await recordIntake(actor, intake, `${site.id}-extra`, { idempotencyScope: "test scope", within: async (_tx, unit) => ({ extra: { unitId: unit.id } }) });
    expect(first.body).toMatchObject({ extra: { unitId: (first.body as { unit: { id: string } }).unit.id } });
    const again = await recordIntake(actor, intake, `${site.id}-extra`, { idempotencyScope: "test scope", within: async () => ({ extra: "second" }) });
    // The first answer as it was sent (JSON), dates as text.
    const sent = JSON.parse(JSON.stringify(first.body));
    expect(again).toEqual({ status: 201, isReplay: true, body: sent });
    const stored = await db.idempotencyKey.findUniqueOrThrow({ where: { scope_key: { scope: `${actor.ref} test scope`, key: `${site.id}-extra` } } });
    expect(JSON.parse(stored.body)).toEqual(sent);
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(1);
  });
});
