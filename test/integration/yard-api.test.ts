import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import { decodeBarcodes, pdfPages, squash } from "../unit/papers/pdf-tools";
import type { TDb } from "@/lib/db/client";

let db: TDb;
let units: typeof import("@/app/api/v1/units/route");
let bays: typeof import("@/app/api/v1/bays/route");
let containers: typeof import("@/app/api/v1/containers/route");
let container: typeof import("@/app/api/v1/containers/[id]/route");
let stow: typeof import("@/app/api/v1/containers/[id]/units/route");
let label: typeof import("@/app/api/v1/containers/[id]/label.pdf/route");

beforeAll(async () => {
  db = await testDb();
  units = await import("@/app/api/v1/units/route");
  bays = await import("@/app/api/v1/bays/route");
  containers = await import("@/app/api/v1/containers/route");
  container = await import("@/app/api/v1/containers/[id]/route");
  stow = await import("@/app/api/v1/containers/[id]/units/route");
  label = await import("@/app/api/v1/containers/[id]/label.pdf/route");
});

const DAY = 86_400_000;
const flooded = (site: string, change: Record<string, unknown> = {}) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "fleet", ...change });

/** A yard with a yard manager's key, a clerk's key, and a bay. */
async function yard() {
  const { organisation, site } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "yard" });
  const { key: clerkKey } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
  const bay = await db.bay.create({ data: { siteId: site.id, name: "Bay A" } });
  return { organisation, site, key, clerkKey, bay };
}

async function intake(key: string, site: string, change: Record<string, unknown> = {}) {
  const response = await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: flooded(site, change) }));
  expect(response.status).toBe(201);
  return (await response.json()).unit as { id: string; batteryKg: number; leadKg: number; acidKg: number; electrolyteKg: number; receivedAt: string };
}

const post = (key: string | undefined, containerId: string, body: unknown) =>
  stow.POST(apiRequest(`/api/v1/containers/${containerId}/units`, { method: "POST", key, body }), params({ id: containerId }));

/** Everything a refused request must leave as it was. */
async function snapshot(siteId: string) {
  const [site, bayRows, containerRows, unitRows, trail, levels] = await Promise.all([
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
    db.bay.findMany({ where: { siteId }, orderBy: { id: "asc" } }),
    db.container.findMany({ where: { siteId }, orderBy: { id: "asc" } }),
    db.unit.findMany({ where: { siteId }, select: { id: true, containerId: true, state: true }, orderBy: { id: "asc" } }),
    db.trailEvent.count({ where: { siteId } }),
    db.levelChange.count({ where: { siteId } }),
  ]);
  return { site, bayRows, containerRows, unitRows, trail, levels };
}

describe("bays", () => {
  test("a yard manager adds a bay and lists them; a duplicate name is a 400 and writes nothing", async () => {
    const { site, key } = await yard();
    const created = await bays.POST(apiRequest("/api/v1/bays", { method: "POST", key, body: { site: site.id, name: "Bay B" } }));
    expect(created.status).toBe(201);
    expect((await created.json()).bay).toMatchObject({ siteId: site.id, name: "Bay B", unitCount: 0 });
    const before = await snapshot(site.id);
    const duplicate = await bays.POST(apiRequest("/api/v1/bays", { method: "POST", key, body: { site: site.id, name: "Bay B" } }));
    expect(duplicate.status).toBe(400);
    expect((await duplicate.json()).error.issues).toEqual([{ field: "name", message: expect.stringContaining("already a bay") }]);
    const blank = await bays.POST(apiRequest("/api/v1/bays", { method: "POST", key, body: { site: site.id, name: " " } }));
    expect(blank.status).toBe(400);
    expect(await snapshot(site.id)).toEqual(before);
    const listed = await bays.GET(apiRequest(`/api/v1/bays?site=${site.id}`, { key }));
    expect((await listed.json()).bays.map((b: { name: string }) => b.name)).toEqual(["Bay A", "Bay B"]);
  });

  test("403 for a clerk adding a bay, 404 for another organisation's site, 401 without a key", async () => {
    const { site, clerkKey, key } = await yard();
    const other = await makeOrgWithSite(db);
    expect((await bays.POST(apiRequest("/api/v1/bays", { method: "POST", key: clerkKey, body: { site: site.id, name: "X" } }))).status).toBe(403);
    expect((await bays.GET(apiRequest(`/api/v1/bays?site=${other.site.id}`, { key }))).status).toBe(404);
    expect((await bays.GET(apiRequest(`/api/v1/bays?site=${site.id}`))).status).toBe(401);
    expect(await db.bay.count({ where: { siteId: site.id } })).toBe(1);
  });
});

