import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import { estimateComposition } from "@/lib/chemistry";

let db: TDb;
let lots: typeof import("@/app/api/v1/lots/route");
let stow: typeof import("@/app/api/v1/containers/[id]/units/route");

beforeAll(async () => {
  db = await testDb();
  lots = await import("@/app/api/v1/lots/route");
  stow = await import("@/app/api/v1/containers/[id]/units/route");
});

const ticket = (site: string, change: Record<string, unknown> = {}) => ({
  site,
  ticketNumber: `T-${Math.random().toString(36).slice(2, 8)}`,
  grossKg: 11_240,
  tareKg: 10_240,
  unitCount: 50,
  mix: [{ kind: "flooded", nominalVoltage: 12, count: 50 }],
  ...change,
});

async function yard() {
  const { organisation, site } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "yard" });
  return { organisation, site, key };
}

const send = (key: string | undefined, body: unknown) => lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body }));

async function counts(siteId: string) {
  const [lotCount, trail, levels, site, containers] = await Promise.all([
    db.lot.count({ where: { siteId } }),
    db.trailEvent.count({ where: { siteId } }),
    db.levelChange.count({ where: { siteId } }),
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
    db.container.findMany({ where: { siteId }, orderBy: { id: "asc" } }),
  ]);
  return { lotCount, trail, levels, unitCount: site.unitCount, batteryKg: site.batteryKg, containers };
}

