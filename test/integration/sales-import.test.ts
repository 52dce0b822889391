import { createReadStream, mkdtempSync, readFileSync, rmSync, statSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeKey, makeOrgWithSite, makeSite, systemActor } from "../helpers/factories";
import { writeSalesFile } from "../unit/deposits/generate-sales";
import type { TDb } from "@/lib/db/client";

let db: TDb;
let route: typeof import("@/app/api/v1/imports/sales/route");
let lib: typeof import("@/lib/db/sales-import");
const FIXTURES = path.resolve(import.meta.dirname, "../fixtures/sales");
const tmp = mkdtempSync(path.join(os.tmpdir(), "leadger-import-test-"));

beforeAll(async () => {
  db = await testDb();
  route = await import("@/app/api/v1/imports/sales/route");
  lib = await import("@/lib/db/sales-import");
});
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

async function clerkAt(role: "clerk" | "yard" | "admin" = "clerk") {
  const { organisation, site } = await makeOrgWithSite(db);
  await db.site.update({ where: { id: site.id }, data: { jurisdiction: "US-WA", depositRuleId: "us-wa" } });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role });
  return { organisation, site, key };
}

/** The file streamed as a request body, the way a browser upload arrives. */
function upload(pathname: string, file: string, { key, accept }: { key: string; accept?: string }) {
  const headers = new Headers({ authorization: `Bearer ${key}`, "content-type": "text/csv" });
  if (accept) headers.set("accept", accept);
  return new Request(`http://localhost:3000${pathname}`, {
    method: "POST",
    headers,
    body: Readable.toWeb(createReadStream(file)) as ReadableStream<Uint8Array>,
    duplex: "half",
  } as RequestInit);
}

async function ledger(siteId: string) {
  const [sales, entries, sum, site, trail] = await Promise.all([
    db.sale.count({ where: { siteId } }),
    db.depositEntry.count({ where: { siteId } }),
    db.depositEntry.aggregate({ where: { siteId }, _sum: { amountCents: true } }),
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
    db.trailEvent.count({ where: { siteId } }),
  ]);
  return { sales, entries, entrySumCents: sum._sum.amountCents ?? 0, balanceCents: site.depositBalanceCents, trail };
}

const fixture = (name: string) => path.join(FIXTURES, name);