describe("containers", () => {
  test("created with the next label number, or the one given; listed by site and state; read one", async () => {
    const { site, key, bay } = await yard();
    const create = (body: Record<string, unknown>) => containers.POST(apiRequest("/api/v1/containers", { method: "POST", key, body: { site: site.id, ...body } }));
    const first = await create({ kind: "pallet", bayId: bay.id });
    expect(first.status).toBe(201);
    expect((await first.json()).container).toMatchObject({ labelNumber: "PAL-0001", state: "open", isClosed: false, bayId: bay.id, accumulationStart: null });
    expect((await (await create({ kind: "pallet" })).json()).container.labelNumber).toBe("PAL-0002");
    const drum = (await (await create({ kind: "drum", labelNumber: "D-7", isClosed: true })).json()).container;
    expect(drum).toMatchObject({ labelNumber: "D-7", isClosed: true });

    const listed = await (await containers.GET(apiRequest(`/api/v1/containers?site=${site.id}&state=open`, { key }))).json();
    expect(listed.containers.map((c: { labelNumber: string }) => c.labelNumber)).toEqual(["D-7", "PAL-0001", "PAL-0002"]);
    const one = await container.GET(apiRequest(`/api/v1/containers/${drum.id}`, { key }), params({ id: drum.id }));
    expect(one.status).toBe(200);
    expect((await one.json()).container).toMatchObject({ id: drum.id, site: { id: site.id } });
  });

  test.each([
    [{ kind: "crate" }, "kind", "pallet, box, tote, drum"],
    [{ kind: "pallet", labelNumber: "PAL—1" }, "labelNumber", "plain characters"],
    [{ kind: "pallet", labelNumber: "TAKEN-1" }, "labelNumber", "already in use"],
    [{ kind: "pallet", bayId: "no-such-bay" }, "bayId", "bay at this site"],
    [{ kind: "pallet", isClosed: "yes" }, "isClosed", "true or false"],
  ])("refuses %o with a 400 and writes nothing", async (body, field, message) => {
    const { site, key } = await yard();
    await makeContainer(db, { siteId: site.id }).then((c) => db.container.update({ where: { id: c.id }, data: { labelNumber: "TAKEN-1" } }));
    const before = await snapshot(site.id);
    const response = await containers.POST(apiRequest("/api/v1/containers", { method: "POST", key, body: { site: site.id, ...body } }));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([{ field, message: expect.stringContaining(message) }]));
    expect(await snapshot(site.id)).toEqual(before);
  });

  test("a bay of another site is refused like a missing one", async () => {
    const { organisation, site, key } = await yard();
    const sibling = await makeSite(db, organisation.id);
    const foreignBay = await db.bay.create({ data: { siteId: sibling.id, name: "Far bay" } });
    const response = await containers.POST(apiRequest("/api/v1/containers", { method: "POST", key, body: { site: site.id, kind: "pallet", bayId: foreignBay.id } }));
    expect(response.status).toBe(400);
  });

  test("403 for a clerk creating one and for a site without a role; 404 for another organisation's container", async () => {
    const { organisation, site, key, clerkKey } = await yard();
    const sibling = await makeSite(db, organisation.id);
    const other = await makeOrgWithSite(db);
    const foreign = await makeContainer(db, { siteId: other.site.id });
    expect((await containers.POST(apiRequest("/api/v1/containers", { method: "POST", key: clerkKey, body: { site: site.id, kind: "pallet" } }))).status).toBe(403);
    expect((await containers.GET(apiRequest(`/api/v1/containers?site=${sibling.id}`, { key }))).status).toBe(403);
    expect((await container.GET(apiRequest(`/api/v1/containers/${foreign.id}`, { key }), params({ id: foreign.id }))).status).toBe(404);
    expect((await container.PATCH(apiRequest(`/api/v1/containers/${foreign.id}`, { method: "PATCH", key, body: { state: "sealed" } }), params({ id: foreign.id }))).status).toBe(404);
    expect((await post(key, foreign.id, { scan: "anything" })).status).toBe(404);
    expect((await label.GET(apiRequest(`/api/v1/containers/${foreign.id}/label.pdf`, { key }), params({ id: foreign.id }))).status).toBe(404);
    expect(await db.container.count({ where: { siteId: site.id } })).toBe(0);
  });
});

