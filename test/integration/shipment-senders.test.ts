// Who sent a unit or a lot, from intake to the shipment records. 40 CFR 273.39 (REFERENCES.md, Storage, status V):
// for each shipment received, the origin's name and address, the quantity by type and the date received.
// That a household is not a handler (so a counter return from the public needs no sender) is the project's
// reading, from memory of 40 CFR 273.8 and 273.9: the test checks that the records say so, not that it is right.
import Papa from "papaparse";
import { beforeAll, describe, expect, test } from "vitest";
import type { TDb } from "@/lib/db/client";
import { ADDRESS_NOT_RECORDED, LOT_NO_SENDER, NO_SENDER_ORIGIN, RECORDS_NOTES } from "@/lib/db/papers";
import { SENDER_LIMITS } from "@/lib/intake/sender-fields";
import { CAUTION, sha256 } from "@/lib/papers/pdf-base";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite } from "../helpers/factories";
import { pdfPages, squash } from "../unit/papers/pdf-tools";

let db: TDb;
let units: typeof import("@/app/api/v1/units/route");
let lots: typeof import("@/app/api/v1/lots/route");
let records: typeof import("@/app/api/v1/records/route");

beforeAll(async () => {
  db = await testDb();
  units = await import("@/app/api/v1/units/route");
  lots = await import("@/app/api/v1/lots/route");
  records = await import("@/app/api/v1/records/route");
});

const today = () => new Date().toISOString().slice(0, 10);

async function yardSite() {
  const { organisation, site, tag } = await makeOrgWithSite(db, { kind: "yard" });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "admin" });
  return { site, key, tag };
}

const unitBody = (site: string, change: Record<string, unknown> = {}) => ({ site, kind: "flooded", nominalVoltage: 12, weightKg: 18, condition: "intact", source: "fleet", ...change });
const lotBody = (site: string, change: Record<string, unknown> = {}) => ({
  site,
  ticketNumber: `T-${Math.random().toString(36).slice(2, 10)}`,
  grossKg: 1_400,
  tareKg: 1_000,
  unitCount: 20,
  mix: [{ kind: "flooded", nominalVoltage: 12, count: 20 }],
  ...change,
});

const postUnit = (key: string, body: unknown) => units.POST(apiRequest("/api/v1/units", { method: "POST", key, body }));
const postLot = (key: string, body: unknown) => lots.POST(apiRequest("/api/v1/lots", { method: "POST", key, body }));

async function written(siteId: string) {
  const [unitCount, lotCount, trail, levels, site] = await Promise.all([
    db.unit.count({ where: { siteId } }),
    db.lot.count({ where: { siteId } }),
    db.trailEvent.count({ where: { siteId } }),
    db.levelChange.count({ where: { siteId } }),
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
  ]);
  return { unitCount, lotCount, trail, levels, siteUnits: site.unitCount, batteryKg: site.batteryKg };
}