describe("POST /api/v1/imports/sales", () => {
  test("imports a clean file: a charge for each line with a deposit, a credit per battery for a line without, and the balance moves", async () => {
    const { site, key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key }));
    expect(response.status).toBe(201);
    const body = await response.json();
    // good.csv: 30.00 + 15.00 + 15.00 + 0.00 + 60 dollars = 12 000 cents over four charged lines; R-1004 (1 battery) handed in
    expect(body).toMatchObject({ isImported: true, rows: 5, newSales: 5, skipped: 0, chargeCount: 4, creditCount: 1, chargedCents: 12_000, balanceCents: 12_000, errorCount: 0 });
    expect(await ledger(site.id)).toEqual({ sales: 5, entries: 5, entrySumCents: 12_000, balanceCents: 12_000, trail: 1 });
    const sale = await db.sale.findUniqueOrThrow({ where: { siteId_saleRef: { siteId: site.id, saleRef: "R-1002" } } });
    expect(sale).toMatchObject({ product: "Starter 12 V, heavy duty", groupSize: "65", quantity: 1, depositCents: 1_500, importId: body.importId });
    // Stored at noon UTC of the day sold, so its calendar day is the file's date in the store's zone.
    expect(sale.soldAt.toISOString()).toBe("2025-03-01T12:00:00.000Z");
    const credit = await db.depositEntry.findFirstOrThrow({ where: { siteId: site.id, saleRef: "R-1004" } });
    expect(credit).toMatchObject({ kind: "credit", amountCents: 0, unitId: null });
  });

  test("a second import of the same file skips and counts every line and changes nothing", async () => {
    const { site, key } = await clerkAt();
    await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key }));
    const before = await ledger(site.id);
    const again = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key }));
    expect(again.status).toBe(201);
    expect(await again.json()).toMatchObject({ isImported: true, rows: 5, newSales: 0, skipped: 5, chargedCents: 0, balanceCents: 12_000 });
    expect(await ledger(site.id)).toEqual({ ...before, trail: before.trail + 1 });
  });

  test("a preview counts new and already-held lines and writes nothing", async () => {
    const { site, key } = await clerkAt();
    const first = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}&preview=1`, fixture("good.csv"), { key }));
    expect(first.status).toBe(200);
    expect(await first.json()).toMatchObject({ isPreview: true, isImported: false, rows: 5, newSales: 5, skipped: 0, importId: null });
    expect(await ledger(site.id)).toEqual({ sales: 0, entries: 0, entrySumCents: 0, balanceCents: 0, trail: 0 });
    await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key }));
    const second = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}&preview=1`, fixture("header-receipt-order.csv"), { key }));
    expect(await second.json()).toMatchObject({ rows: 2, newSales: 2, skipped: 0 });
    const third = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}&preview=true`, fixture("good.csv"), { key }));
    expect(await third.json()).toMatchObject({ rows: 5, newSales: 0, skipped: 5 });
  });

  test("a malformed file: every bad line is reported with its line number, and nothing is imported", async () => {
    const { site, key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("malformed.csv"), { key }));
    expect(response.status).toBe(400);
    const body = await response.json();
    // Lines read by hand from test/fixtures/sales/malformed.csv (line 1 is the header): 2, 10, 15 and 18 are good.
    expect([...new Set(body.error.issues.map((i: { line: number }) => i.line))]).toEqual([3, 4, 5, 6, 7, 8, 9, 11, 12, 13, 14, 16, 20, 21, 22]);
    expect(body.error.issues[0]).toEqual({ line: 3, field: "date", message: "date must be YYYY-MM-DD" });
    expect(body.error.message).toContain("nothing was imported");
    expect(body.result).toMatchObject({ isImported: false, errorCount: 16 });
    expect(await ledger(site.id)).toEqual({ sales: 0, entries: 0, entrySumCents: 0, balanceCents: 0, trail: 0 });
  });

  test.each([
    ["header-missing.csv", 1, "header", "missing: deposit, group_size"],
    ["header-twice.csv", 1, "header", "two columns both mean quantity"],
    ["duplicates.csv", 4, "sale_id", "sale id D-1 is already used on line 2"],
  ])("%s is refused at line %i (%s) and nothing is written", async (name, line, field, message) => {
    const { site, key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture(name), { key }));
    expect(response.status).toBe(400);
    const issues = (await response.json()).error.issues as Array<{ line: number; field: string; message: string }>;
    const issue = issues.find((i) => i.line === line && i.field === field);
    expect(issue?.message ?? JSON.stringify(issues)).toContain(message.split(": ")[0]!);
    expect((await ledger(site.id)).sales).toBe(0);
  });

  test("the header may use other spellings and another column order", async () => {
    const { site, key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("header-receipt-order.csv"), { key }));
    expect(response.status).toBe(201);
    // header-receipt-order.csv: 15.00 + 45.00
    expect(await response.json()).toMatchObject({ newSales: 2, chargedCents: 6_000, ignoredColumns: ["Clerk"] });
  });

  test("a file with some sales already held imports only the new ones", async () => {
    const { site, key } = await clerkAt();
    await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key }));
    const file = path.join(tmp, `mixed-${site.id}.csv`);
    await import("node:fs/promises").then((fs) =>
      fs.writeFile(file, "date,sale_id,product,group_size,quantity,deposit\n2025-03-01,R-1001,Starter 12 V 60 Ah,24F,2,30.00\n2025-04-01,R-2001,Starter 12 V,35,3,10.00\n"),
    );
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, file, { key }));
    expect(await response.json()).toMatchObject({ rows: 2, newSales: 1, skipped: 1, chargedCents: 1_000, balanceCents: 13_000 });
  });

  test("with Accept: application/x-ndjson the answer streams progress lines and ends with the result", async () => {
    const { site, key } = await clerkAt();
    const file = path.join(tmp, `ndjson-${site.id}.csv`);
    await writeSalesFile(file, 12_000);
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, file, { key, accept: "application/x-ndjson" }));
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toContain("application/x-ndjson");
    const lines = (await response.text()).trim().split("\n").map((l) => JSON.parse(l));
    const progress = lines.filter((l) => l.type === "progress");
    expect(progress.some((p) => p.phase === "receiving" && p.bytes > 0)).toBe(true);
    expect(progress.some((p) => p.phase === "importing")).toBe(true);
    expect(progress.at(-1)).toMatchObject({ phase: "importing", rows: 12_000 });
    const result = lines.at(-1);
    expect(result).toMatchObject({ type: "result", status: 201, body: { newSales: 12_000, isImported: true } });
  });

  test("a streamed answer for a bad file ends with the 400 and its issues", async () => {
    const { site, key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales?site=${site.id}`, fixture("malformed.csv"), { key, accept: "application/x-ndjson" }));
    const last = JSON.parse((await response.text()).trim().split("\n").at(-1)!);
    expect(last).toMatchObject({ type: "result", status: 400, body: { error: { code: "invalid_input" } } });
    expect(last.body.error.issues).toHaveLength(16);
  });

  test("401 without a key, 404 for a foreign site, 403 for a role without import; nothing written", async () => {
    const { organisation, site, key } = await clerkAt();
    const yard = await makeSite(db, organisation.id, { kind: "yard" });
    const yardKey = (await makeKey(db, { organisationId: organisation.id, siteId: yard.id, role: "yard" })).key;
    const foreign = await clerkAt();
    const post = (siteId: string, k?: string) =>
      route.POST(k ? upload(`/api/v1/imports/sales?site=${siteId}`, fixture("good.csv"), { key: k }) : apiRequest(`/api/v1/imports/sales?site=${siteId}`, { method: "POST", body: "x" }));
    expect((await post(site.id)).status).toBe(401);
    expect((await post(foreign.site.id, key)).status).toBe(404);
    expect((await post(yard.id, yardKey)).status).toBe(403);
    expect((await post(yard.id, key)).status).toBe(403);
    expect((await ledger(foreign.site.id)).sales).toBe(0);
    expect((await ledger(yard.id)).sales).toBe(0);
    const streamed = await route.POST(upload(`/api/v1/imports/sales?site=${yard.id}`, fixture("good.csv"), { key: yardKey, accept: "application/x-ndjson" }));
    expect(streamed.status).toBe(403);
  });

  test("a query without a site is a 400", async () => {
    const { key } = await clerkAt();
    const response = await route.POST(upload(`/api/v1/imports/sales`, fixture("good.csv"), { key }));
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues[0].field).toBe("site");
  });
});