describe("stowing and moving by scan", () => {
  test("a loose unit stowed by its id moves the container and bay totals by exactly that unit, not the site's", async () => {
    const { site, key, bay } = await yard();
    const pallet = await makeContainer(db, { siteId: site.id, bayId: bay.id });
    const unit = await intake(key, site.id);
    const siteBefore = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    const response = await post(key, pallet.id, { scan: unit.id });
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body.moved).toEqual({ units: 1, lots: 0, unitCount: 1 });
    expect(body.container).toMatchObject({ unitCount: 1, accumulationStart: unit.receivedAt });
    expect(body.container.batteryKg).toBeCloseTo(unit.batteryKg, 9);
    const bayAfter = await db.bay.findUniqueOrThrow({ where: { id: bay.id } });
    expect([bayAfter.unitCount, bayAfter.leadKg]).toEqual([1, unit.leadKg]);
    const siteAfter = await db.site.findUniqueOrThrow({ where: { id: site.id } });
    expect([siteAfter.unitCount, siteAfter.batteryKg]).toEqual([siteBefore.unitCount, siteBefore.batteryKg]);
    expect(await db.unit.findUniqueOrThrow({ where: { id: unit.id } })).toMatchObject({ containerId: pallet.id, state: "stowed" });
    const trail = await db.trailEvent.findMany({ where: { siteId: site.id, action: "unit.stowed" } });
    expect(trail).toHaveLength(1);
    expect(JSON.parse(trail[0]!.after!)).toMatchObject({ containerId: pallet.id });
    // A scanner reading a short id: the first 8 characters find the unit when only one matches.
    const second = await intake(key, site.id);
    expect((await post(key, pallet.id, { scan: second.id.slice(0, 8) })).status).toBe(200);
    expect((await db.container.findUniqueOrThrow({ where: { id: pallet.id } })).unitCount).toBe(2);
    // A scanner that sends upper case finds it too (ids are stored lower case).
    const third = await intake(key, site.id);
    expect((await post(key, pallet.id, { scan: third.id.slice(0, 8).toUpperCase() })).status).toBe(200);
    // LIKE's wildcards are not a prefix: "%%%%%%%%" must not match whichever unit comes first.
    const fourth = await intake(key, site.id);
    const wild = await post(key, pallet.id, { scan: "%%%%%%%%" });
    expect(wild.status).toBe(400);
    expect((await wild.json()).error.issues[0].field).toBe("scan");
    expect(await post(key, pallet.id, { scan: `${fourth.id.slice(0, 7)}_` }).then((r) => r.status)).toBe(400);
    expect((await db.unit.findUniqueOrThrow({ where: { id: fourth.id } })).containerId).toBeNull();
    expect((await db.container.findUniqueOrThrow({ where: { id: pallet.id } })).unitCount).toBe(3);
  });

  test("accumulation start on a move: the earlier of the two containers' dates; an emptied container loses its date", async () => {
    const { site, key, bay } = await yard();
    const [older, newer, empty] = await Promise.all([0, 1, 2].map(() => makeContainer(db, { siteId: site.id, bayId: bay.id })));
    const oldUnit = await intake(key, site.id);
    const newUnit = await intake(key, site.id);
    const received = new Date(Date.now() - 90 * DAY);
    await db.unit.update({ where: { id: oldUnit.id }, data: { receivedAt: received } });
    expect((await post(key, older!.id, { unitIds: [oldUnit.id] })).status).toBe(200);
    expect((await post(key, newer!.id, { unitIds: [newUnit.id] })).status).toBe(200);
    expect((await db.container.findUniqueOrThrow({ where: { id: older!.id } })).accumulationStart).toEqual(received);

    // Everything in the older container, scanned by its label, into the newer one: the newer takes the older date.
    const moved = await post(key, newer!.id, { scan: older!.labelNumber });
    expect(moved.status).toBe(200);
    const body = await moved.json();
    expect(body.from).toEqual([older!.labelNumber]);
    expect(new Date(body.container.accumulationStart)).toEqual(received);
    expect(body.container.unitCount).toBe(2);
    expect(body.container.batteryKg).toBeCloseTo(oldUnit.batteryKg + newUnit.batteryKg, 9);
    const emptied = await db.container.findUniqueOrThrow({ where: { id: older!.id } });
    expect([emptied.unitCount, emptied.accumulationStart]).toEqual([0, null]);
    expect(Math.abs(emptied.batteryKg)).toBeLessThan(1e-9);

    // A unit received today, moved out of that container, brings the container's earlier date with it.
    const single = await post(key, empty!.id, { unitIds: [newUnit.id] });
    expect(new Date((await single.json()).container.accumulationStart)).toEqual(received);
    // Moving it back into a container with a later date does not make that container younger than it.
    const source = await db.container.findUniqueOrThrow({ where: { id: newer!.id } });
    expect(source.accumulationStart).toEqual(received);
    expect(await db.trailEvent.count({ where: { siteId: site.id, action: "unit.moved" } })).toBe(2);
    const bayAfter = await db.bay.findUniqueOrThrow({ where: { id: bay.id } });
    expect(bayAfter.unitCount).toBe(2);
  });

  test("leaking units only into a closed container (40 CFR 273.13(a)(1)): refused into a pallet, nothing written", async () => {
    const { site, key } = await yard();
    const drum = await makeContainer(db, { siteId: site.id, isClosed: true });
    const pallet = await makeContainer(db, { siteId: site.id });
    const leaking = await intake(key, site.id, { condition: "leaking", containerId: drum.id });
    const cracked = await intake(key, site.id, { condition: "cracked", containerId: drum.id });
    const before = await snapshot(site.id);
    const refused = await post(key, pallet.id, { unitIds: [leaking.id] });
    expect(refused.status).toBe(400);
    const body = await refused.json();
    expect(body.error.message).toContain("closed");
    expect(body.error.issues[0]).toMatchObject({ field: "unitIds", message: expect.stringContaining("leaking or cracked") });
    expect((await post(key, pallet.id, { scan: drum.labelNumber })).status).toBe(400);
    expect(await snapshot(site.id)).toEqual(before);
    const otherDrum = await makeContainer(db, { siteId: site.id, isClosed: true });
    expect((await post(key, otherDrum.id, { unitIds: [leaking.id, cracked.id] })).status).toBe(200);
  });

  test.each([
    ["an unknown code", () => ({ scan: "NOPE-404" }), "scan", "nothing at this site"],
    ["two things at once", () => ({ scan: "x", lotId: "y" }), "scan", "exactly one"],
    ["a unit of another organisation", (ctx: { foreignUnit: string }) => ({ unitIds: [ctx.foreignUnit] }), "unitIds", "not at this site"],
    ["the target's own label", (ctx: { targetLabel: string }) => ({ scan: ctx.targetLabel }), "scan", "container you are filling"],
    ["a unit already in the target", (ctx: { inTarget: string }) => ({ unitIds: [ctx.inTarget] }), "unitIds", "already in"],
    ["an empty container", (ctx: { emptyLabel: string }) => ({ scan: ctx.emptyLabel }), "scan", "is empty"],
  ])("refuses %s with a 400 and writes nothing", async (_case, body, field, message) => {
    const { site, key } = await yard();
    const other = await makeOrgWithSite(db);
    const { key: otherKey } = await makeKey(db, { organisationId: other.organisation.id, siteId: other.site.id, role: "yard" });
    const foreignUnit = (await intake(otherKey, other.site.id)).id;
    const target = await makeContainer(db, { siteId: site.id });
    const empty = await makeContainer(db, { siteId: site.id });
    const inTarget = (await intake(key, site.id)).id;
    await post(key, target.id, { unitIds: [inTarget] });
    const before = await snapshot(site.id);
    const response = await post(key, target.id, body({ foreignUnit, targetLabel: target.labelNumber, inTarget, emptyLabel: empty.labelNumber } as never));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([{ field, message: expect.stringContaining(message) }]));
    expect(await snapshot(site.id)).toEqual(before);
  });

  test("403 for a clerk stowing, 401 without a key", async () => {
    const { site, key, clerkKey } = await yard();
    const pallet = await makeContainer(db, { siteId: site.id });
    const unit = await intake(key, site.id);
    expect((await post(clerkKey, pallet.id, { unitIds: [unit.id] })).status).toBe(403);
    expect((await post(undefined, pallet.id, { unitIds: [unit.id] })).status).toBe(401);
    expect((await db.unit.findUniqueOrThrow({ where: { id: unit.id } })).containerId).toBeNull();
  });
});