describe("POST /api/v1/lots", () => {
  test("stores the lot with net = gross − tare and the engine's composition; the site's totals and ledger move by the lot", async () => {
    const { site, key } = await yard();
    const response = await send(key, ticket(site.id));
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.lot).toMatchObject({ netKg: 1_000, grossKg: 11_240, tareKg: 10_240, unitCount: 50, state: "received", containerId: null });
    // One kind, 20 kg a unit: the same as 50 weighed units of that kind from the engine.
    const one = estimateComposition({ kind: "flooded", nominalVoltage: 12, weightKg: 20 });
    expect(body.lot.leadKg).toBeCloseTo(one.leadKg.value * 50, 6);
    expect(body.lot.leadKgLow).toBeCloseTo(one.leadKg.low * 50, 6);
    expect(body.lot.acidKgHigh).toBeCloseTo(one.sulfuricAcidKg.high * 50, 6);
    expect(body.composition.leadKg.low).toBeLessThanOrEqual(body.composition.leadKg.value);
    expect(body.siteTotals).toMatchObject({ unitCount: 50, batteryKg: 1_000 });

    const level = await db.levelChange.findFirstOrThrow({ where: { siteId: site.id } });
    expect(level).toMatchObject({ reason: "lot", refId: body.lot.id, unitCount: 50, batteryKg: 1_000 });
    expect(level.acidKg).toBeCloseTo(body.lot.acidKg, 9);
    const trail = await db.trailEvent.findFirstOrThrow({ where: { siteId: site.id } });
    expect(trail).toMatchObject({ action: "lot.received", entity: "lot", entityId: body.lot.id });
    expect(JSON.parse(body.lot.mix)).toEqual([{ kind: "flooded", nominalVoltage: 12, share: 1, units: 50, massKg: 1_000 }]);
  });

  test("a lot received into a container counts in its totals and starts its date; later stowed by scanning the ticket", async () => {
    const { site, key } = await yard();
    const bay = await db.bay.create({ data: { siteId: site.id, name: "Scale bay" } });
    const pallet = await makeContainer(db, { siteId: site.id, bayId: bay.id });
    const response = await send(key, ticket(site.id, { containerId: pallet.id, mixBasis: "share", mix: [{ kind: "flooded", sharePct: 80 }, { kind: "agm", sharePct: 20 }] }));
    expect(response.status).toBe(201);
    const { lot } = await response.json();
    expect(lot.state).toBe("stowed");
    const after = await db.container.findUniqueOrThrow({ where: { id: pallet.id } });
    expect(after).toMatchObject({ unitCount: 50, batteryKg: 1_000, accumulationStart: new Date(lot.receivedAt) });
    expect(after.acidKg).toBeCloseTo(lot.acidKg, 9);
    expect((await db.bay.findUniqueOrThrow({ where: { id: bay.id } })).unitCount).toBe(50);

    const loose = (await (await send(key, ticket(site.id, { ticketNumber: "SCALE-77" }))).json()).lot;
    const scanned = await stow.POST(apiRequest(`/api/v1/containers/${pallet.id}/units`, { method: "POST", key, body: { scan: "SCALE-77" } }), params({ id: pallet.id }));
    expect(scanned.status).toBe(200);
    expect((await scanned.json()).moved).toEqual({ units: 0, lots: 1, unitCount: 50 });
    expect(await db.lot.findUniqueOrThrow({ where: { id: loose.id } })).toMatchObject({ containerId: pallet.id, state: "stowed" });
    expect((await db.container.findUniqueOrThrow({ where: { id: pallet.id } })).unitCount).toBe(100);
    const siteRow = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect([siteRow.unitCount, siteRow.batteryKg]).toEqual([100, 2_000]);
  });

  test.each([
    ["tare above gross", { grossKg: 900, tareKg: 1_000 }, "tareKg", "more than gross"],
    ["net ÷ count under 1 kg", { grossKg: 1_049, tareKg: 1_000, unitCount: 50 }, "unitCount", "between 1 and 80 kg"],
    ["net ÷ count over 80 kg", { grossKg: 5_001, tareKg: 1_000, unitCount: 50 }, "unitCount", "between 1 and 80 kg"],
    ["missing ticket number", { ticketNumber: undefined }, "ticketNumber", "ticket number is required"],
    ["blank ticket number", { ticketNumber: "  " }, "ticketNumber", "ticket number is required"],
    ["duplicate ticket at the site", { ticketNumber: "DUP-1" }, "ticketNumber", "already recorded at this site"],
    ["mix that does not add up", { mix: [{ kind: "flooded", count: 49 }] }, "mix", "add up to 49"],
    ["a container that is not open", { containerId: "SEALED" }, "containerId", "is sealed"],
    ["a container of another site", { containerId: "ELSEWHERE" }, "containerId", "container at this site"],
    // 500 characters: the project's own limit, the same as a unit's note (lib/intake/schema.ts); no outside source.
    ["a note over 500 characters", { note: "n".repeat(501) }, "note", "at most 500 characters"],
  ])("refuses %s with a 400 field message and writes nothing", async (_case, change, field, message) => {
    const { organisation, site, key } = await yard();
    expect((await send(key, ticket(site.id, { ticketNumber: "DUP-1" }))).status).toBe(201);
    const sealed = await makeContainer(db, { siteId: site.id, state: "sealed" });
    const elsewhere = await makeContainer(db, { siteId: (await makeSite(db, organisation.id)).id });
    const resolved = { ...change } as Record<string, unknown>;
    if (resolved.containerId === "SEALED") resolved.containerId = sealed.id;
    if (resolved.containerId === "ELSEWHERE") resolved.containerId = elsewhere.id;
    const before = await counts(site.id);
    const response = await send(key, ticket(site.id, resolved));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([{ field, message: expect.stringContaining(message) }]));
    expect(await counts(site.id)).toEqual(before);
  });

  test("a note is stored with the lot, trimmed, and read back from the list; a blank one is not stored", async () => {
    const { site, key } = await yard();
    const note = "  Two cases cracked on arrival, set aside for the closed drum.  ";
    const response = await send(key, ticket(site.id, { ticketNumber: "N-1", note }));
    expect(response.status).toBe(201);
    const { lot } = await response.json();
    expect(lot.note).toBe(note.trim());
    expect((await db.lot.findUniqueOrThrow({ where: { id: lot.id } })).note).toBe(note.trim());
    // The longest note allowed (500 characters, the project's own limit) is kept whole.
    const longest = "m".repeat(500);
    expect((await send(key, ticket(site.id, { ticketNumber: "N-2", note: longest }))).status).toBe(201);
    expect((await send(key, ticket(site.id, { ticketNumber: "N-3", note: "   " }))).status).toBe(201);
    expect((await send(key, ticket(site.id, { ticketNumber: "N-4" }))).status).toBe(201);

    const listed = await lots.GET(apiRequest(`/api/v1/lots?site=${site.id}`, { key }));
    const byTicket = Object.fromEntries((await listed.json()).lots.map((l: { ticketNumber: string; note: string | null }) => [l.ticketNumber, l.note]));
    expect(byTicket).toEqual({ "N-1": note.trim(), "N-2": longest, "N-3": null, "N-4": null });
  });

  test("the same ticket number at another site is a different ticket", async () => {
    const a = await yard();
    const b = await yard();
    expect((await send(a.key, ticket(a.site.id, { ticketNumber: "4471" }))).status).toBe(201);
    expect((await send(b.key, ticket(b.site.id, { ticketNumber: "4471" }))).status).toBe(201);
  });

  test("403 for a clerk, 404 for another organisation's site, 401 without a key; GET lists the site's lots", async () => {
    const { organisation, site, key } = await yard();
    const { key: clerkKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
    const other = await makeOrgWithSite(db);
    expect((await send(clerkKey, ticket(site.id))).status).toBe(403);
    expect((await send(key, ticket(other.site.id))).status).toBe(404);
    expect((await send(undefined, ticket(site.id))).status).toBe(401);
    expect(await db.lot.count({ where: { siteId: { in: [site.id, other.site.id] } } })).toBe(0);

    await send(key, ticket(site.id, { ticketNumber: "L-1" }));
    await send(key, ticket(site.id, { ticketNumber: "L-2" }));
    const listed = await lots.GET(apiRequest(`/api/v1/lots?site=${site.id}`, { key: clerkKey }));
    expect(listed.status).toBe(200);
    expect((await listed.json()).lots.map((l: { ticketNumber: string }) => l.ticketNumber).sort()).toEqual(["L-1", "L-2"]);
    expect((await lots.GET(apiRequest(`/api/v1/lots?site=${other.site.id}`, { key }))).status).toBe(404);
    expect((await lots.GET(apiRequest(`/api/v1/lots`, { key }))).status).toBe(400);
  });
});