describe("importSales", () => {

  test("an upload that arrives shorter than its Content-Length is refused and nothing is imported", async () => {
    const { organisation, site } = await clerkAt();
    const file = fixture("good.csv");
    const result = await lib.importSales(systemActor(organisation.id, site.id), { siteId: site.id, stream: createReadStream(file), expectedBytes: statSync(file).size + 100 });
    expect(result).toMatchObject({ isImported: false, errorCount: 1 });
    expect(result.errors[0]).toMatchObject({ line: 0, field: "file", message: expect.stringContaining("cut short") });
    expect((await ledger(site.id)).sales).toBe(0);
  });

  test("lines split the deposit of a several-battery line so refunds add back to it", async () => {
    const { organisation, site } = await clerkAt();
    const text = "date,sale_id,product,group_size,quantity,deposit\n2025-03-01,T-1,Starter 12 V,24F,3,10.00\n";
    const result = await lib.importSales(systemActor(organisation.id, site.id), { siteId: site.id, stream: Readable.from([Buffer.from(text)]) });
    expect(result).toMatchObject({ newSales: 1, chargedCents: 1_000 });
    const entry = await db.depositEntry.findFirstOrThrow({ where: { siteId: site.id, saleRef: "T-1" } });
    expect(entry).toMatchObject({ kind: "charge", amountCents: 1_000, at: new Date("2025-03-01T12:00:00.000Z") });
  });

  test(
    "a generated 100 000-line file is imported into the real database; a second import skips and counts all 100 000",
    async () => {
      const { organisation, site } = await clerkAt();
      const file = path.join(tmp, "sales-100k.csv");
      await writeSalesFile(file, 100_000);
      const actor = systemActor(organisation.id, site.id);
      const progress: number[] = [];
      const first = await lib.importSales(actor, { siteId: site.id, stream: createReadStream(file), onProgress: (p) => progress.push(p.rows) });
      // generate-sales.ts: quantity 1 + (i mod 4), deposit $15 a battery → 25 000 × (1+2+3+4) × 1 500 cents
      const expectedCents = 25_000 * 10 * 1_500;
      expect(first).toMatchObject({ isImported: true, rows: 100_000, newSales: 100_000, skipped: 0, chargeCount: 100_000, chargedCents: expectedCents, balanceCents: expectedCents });
      expect(progress.at(-1)).toBe(100_000);
      expect(await ledger(site.id)).toEqual({ sales: 100_000, entries: 100_000, entrySumCents: expectedCents, balanceCents: expectedCents, trail: 1 });

      const second = await lib.importSales(actor, { siteId: site.id, stream: createReadStream(file) });
      expect(second).toMatchObject({ isImported: true, rows: 100_000, newSales: 0, skipped: 100_000, chargedCents: 0, balanceCents: expectedCents });
      expect(await ledger(site.id)).toMatchObject({ sales: 100_000, entries: 100_000, balanceCents: expectedCents });
      expect(readFileSync(file).length).toBe(first.bytes);
    },
    180_000,
  );
});