describe("sealing and bays", () => {
  test("a sealed container takes nothing more and its contents stay; an empty one cannot be sealed", async () => {
    const { site, key } = await yard();
    const pallet = await makeContainer(db, { siteId: site.id });
    const spare = await makeContainer(db, { siteId: site.id });
    const patch = (id: string, body: unknown, k = key) => container.PATCH(apiRequest(`/api/v1/containers/${id}`, { method: "PATCH", key: k, body }), params({ id }));
    const emptySeal = await patch(pallet.id, { state: "sealed" });
    expect(emptySeal.status).toBe(400);
    expect((await emptySeal.json()).error.issues[0].message).toContain("empty");
    const unit = await intake(key, site.id);
    await post(key, pallet.id, { unitIds: [unit.id] });
    const sealed = await patch(pallet.id, { state: "sealed" });
    expect(sealed.status).toBe(200);
    expect((await sealed.json()).container).toMatchObject({ state: "sealed", sealedAt: expect.any(String) });
    expect(await db.trailEvent.count({ where: { entityId: pallet.id, action: "container.sealed" } })).toBe(1);

    const before = await snapshot(site.id);
    const another = await intake(key, site.id);
    const after = await snapshot(site.id);
    expect((await post(key, pallet.id, { unitIds: [another.id] })).status).toBe(400);
    expect((await post(key, spare.id, { scan: pallet.labelNumber })).status).toBe(400);
    expect((await patch(pallet.id, { state: "sealed" })).status).toBe(400);
    expect((await patch(pallet.id, { state: "open" })).status).toBe(400);
    expect(await snapshot(site.id)).toEqual(after);
    expect(before.trail + 1).toBe(after.trail);
  });

  test("moving a container to another bay carries its totals", async () => {
    const { site, key, bay } = await yard();
    const bayB = await db.bay.create({ data: { siteId: site.id, name: "Bay B" } });
    const pallet = await makeContainer(db, { siteId: site.id, bayId: bay.id });
    const unit = await intake(key, site.id);
    await post(key, pallet.id, { unitIds: [unit.id] });
    const response = await container.PATCH(apiRequest(`/api/v1/containers/${pallet.id}`, { method: "PATCH", key, body: { bayId: bayB.id } }), params({ id: pallet.id }));
    expect(response.status).toBe(200);
    const [a, b] = await Promise.all([db.bay.findUniqueOrThrow({ where: { id: bay.id } }), db.bay.findUniqueOrThrow({ where: { id: bayB.id } })]);
    expect([a.unitCount, b.unitCount]).toEqual([0, 1]);
    expect(b.batteryKg).toBeCloseTo(unit.batteryKg, 9);
    expect(Math.abs(a.batteryKg)).toBeLessThan(1e-9);
    // Sending the bay it is already in changes nothing: 200 with the container as it is, and no trail event.
    const trailBefore = await db.trailEvent.count({ where: { entityId: pallet.id } });
    const same = await container.PATCH(apiRequest(`/api/v1/containers/${pallet.id}`, { method: "PATCH", key, body: { bayId: bayB.id } }), params({ id: pallet.id }));
    expect(same.status).toBe(200);
    expect((await same.json()).container.bayId).toBe(bayB.id);
    expect(await db.trailEvent.count({ where: { entityId: pallet.id } })).toBe(trailBefore);
  });

  test("a clerk cannot seal (403)", async () => {
    const { site, key, clerkKey } = await yard();
    const pallet = await makeContainer(db, { siteId: site.id });
    await post(key, pallet.id, { unitIds: [(await intake(key, site.id)).id] });
    const response = await container.PATCH(apiRequest(`/api/v1/containers/${pallet.id}`, { method: "PATCH", key: clerkKey, body: { state: "sealed" } }), params({ id: pallet.id }));
    expect(response.status).toBe(403);
    expect((await db.container.findUniqueOrThrow({ where: { id: pallet.id } })).state).toBe("open");
  });
});