describe("the sender at intake", () => {
  test("a unit logged through the API keeps its sender: the raw intake row reads back through Prisma, and the trail has it", async () => {
    const { site, key, tag } = await yardSite();
    const sender = { senderName: `  Test Fleet ${tag} `, senderAddress: "12 Depot Row\nTestville" };
    const response = await postUnit(key, unitBody(site.id, sender));
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.unit).toMatchObject({ senderName: `Test Fleet ${tag}`, senderAddress: "12 Depot Row\nTestville", containerId: null });
    const stored = await db.unit.findUniqueOrThrow({ where: { id: body.unit.id } });
    expect(stored).toMatchObject({ senderName: `Test Fleet ${tag}`, senderAddress: "12 Depot Row\nTestville", source: "fleet", state: "received" });
    const event = await db.trailEvent.findFirstOrThrow({ where: { entity: "unit", entityId: stored.id } });
    expect(JSON.parse(event.after!)).toMatchObject({ senderName: `Test Fleet ${tag}`, senderAddress: "12 Depot Row\nTestville" });
  });

  test("a unit stowed into a container at intake keeps its sender too; one without a sender stores none", async () => {
    const { site, key, tag } = await yardSite();
    const pallet = await makeContainer(db, { siteId: site.id });
    const stowed = await (await postUnit(key, unitBody(site.id, { containerId: pallet.id, source: "purchased-scrap", senderName: `Scrap seller ${tag}` }))).json();
    expect(await db.unit.findUniqueOrThrow({ where: { id: stowed.unit.id } })).toMatchObject({ containerId: pallet.id, state: "stowed", senderName: `Scrap seller ${tag}`, senderAddress: null });
    const plain = await (await postUnit(key, unitBody(site.id, { source: "core-return", senderName: "   ", senderAddress: "" }))).json();
    expect(await db.unit.findUniqueOrThrow({ where: { id: plain.unit.id } })).toMatchObject({ senderName: null, senderAddress: null });
  });

  test("a lot from a scale ticket keeps its sender, and the lot list shows it", async () => {
    const { site, key, tag } = await yardSite();
    const response = await postLot(key, lotBody(site.id, { senderName: `Garage ${tag}`, senderAddress: "7 Ticket Lane, Testville" }));
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(await db.lot.findUniqueOrThrow({ where: { id: body.lot.id } })).toMatchObject({ senderName: `Garage ${tag}`, senderAddress: "7 Ticket Lane, Testville", netKg: 400 });
    const list = await (await lots.GET(apiRequest(`/api/v1/lots?site=${site.id}`, { key }))).json();
    expect(list.lots[0]).toMatchObject({ id: body.lot.id, senderName: `Garage ${tag}` });
  });

  test(`exactly ${SENDER_LIMITS.nameChars} and ${SENDER_LIMITS.addressChars} characters are accepted`, async () => {
    const { site, key } = await yardSite();
    const response = await postUnit(key, unitBody(site.id, { senderName: "n".repeat(SENDER_LIMITS.nameChars), senderAddress: "a".repeat(SENDER_LIMITS.addressChars) }));
    expect(response.status).toBe(201);
    expect((await response.json()).unit.senderName).toHaveLength(SENDER_LIMITS.nameChars);
  });

  const badSenders: [string, Record<string, unknown>, string, string][] = [
    ["a name one character too long", { senderName: "n".repeat(SENDER_LIMITS.nameChars + 1) }, "senderName", `at most ${SENDER_LIMITS.nameChars} characters`],
    ["an address one character too long", { senderName: "Fleet", senderAddress: "a".repeat(SENDER_LIMITS.addressChars + 1) }, "senderAddress", `at most ${SENDER_LIMITS.addressChars} characters`],
    ["an address with no name", { senderAddress: "12 Depot Row" }, "senderName", "give the sender's name with the address"],
    ["a name that is not text", { senderName: 42 }, "senderName", "must be text"],
  ];

  test.each(badSenders)("a unit with %s is a 400 with a field item, and nothing is written", async (_name, change, field, message) => {
    const { site, key } = await yardSite();
    const before = await written(site.id);
    const response = await postUnit(key, unitBody(site.id, change));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await written(site.id)).toEqual(before);
  });

  test.each(badSenders)("a lot with %s is a 400 with a field item, and nothing is written", async (_name, change, field, message) => {
    const { site, key } = await yardSite();
    const before = await written(site.id);
    const response = await postLot(key, lotBody(site.id, change));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await written(site.id)).toEqual(before);
  });

  test("the OpenAPI document lists the optional sender fields with their limits", async () => {
    const { GET } = await import("@/app/api/v1/openapi.json/route");
    const schemas = (await GET().json()).components.schemas;
    for (const id of ["UnitIntake", "LotCreate"]) {
      expect(schemas[id].properties.senderName).toMatchObject({ type: "string", maxLength: SENDER_LIMITS.nameChars });
      expect(schemas[id].properties.senderAddress).toMatchObject({ type: "string", maxLength: SENDER_LIMITS.addressChars });
      expect(schemas[id].required).not.toContain("senderName");
      expect(schemas[id].required).not.toContain("senderAddress");
    }
  });
});