describe("the import route's own same-origin check", () => {
  test("a request with cookies from a foreign origin is refused before anything is read", async () => {
    const { site, key } = await clerkAt();
    const request = upload(`/api/v1/imports/sales?site=${site.id}`, fixture("good.csv"), { key });
    request.headers.set("cookie", "session=x");
    request.headers.set("origin", "https://elsewhere.example");
    request.headers.set("host", "localhost:3000");
    const response = await route.POST(request);
    expect(response.status).toBe(403);
    expect((await ledger(site.id)).sales).toBe(0);
  });
});

describe("the import's one transaction", () => {

  test("a bad line after several stored batches rolls them all back, and the next import and intake go through", async () => {
    const { organisation, site } = await clerkAt();
    const file = path.join(tmp, `late-error-${site.id}.csv`);
    await writeSalesFile(file, 4_500); // batches of 1 000 lines are stored before the bad line is read
    await import("node:fs/promises").then((fs) => fs.appendFile(file, "2025-02-30,LATE-1,Starter 12 V,24F,1,15.00\n"));
    const actor = systemActor(organisation.id, site.id);
    const bad = await lib.importSales(actor, { siteId: site.id, stream: createReadStream(file) });
    // Line 1 is the header, 4 500 sales lines follow, so the bad one is line 4 502; 2025-02-30 is not a date.
    expect(bad).toMatchObject({ isImported: false, rows: 4_500, errorCount: 1, errors: [{ line: 4_502, field: "date" }] });
    expect(await ledger(site.id)).toEqual({ sales: 0, entries: 0, entrySumCents: 0, balanceCents: 0, trail: 0 });

    // Nothing is left holding the database: a Prisma transaction, an intake and a clean import all go through.
    const { recordIntake } = await import("@/lib/db/units");
    const { ZUnitIntake } = await import("@/lib/intake/schema");
    const unit = ZUnitIntake.parse({ site: site.id, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return" });
    expect((await recordIntake(actor, unit)).status).toBe(201);
    const good = await lib.importSales(actor, { siteId: site.id, stream: createReadStream(fixture("good.csv")) });
    expect(good).toMatchObject({ isImported: true, newSales: 5, balanceCents: 12_000 });
  });

  test("a line with no deposit gets one credit a battery, with ids derived from the sale's", async () => {
    const { organisation, site } = await clerkAt();
    const text = "date,sale_id,product,group_size,quantity,deposit\n2025-03-01,C-1,Starter 12 V,24F,3,0.00\n2025-03-01,C-2,Starter 12 V,24F,2,$30\n";
    const result = await lib.importSales(systemActor(organisation.id, site.id), { siteId: site.id, stream: Readable.from([Buffer.from(text)]) });
    // 3 batteries handed in on C-1 (no deposit), 2 batteries for $30.00 on C-2
    expect(result).toMatchObject({ newSales: 2, chargeCount: 1, creditCount: 3, chargedCents: 3_000, balanceCents: 3_000 });
    const sale = await db.sale.findUniqueOrThrow({ where: { siteId_saleRef: { siteId: site.id, saleRef: "C-1" } } });
    const entries = await db.depositEntry.findMany({ where: { siteId: site.id, saleRef: "C-1" }, orderBy: { id: "asc" } });
    expect(entries.map((e) => [e.id, e.kind, e.amountCents, e.unitId, e.createdBy])).toEqual([1, 2, 3].map((n) => [`${sale.id}:${n}`, "credit", 0, null, "system:test"]));
    expect(entries[0]!.at.toISOString()).toBe("2025-03-01T12:00:00.000Z");
    expect(sale).toMatchObject({ id: `${result.importId}:2`, importId: result.importId, quantity: 3, depositCents: 0 });
    const trail = await db.trailEvent.findFirstOrThrow({ where: { siteId: site.id, action: "sales.imported" } });
    expect(trail).toMatchObject({ entity: "import", entityId: result.importId, actor: "system:test" });
    expect(JSON.parse(trail.after!)).toMatchObject({ lines: 3, rows: 2, imported: 2, skipped: 0, creditCount: 3, chargedCents: 3_000 });
  });

  test("an intake and a sale recorded while an import runs both land, and the totals add up", async () => {
    const { organisation, site, key } = await clerkAt();
    const file = path.join(tmp, `concurrent-${site.id}.csv`);
    await writeSalesFile(file, 20_000);
    const actor = systemActor(organisation.id, site.id);
    const { recordIntake } = await import("@/lib/db/units");
    const { recordSale } = await import("@/lib/db/deposits");
    const { ZUnitIntake } = await import("@/lib/intake/schema");
    const unit = ZUnitIntake.parse({ site: site.id, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return" });
    // Sent once the import has stored its first lines, so they wait for it (SQLite) or run beside it (PostgreSQL).
    let during: Promise<[Awaited<ReturnType<typeof recordIntake>>, Awaited<ReturnType<typeof recordSale>>]> | undefined;
    const imported = await lib.importSales(actor, {
      siteId: site.id,
      stream: createReadStream(file),
      onProgress: (p) => {
        if (p.phase !== "importing" || p.rows === 0 || during) return;
        during = Promise.all([
          recordIntake(actor, unit, `${key.slice(-12)}-during-import`),
          recordSale(actor, { kind: "charge", site: site.id, saleRef: "DURING-1", product: "Starter 12 V", groupSize: "24F", quantity: 1, chargeCents: 1_500, handedIn: 0 }),
        ]);
      },
    });
    expect(during).toBeDefined();
    const [intake, sale] = await during!;
    // generate-sales.ts: 5 000 × (1+2+3+4) batteries at $15 in 20 000 lines; plus the one $15 sale
    expect(imported).toMatchObject({ isImported: true, newSales: 20_000 });
    expect(intake.status).toBe(201);
    expect(sale.balanceCents).toBeGreaterThanOrEqual(1_500);
    expect(await ledger(site.id)).toMatchObject({ sales: 20_001, entrySumCents: 5_000 * 10 * 1_500 + 1_500, balanceCents: 5_000 * 10 * 1_500 + 1_500 });
    expect(await db.unit.count({ where: { siteId: site.id } })).toBe(1);
  });
});