describe("container label", () => {
  test("carries the rulebook wording, the start date and last day, the site, the caution and a Code 128 of the label number", async () => {
    const { site, key, clerkKey } = await yard();
    const drum = await makeContainer(db, { siteId: site.id, isClosed: true });
    await intake(key, site.id, { condition: "leaking", containerId: drum.id });
    await db.container.update({ where: { id: drum.id }, data: { accumulationStart: new Date("2026-01-05T10:00:00Z") } });
    const response = await label.GET(apiRequest(`/api/v1/containers/${drum.id}/label.pdf`, { key: clerkKey }), params({ id: drum.id }));
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/pdf");
    const pdf = Buffer.from(await response.arrayBuffer());
    const text = squash(pdfPages(pdf).join(" "));
    expect(text).toContain("Universal Waste—Batteries"); // 40 CFR 273.14(a), 273.34(a)
    expect(text).toContain("2026-01-05");
    // 365 days from the start date (day 0), as lib/limits/container-age.ts counts: 40 CFR 273.15(a)
    expect(text).toContain("Ship by 2027-01-05");
    expect(text).toContain(site.name);
    expect(text).toContain("acid-resistant gloves");
    expect(text).toMatch(/authority having jurisdiction/); // DESIGN.md §6 caution
    expect(decodeBarcodes(pdf)).toContain(drum.labelNumber);
  });
});

describe("GET /api/v1/openapi.json", () => {
  test("describes the yard, lot and limits operations from their zod schemas", async () => {
    const { GET } = await import("@/app/api/v1/openapi.json/route");
    const doc = await GET().json();
    expect(Object.keys(doc.paths)).toEqual(
      expect.arrayContaining(["/api/v1/containers", "/api/v1/containers/{id}", "/api/v1/containers/{id}/units", "/api/v1/containers/{id}/label.pdf", "/api/v1/lots", "/api/v1/bays", "/api/v1/sites/{id}/limits", "/api/v1/sites/{id}/rules", "/api/v1/sites/{id}/annual"]),
    );
    expect(doc.components.schemas.LotCreate.required).toEqual(expect.arrayContaining(["site", "ticketNumber", "grossKg", "tareKg", "unitCount", "mix"]));
    expect(doc.components.schemas.ContainerCreate.properties.kind.enum).toEqual(["pallet", "box", "tote", "drum"]);
    expect(doc.components.schemas.CustomRule.required).toContain("citation");
    expect(doc.paths["/api/v1/sites/{id}/annual"].get.parameters.map((p: { name: string }) => p.name)).toEqual(expect.arrayContaining(["id", "year", "format"]));
  });
});