describe("the sender on the shipment records (40 CFR 273.39)", () => {
  /** One day at a yard: two units from one fleet, one from another, a scrap seller with no address, a counter return, a drop-off, and two lots. */
  async function dayOfDeliveries() {
    const s = await yardSite();
    const fleet = { senderName: `Fleet ${s.tag}`, senderAddress: "12 Depot Row\nTestville" };
    for (const change of [
      { ...fleet },
      { ...fleet, kind: "agm" },
      { ...fleet, kind: "agm" },
      { senderName: `Other fleet ${s.tag}`, senderAddress: "9 Far Road" },
      { source: "purchased-scrap", senderName: `Scrap ${s.tag}` },
      { source: "core-return" },
      { source: "drop-off" },
    ]) {
      expect((await postUnit(s.key, unitBody(s.site.id, change))).status).toBe(201);
    }
    const withSender = await (await postLot(s.key, lotBody(s.site.id, { senderName: `Garage ${s.tag}`, senderAddress: "7 Ticket Lane\nTestville" }))).json();
    const without = await (await postLot(s.key, lotBody(s.site.id))).json();
    return { ...s, fleet, tickets: { withSender: withSender.lot.ticketNumber as string, without: without.lot.ticketNumber as string } };
  }

  const query = (siteId: string, format = "csv") => `/api/v1/records?site=${siteId}&from=${today()}&to=${today()}&format=${format}`;

  test("the CSV prints each recorded sender's name and address, and a clear \"sender not recorded\" only where there is none", async () => {
    const s = await dayOfDeliveries();
    const res = await records.GET(apiRequest(query(s.site.id), { key: s.key }));
    expect(res.status).toBe(200);
    const parsed = Papa.parse<Record<string, string>>((await res.text()).trim(), { header: true, newline: "\r\n" });
    expect(parsed.errors).toEqual([]);
    const received = parsed.data.filter((r) => r.direction === "received");
    const rowsOf = (name: string) => received.filter((r) => r.counterpart_name === name);

    // One shipment per day and sender, one row per type: the fleet's three units are one flooded and two AGM.
    const fleetRows = rowsOf(`Fleet ${s.tag}`);
    expect(fleetRows.map((r) => [r.type, r.count, r.counterpart_address]).sort()).toEqual([
      ["lead-acid batteries, AGM 12 V (UN2800)", "2", "12 Depot Row, Testville"],
      ["lead-acid batteries, Flooded starting 12 V (UN2794)", "1", "12 Depot Row, Testville"],
    ]);
    expect(fleetRows.every((r) => r.date === today() && r.reference === "units logged (Fleet)")).toBe(true);
    expect(rowsOf(`Other fleet ${s.tag}`).map((r) => [r.counterpart_address, r.count])).toEqual([["9 Far Road", "1"]]);
    expect(rowsOf(`Scrap ${s.tag}`).map((r) => r.counterpart_address)).toEqual([ADDRESS_NOT_RECORDED]);
    expect(rowsOf(`Garage ${s.tag}`).map((r) => [r.counterpart_address, r.count, r.reference])).toEqual([["7 Ticket Lane, Testville", "20", `scale ticket ${s.tickets.withSender}`]]);

    // Without a sender: the counter return reads as from the public; the drop-off and the lot say "sender not recorded".
    expect(rowsOf(NO_SENDER_ORIGIN["core-return"]!).map((r) => [r.counterpart_address, r.count])).toEqual([["", "1"]]);
    expect(NO_SENDER_ORIGIN["core-return"]).toContain("the project's reading");
    expect(rowsOf("Drop-offs (sender not recorded)").map((r) => r.count)).toEqual(["1"]);
    expect(rowsOf(LOT_NO_SENDER).map((r) => [r.counterpart_address, r.reference])).toEqual([["", `scale ticket ${s.tickets.without}`]]);
    const notRecorded = received.filter((r) => r.counterpart_name.includes("sender not recorded"));
    expect(notRecorded.map((r) => r.reference).sort()).toEqual([`scale ticket ${s.tickets.without}`, "units logged (Drop-off)"].sort());
    expect(received.reduce((t, r) => t + Number(r.count), 0)).toBe(7 + 20 + 20);

    const json = await (await records.GET(apiRequest(query(s.site.id, "json"), { key: s.key }))).json();
    expect(json.notes).toEqual([RECORDS_NOTES.household, RECORDS_NOTES.notRecorded]);
  });

  test("the issued PDF shows the senders, the rows without one, and the reading for counter returns with the caution", async () => {
    const s = await dayOfDeliveries();
    const res = await records.GET(apiRequest(query(s.site.id, "pdf"), { key: s.key }));
    expect(res.status).toBe(200);
    const bytes = Buffer.from(await res.arrayBuffer());
    const pages = pdfPages(bytes);
    const lines = pages.join("\n").split("\n").map(squash);
    // The origin cell: the name on the row's line, the address lines joined at the start of the next (where the
    // wrapped type and reference continue beside it).
    const addressUnder = (name: string) => {
      const row = lines.findIndex((l) => l.startsWith(`${today()} ${name} lead-acid batteries`));
      expect(row, name).toBeGreaterThan(-1);
      return lines[row + 1];
    };
    expect(addressUnder(`Fleet ${s.tag}`)).toMatch(/^12 Depot Row, Testville\b/);
    expect(addressUnder(`Garage ${s.tag}`)).toMatch(/^7 Ticket Lane, Testville\b/);
    expect(addressUnder(`Scrap ${s.tag}`)?.startsWith(ADDRESS_NOT_RECORDED)).toBe(true);
    const text = squash(pages.join(" "));
    expect(text).toContain("Drop-offs (sender not recorded)");
    expect(text).toContain(LOT_NO_SENDER);
    expect(text).toContain(RECORDS_NOTES.household);
    expect(text).toContain(RECORDS_NOTES.notRecorded);
    // DESIGN.md §6: the reading is a legal conclusion, so the paper carries the caution (in every page's footer).
    pages.forEach((page) => expect(squash(page)).toContain(CAUTION));
    const stored = await db.document.findFirstOrThrow({ where: { siteId: s.site.id, kind: "records" } });
    expect(stored.sha256).toBe(sha256(bytes));
    expect(JSON.parse(stored.input).received).toEqual(expect.arrayContaining([expect.objectContaining({ counterpart: { name: `Fleet ${s.tag}`, address: s.fleet.senderAddress, regulatoryIds: "" } })]));
  });

  test("with every sender recorded and no counter return, no row says \"sender not recorded\" and no note is added", async () => {
    const s = await yardSite();
    expect((await postUnit(s.key, unitBody(s.site.id, { senderName: `Fleet ${s.tag}`, senderAddress: "1 Only Road" }))).status).toBe(201);
    expect((await postLot(s.key, lotBody(s.site.id, { senderName: `Garage ${s.tag}`, senderAddress: "2 Only Road" }))).status).toBe(201);
    const csv = await (await records.GET(apiRequest(query(s.site.id), { key: s.key }))).text();
    expect(csv).not.toContain("not recorded");
    expect(csv).toContain(`received,${today()},Fleet ${s.tag},1 Only Road,`);
    expect(csv).toContain(`received,${today()},Garage ${s.tag},2 Only Road,`);
    const json = await (await records.GET(apiRequest(query(s.site.id, "json"), { key: s.key }))).json();
    expect(json.notes).toEqual([]);
    const text = squash(pdfPages(Buffer.from(await (await records.GET(apiRequest(query(s.site.id, "pdf"), { key: s.key }))).arrayBuffer())).join(" "));
    expect(text).not.toContain("not recorded");
    expect(text).not.toContain(RECORDS_NOTES.household);
  });
});
