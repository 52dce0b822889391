import { beforeAll, describe, expect, test } from "vitest";
import { testDb } from "../helpers/db";
import { apiRequest, makeContainer, makeKey, makeOrgWithSite, makeSite, params } from "../helpers/factories";
import type { TDb } from "@/lib/db/client";
import type { TRole } from "@/lib/auth/permissions";
import { addDays, calendarDay } from "@/lib/deposits/calendar-day";
import { GENERAL_CAUTION } from "@/lib/cautions";

let db: TDb;
let deposits: typeof import("@/app/api/v1/deposits/route");
let check: typeof import("@/app/api/v1/deposits/check/route");
let returns: typeof import("@/app/api/v1/deposits/returns/route");
let forfeits: typeof import("@/app/api/v1/deposits/forfeits/route");
let rule: typeof import("@/app/api/v1/deposits/rule/route");
let reports: typeof import("@/app/api/v1/deposits/reports/[name]/route");

beforeAll(async () => {
  db = await testDb();
  deposits = await import("@/app/api/v1/deposits/route");
  check = await import("@/app/api/v1/deposits/check/route");
  returns = await import("@/app/api/v1/deposits/returns/route");
  forfeits = await import("@/app/api/v1/deposits/forfeits/route");
  rule = await import("@/app/api/v1/deposits/rule/route");
  reports = await import("@/app/api/v1/deposits/reports/[name]/route");
});

/** A store under a built-in rule; Washington, California and Arizona stores count days in their own zone. */
async function store({ ruleId = "us-wa", jurisdiction = "US-WA", role = "clerk" as TRole } = {}) {
  const { organisation, site } = await makeOrgWithSite(db);
  await db.site.update({ where: { id: site.id }, data: { jurisdiction, depositRuleId: ruleId } });
  const { key } = await makeKey(db, { organisationId: organisation.id, siteId: site.id, role });
  return { organisation, site, key };
}

const ZONE: Record<string, string> = { "US-WA": "America/Los_Angeles", "US-CA": "America/Los_Angeles", "US-AZ": "America/Phoenix" };
const daysAgo = (n: number, jurisdiction = "US-WA") => addDays(calendarDay(new Date(), ZONE[jurisdiction]), -n);

const post = (key: string, body: unknown) => deposits.POST(apiRequest("/api/v1/deposits", { method: "POST", key, body }));
const sell = (key: string, site: string, over: Record<string, unknown> = {}) =>
  post(key, { kind: "charge", site, saleRef: `S-${Math.random().toString(36).slice(2, 10)}`, product: "Starter 12 V 60 Ah", groupSize: "24F", quantity: 1, chargeCents: 1_500, ...over });
const refund = (key: string, site: string, saleRef: string, unitId?: string) => post(key, { kind: "refund", site, saleRef, unitId });
const flooded = (site: string, saleRef?: string) => ({ site, kind: "flooded", nominalVoltage: 12, capacityAh: 60, weightKg: 18, condition: "intact", source: "core-return", saleRef });
const counterReturn = (key: string, body: unknown, headers: Record<string, string> = {}) =>
  returns.POST(apiRequest("/api/v1/deposits/returns", { method: "POST", key, body, headers }));

async function ledger(siteId: string) {
  const [site, sum, entries, sales, units, trail] = await Promise.all([
    db.site.findUniqueOrThrow({ where: { id: siteId } }),
    db.depositEntry.aggregate({ where: { siteId }, _sum: { amountCents: true } }),
    db.depositEntry.count({ where: { siteId } }),
    db.sale.count({ where: { siteId } }),
    db.unit.count({ where: { siteId } }),
    db.trailEvent.count({ where: { siteId } }),
  ]);
  return { balanceCents: site.depositBalanceCents, entrySumCents: sum._sum.amountCents ?? 0, entries, sales, units, trail };
}

describe("POST /api/v1/deposits: sales with a charge or a credit", () => {
  test("a charge sale stores the sale, one charge entry and the trail, and moves the balance by the deposit", async () => {
    const { site, key } = await store();
    const response = await sell(key, site.id, { saleRef: "R-1", quantity: 2 });
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body).toMatchObject({ kind: "charge", balanceCents: 3_000, sale: { saleRef: "R-1", quantity: 2, depositCents: 3_000 } });
    expect(await ledger(site.id)).toEqual({ balanceCents: 3_000, entrySumCents: 3_000, entries: 1, sales: 1, units: 0, trail: 1 });
    const event = await db.trailEvent.findFirstOrThrow({ where: { siteId: site.id } });
    expect(event).toMatchObject({ action: "deposit.charged", entity: "sale", entityId: body.sale.id });
  });

  test("used batteries handed in at the till are not charged and get a credit each", async () => {
    const { site, key } = await store();
    const response = await sell(key, site.id, { saleRef: "R-2", quantity: 3, handedIn: 2 });
    expect(response.status).toBe(201);
    expect((await response.json()).balanceCents).toBe(1_500);
    const entries = await db.depositEntry.findMany({ where: { siteId: site.id }, orderBy: { kind: "asc" } });
    expect(entries.map((e) => [e.kind, e.amountCents])).toEqual([["charge", 1_500], ["credit", 0], ["credit", 0]]);
  });

  test("a credit sale (every battery matched) holds nothing", async () => {
    const { site, key } = await store();
    const response = await post(key, { kind: "credit", site: site.id, saleRef: "C-1", product: "Starter 12 V", quantity: 2 });
    expect(response.status).toBe(201);
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 0, entries: 2, sales: 1 });
  });

  test.each([
    [{ saleRef: "" }, "saleRef", "sale reference is required"],
    [{ quantity: 0 }, "quantity", "from 1 to 100"],
    [{ quantity: 2.5 }, "quantity", "whole number"],
    [{ handedIn: 1 }, "handedIn", "fewer than the batteries sold"],
    [{ chargeCents: 499 }, "chargeCents", "at least $5.00 a battery (RCW 70A.205.515"], // WA least charge $5, RCW 70A.205.515
    [{ chargeCents: 12.5 }, "chargeCents", "whole number"],
    [{ soldOn: "2025-02-30" }, "soldOn", "real date"],
    [{ soldOn: "2999-01-01" }, "soldOn", "or earlier"],
    [{ product: undefined }, "product", "product is required"],
    [{ kind: "forfeit" }, "kind", "forfeits are booked by running forfeits"],
  ])("refuses %o with a field message and writes nothing", async (change, field, message) => {
    const { site, key } = await store();
    const response = await sell(key, site.id, change);
    expect(response.status).toBe(400);
    const body = await response.json();
    expect(body.error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field, message: expect.stringContaining(message) })]));
    expect(await ledger(site.id)).toEqual({ balanceCents: 0, entrySumCents: 0, entries: 0, sales: 0, units: 0, trail: 0 });
  });

  test("a sale reference already recorded at the store is refused", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "R-9" });
    const again = await sell(key, site.id, { saleRef: "R-9" });
    expect(again.status).toBe(400);
    expect((await again.json()).error.issues[0]).toMatchObject({ field: "saleRef" });
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 1_500, sales: 1 });
  });

  test("a body that is not JSON is a 400", async () => {
    const { key } = await store();
    expect((await deposits.POST(apiRequest("/api/v1/deposits", { method: "POST", key, body: "{oops" }))).status).toBe(400);
  });
});

describe("refund windows end to end (sale date in the store's zone, return today)", () => {
  test.each([
    // RCW 70A.205.515 (WA): 30 days; Cal. HSC §25215.25 (CA) and A.R.S. §44-1323 (AZ): 45 days. Sale day = day 0.
    ["us-wa", "US-WA", 30, true],
    ["us-wa", "US-WA", 31, false],
    ["us-ca", "US-CA", 45, true],
    ["us-ca", "US-CA", 46, false],
    ["us-az", "US-AZ", 45, true],
    ["us-az", "US-AZ", 46, false],
  ])("%s (%s): a return on day %i is inside: %s", async (ruleId, jurisdiction, days, isInside) => {
    const { site, key } = await store({ ruleId, jurisdiction });
    const chargeCents = ruleId === "us-wa" ? 1_500 : 2_000;
    const saleRef = `W-${days}`;
    expect((await sell(key, site.id, { saleRef, soldOn: daysAgo(days, jurisdiction), chargeCents })).status).toBe(201);

    const verdict = await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=${saleRef}`, { key }));
    expect(verdict.status).toBe(200);
    const body = await verdict.json();
    expect(body.due).toMatchObject({ daysSinceSale: days, isInsideWindow: isInside, refundCents: isInside ? chargeCents : 0 });
    expect(body.options.map((o: { kind: string }) => o.kind)).toEqual(isInside ? ["refund"] : ["accept-free", "forfeit"]);
    expect(body.rule.citation).toMatch(ruleId === "us-wa" ? /RCW 70A\.205\.515/ : ruleId === "us-ca" ? /25215\.25/ : /44-1323/);
    expect(body.caution).toBe(GENERAL_CAUTION);

    const response = await refund(key, site.id, saleRef);
    expect(response.status).toBe(isInside ? 201 : 400);
    if (isInside) {
      expect(await response.json()).toMatchObject({ balanceCents: 0, amountCents: -chargeCents, entry: { kind: "refund" } });
    } else {
      const issue = (await response.json()).error.issues[0];
      expect(issue.field).toBe("saleRef");
      expect(issue.message).toContain(`day ${days}`);
    }
    expect(await ledger(site.id)).toMatchObject({ balanceCents: isInside ? 0 : chargeCents, entries: isInside ? 2 : 1 });
  });
});

describe("no double refunds", () => {
  test("a one-battery sale refunds once; the second is refused and the balance stays", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "D-1" });
    expect((await refund(key, site.id, "D-1")).status).toBe(201);
    const second = await refund(key, site.id, "D-1");
    expect(second.status).toBe(400);
    expect((await second.json()).error.issues[0].message).toContain("already been returned");
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 0, entrySumCents: 0, entries: 2 });
  });

  test("two refunds of the same battery at once: exactly one is booked", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "D-2" });
    const statuses = (await Promise.all([refund(key, site.id, "D-2"), refund(key, site.id, "D-2"), refund(key, site.id, "D-2")])).map((r) => r.status).sort();
    expect(statuses).toEqual([201, 400, 400]);
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 0, entries: 2 });
  });

  test("a line of three batteries refunds three times, shares adding up to its deposit, then no more", async () => {
    const { site, key } = await store();
    // An imported line may carry a deposit that does not split evenly; here 3 batteries for $10.00 (common practice in tests of rounding).
    const sale = await db.sale.create({ data: { siteId: site.id, saleRef: "D-3", soldAt: new Date(), product: "Starter", quantity: 3, depositCents: 1_000 } });
    await db.depositEntry.create({ data: { siteId: site.id, saleRef: sale.saleRef, kind: "charge", amountCents: 1_000, at: sale.soldAt, createdBy: "test" } });
    await db.site.update({ where: { id: site.id }, data: { depositBalanceCents: 1_000 } });
    const amounts: number[] = [];
    for (let i = 0; i < 3; i++) amounts.push((await (await refund(key, site.id, "D-3")).json()).amountCents);
    expect(amounts).toEqual([-333, -333, -334]);
    expect((await refund(key, site.id, "D-3")).status).toBe(400);
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 0, entrySumCents: 0 });
  });

  test("an unknown sale reference is a field problem; a foreign site is a 404", async () => {
    const { site, key } = await store();
    const unknown = await refund(key, site.id, "NOPE");
    expect(unknown.status).toBe(400);
    expect((await unknown.json()).error.issues[0]).toMatchObject({ field: "saleRef", message: expect.stringContaining("no sale NOPE") });
    const foreign = await store();
    expect((await refund(key, foreign.site.id, "NOPE")).status).toBe(404);
    expect((await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=NOPE`, { key }))).status).toBe(404);
  });
});

describe("POST /api/v1/deposits/returns: a return at the Counter", () => {
  test("logs the unit and the refund linked to it; totals and balance move together", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-1", soldOn: daysAgo(12) });
    const response = await counterReturn(key, { unit: flooded(site.id, "K-1"), action: "refund" });
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.unit).toMatchObject({ saleRef: "K-1", state: "received" });
    expect(body.siteTotals.unitCount).toBe(1);
    expect(body.deposit).toMatchObject({ isBooked: true, action: "refund", amountCents: -1_500, balanceCents: 0, entry: { kind: "refund", unitId: body.unit.id } });
    expect(body.deposit.message).toContain("Refund $15.00");
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 0, entrySumCents: 0, units: 1 });
    const actions = (await db.trailEvent.findMany({ where: { siteId: site.id } })).map((e) => e.action).sort();
    expect(actions).toEqual(["deposit.charged", "deposit.return-refund", "unit.received"]);
  });

  test("outside the window a refund is refused before anything is written; a forfeit is booked instead", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-2", soldOn: daysAgo(31) });
    const before = await ledger(site.id);
    const refused = await counterReturn(key, { unit: flooded(site.id, "K-2"), action: "refund" });
    expect(refused.status).toBe(400);
    const issue = (await refused.json()).error.issues[0];
    expect(issue.field).toBe("action");
    expect(issue.message).toContain("after the 30-day refund window");
    expect(await ledger(site.id)).toEqual(before);

    const forfeited = await counterReturn(key, { unit: flooded(site.id, "K-2"), action: "forfeit" });
    expect(forfeited.status).toBe(201);
    const body = await forfeited.json();
    expect(body.deposit).toMatchObject({ isBooked: true, amountCents: -1_500, balanceCents: 0, entry: { kind: "forfeit", unitId: body.unit.id } });
    // Once forfeited nothing is held: only taking it back free is left.
    const after = await (await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=K-2`, { key }))).json();
    expect(after.options.map((o: { kind: string }) => o.kind)).toEqual(["accept-free"]);
    expect(after.due.reason).toContain("already recorded as forfeited");
  });

  test("a battery handed in at the sale is linked to its credit; no money moves", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-3", quantity: 2, handedIn: 1 });
    const verdict = await (await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=K-3`, { key }))).json();
    expect(verdict.options.map((o: { kind: string }) => o.kind)).toEqual(["credit", "refund"]);
    const response = await counterReturn(key, { unit: flooded(site.id, "K-3"), action: "credit" });
    expect(response.status).toBe(201);
    const body = await response.json();
    expect(body.deposit).toMatchObject({ isBooked: true, amountCents: 0, balanceCents: 1_500, entry: { kind: "credit", unitId: body.unit.id } });
    // The other battery was charged: it refunds once; a third return finds nothing held.
    expect((await (await counterReturn(key, { unit: flooded(site.id, "K-3"), action: "refund" })).json()).deposit.balanceCents).toBe(0);
    expect((await counterReturn(key, { unit: flooded(site.id, "K-3"), action: "refund" })).status).toBe(400);
    expect((await counterReturn(key, { unit: flooded(site.id, "K-3"), action: "credit" })).status).toBe(400);
  });

  test("a retry with the same Idempotency-Key logs one unit and books one refund", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-4" });
    const send = () => counterReturn(key, { unit: flooded(site.id, "K-4"), action: "refund" }, { "idempotency-key": "counter-k4-0001" });
    const first = await (await send()).json();
    const second = await send();
    expect(second.headers.get("idempotent-replayed")).toBe("true");
    const body = await second.json();
    expect(body.unit.id).toBe(first.unit.id);
    expect(body.deposit).toMatchObject({ isBooked: true, entry: { id: first.deposit.entry.id } });
    expect(await ledger(site.id)).toMatchObject({ units: 1, entries: 2, balanceCents: 0 });
  });

  test.each([
    [{ action: "refund", unit: { saleRef: undefined } }, "unit.saleRef"],
    [{ action: "pay-twice" }, "action"],
    [{ action: "refund", unit: { saleRef: "NOPE" } }, "saleRef"],
    [{ action: "refund", unit: { condition: "leaking" } }, "unit.containerId"],
  ] as Array<[{ action: string; unit?: Record<string, unknown> }, string]>)("refuses %o at %s with nothing written", async (change, field) => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-5" });
    const before = await ledger(site.id);
    const body = { action: change.action, unit: { ...flooded(site.id, "K-5"), ...(change.unit ?? {}) } };
    const response = await counterReturn(key, body);
    expect(response.status).toBe(400);
    expect((await response.json()).error.issues.map((i: { field: string }) => i.field)).toContain(field);
    expect(await ledger(site.id)).toEqual(before);
  });

  test("a refund by API can be linked to a unit already logged, once", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "K-6", quantity: 2 });
    const units = await import("@/app/api/v1/units/route");
    const unit = (await (await units.POST(apiRequest("/api/v1/units", { method: "POST", key, body: flooded(site.id, "K-6") }))).json()).unit;
    const first = await refund(key, site.id, "K-6", unit.id);
    expect((await first.json()).entry.unitId).toBe(unit.id);
    const again = await refund(key, site.id, "K-6", unit.id);
    expect(again.status).toBe(400);
    expect((await again.json()).error.issues[0]).toMatchObject({ field: "unitId", message: expect.stringContaining("already has a refund") });
    const elsewhere = await makeContainer(db, { siteId: site.id });
    expect((await refund(key, site.id, "K-6", elsewhere.id)).status).toBe(400);
  });
});

describe("forfeits", () => {
  test("running forfeits books one entry per sale past its window with deposit held, once", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "F-old", soldOn: daysAgo(31), quantity: 2 });
    await sell(key, site.id, { saleRef: "F-edge", soldOn: daysAgo(30) });
    await sell(key, site.id, { saleRef: "F-new", soldOn: daysAgo(3) });
    await sell(key, site.id, { saleRef: "F-back", soldOn: daysAgo(40) });
    // F-back's battery came back in time: its refund entry, as the Counter would have booked it.
    await db.depositEntry.create({ data: { siteId: site.id, saleRef: "F-back", kind: "refund", amountCents: -1_500, at: new Date(), createdBy: "test" } });
    await db.site.update({ where: { id: site.id }, data: { depositBalanceCents: { decrement: 1_500 } } });

    const due = await (await forfeits.GET(apiRequest(`/api/v1/deposits/forfeits?site=${site.id}`, { key }))).json();
    expect(due.forfeitsDue.map((d: { saleRef: string }) => d.saleRef)).toEqual(["F-old"]);

    const run = forfeits.POST(apiRequest("/api/v1/deposits/forfeits", { method: "POST", key, body: { site: site.id } }));
    const body = await (await run).json();
    expect(body).toMatchObject({ count: 1, totalCents: 3_000, balanceCents: 3_000 });
    expect(body.citation).toContain("RCW 70A.205.515");
    const entry = await db.depositEntry.findFirstOrThrow({ where: { siteId: site.id, kind: "forfeit" } });
    expect(entry).toMatchObject({ saleRef: "F-old", amountCents: -3_000 });
    const again = await (await forfeits.POST(apiRequest("/api/v1/deposits/forfeits", { method: "POST", key, body: { site: site.id } }))).json();
    expect(again).toMatchObject({ count: 0, totalCents: 0, balanceCents: 3_000 });
    expect(await ledger(site.id)).toMatchObject({ balanceCents: 3_000, entrySumCents: 3_000 });
  });
});

describe("reports and their CSV files", () => {
  test("outstanding by age, returns per month, forfeited totals and the balance agree with the ledger", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "P-1", soldOn: daysAgo(2), quantity: 2 });
    await sell(key, site.id, { saleRef: "P-2", soldOn: daysAgo(45) });
    await sell(key, site.id, { saleRef: "P-3", soldOn: daysAgo(1), quantity: 2, handedIn: 1 });
    await refund(key, site.id, "P-1");
    const { depositReports } = await import("@/lib/db/deposits");
    const actor = { kind: "system" as const, id: "t", ref: "system:t", label: "t", organisationId: site.organisationId, roles: new Map([[site.id, "clerk" as const]]) };
    const r = await depositReports(actor, { siteId: site.id });
    expect(r.balanceCents).toBe(1_500 + 1_500 + 1_500);
    // DEFAULT_AGE_BUCKETS of lib/deposits/ledger.ts: 0–30, 31–60, 61–90, over 90 days
    expect(r.outstanding.map((b) => [b.label, b.saleCount, b.outstandingCents])).toEqual([
      ["0–30 days", 2, 3_000],
      ["31–60 days", 1, 1_500],
      ["61–90 days", 0, 0],
      ["over 90 days", 0, 0],
    ]);
    const totalSold = r.returns.reduce((s, m) => s + m.soldQuantity, 0);
    const totalReturned = r.returns.reduce((s, m) => s + m.returnedQuantity, 0);
    expect([totalSold, totalReturned]).toEqual([5, 2]); // one refund, one handed in
    expect(r.forfeitsDue.map((d) => d.saleRef)).toEqual(["P-2"]);

    const csv = await reports.GET(apiRequest(`/api/v1/deposits/reports/outstanding.csv?site=${site.id}`, { key }), params({ name: "outstanding.csv" }));
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toContain("text/csv");
    const lines = (await csv.text()).trim().split("\r\n");
    expect(lines[0]).toBe("Age since sale,Sales,Deposit held (USD)");
    expect(lines[1]).toBe("0–30 days,2,30.00");
    for (const name of ["returns.csv", "forfeited.csv", "forfeits-due.csv"]) {
      const res = await reports.GET(apiRequest(`/api/v1/deposits/reports/${name}?site=${site.id}`, { key }), params({ name }));
      expect(res.status, name).toBe(200);
    }
    const due = await (await reports.GET(apiRequest(`/api/v1/deposits/reports/forfeits-due.csv?site=${site.id}`, { key }), params({ name: "forfeits-due.csv" }))).text();
    expect(due).toContain("P-2");
    expect((await reports.GET(apiRequest(`/api/v1/deposits/reports/secrets.csv?site=${site.id}`, { key }), params({ name: "secrets.csv" }))).status).toBe(404);
  });

  test("GET /api/v1/deposits lists the balance, the rule with its citation and the latest entries", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "L-1" });
    const response = await deposits.GET(apiRequest(`/api/v1/deposits?site=${site.id}`, { key }));
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body).toMatchObject({ balanceCents: 1_500, rule: { id: "us-wa", refundWindowDays: 30, source: "built-in" }, caution: GENERAL_CAUTION });
    expect(body.rule.citation).toContain("RCW 70A.205.515");
    expect(body.entries).toHaveLength(1);
    expect((await deposits.GET(apiRequest(`/api/v1/deposits?site=${site.id}&limit=0`, { key }))).status).toBe(400);
  });
});

describe("permissions", () => {
  test("401 without credentials, 404 for a foreign site, 403 without the role; nothing written", async () => {
    const { organisation, site, key } = await store();
    const yard = await makeSite(db, organisation.id, { kind: "yard" });
    const yardKey = (await makeKey(db, { organisationId: organisation.id, siteId: yard.id, role: "yard" })).key;
    const foreign = await store();
    expect((await deposits.GET(apiRequest(`/api/v1/deposits?site=${site.id}`))).status).toBe(401);
    expect((await deposits.GET(apiRequest(`/api/v1/deposits?site=${foreign.site.id}`, { key }))).status).toBe(404);
    expect((await deposits.GET(apiRequest(`/api/v1/deposits?site=${yard.id}`, { key }))).status).toBe(403);
    expect((await sell(key, foreign.site.id)).status).toBe(404);
    expect((await sell(key, yard.id)).status).toBe(403);
    // A yard role reads deposits but may not write them.
    expect((await deposits.GET(apiRequest(`/api/v1/deposits?site=${yard.id}`, { key: yardKey }))).status).toBe(200);
    expect((await sell(yardKey, yard.id)).status).toBe(403);
    expect((await forfeits.POST(apiRequest("/api/v1/deposits/forfeits", { method: "POST", key: yardKey, body: { site: yard.id } }))).status).toBe(403);
    expect(await ledger(yard.id)).toMatchObject({ sales: 0, entries: 0, trail: 0 });
    expect(await ledger(foreign.site.id)).toMatchObject({ sales: 0, entries: 0, trail: 0 });
  });
});

describe("the store's deposit rule", () => {
  const put = (key: string, body: unknown) => rule.PUT(apiRequest("/api/v1/deposits/rule", { method: "PUT", key, body }));

  test("an administrator picks a built-in rule; a clerk may not", async () => {
    const { organisation, site, key } = await store({ role: "admin" });
    const clerk = (await makeKey(db, { organisationId: organisation.id, siteId: site.id, role: "clerk" })).key;
    expect((await put(clerk, { site: site.id, ruleId: "us-ca" })).status).toBe(403);
    const response = await put(key, { site: site.id, ruleId: "us-ca" });
    expect(response.status).toBe(200);
    expect((await response.json()).rule).toMatchObject({ id: "us-ca", refundWindowDays: 45, source: "built-in" });
    expect((await put(key, { site: site.id, ruleId: "us-zz" })).status).toBe(400);
    expect((await put(key, { site: site.id })).status).toBe(400);
    // null goes back to the rule of the jurisdiction (US-WA here)
    expect((await (await put(key, { site: site.id, ruleId: null })).json()).rule).toMatchObject({ id: "us-wa", source: "jurisdiction" });
    const events = await db.trailEvent.findMany({ where: { siteId: site.id, action: "deposit-rule.set" } });
    expect(events).toHaveLength(2);
  });

  test("a custom rule needs its citation, is stored on the site and decides the window", async () => {
    const { site, key } = await store({ role: "admin" });
    const custom = { title: "Town permit core charge", minChargeCents: 1_000, refundWindowDays: 10, takeBackDuty: null, citation: "" };
    const refused = await put(key, { site: site.id, custom });
    expect(refused.status).toBe(400);
    expect((await refused.json()).error.issues).toEqual(expect.arrayContaining([expect.objectContaining({ field: "custom.citation", message: expect.stringContaining("citation is required") })]));
    const accepted = await put(key, { site: site.id, custom: { ...custom, citation: "Quarry Bend permit 12, condition 4 (invented for the test)" } });
    expect(accepted.status).toBe(200);
    expect((await accepted.json()).rule).toMatchObject({ source: "custom", refundWindowDays: 10, sourceStatus: "custom" });
    expect((await sell(key, site.id, { chargeCents: 900 })).status).toBe(400); // the custom least charge, $10.00
    await sell(key, site.id, { saleRef: "X-10", soldOn: daysAgo(10), chargeCents: 1_000 });
    await sell(key, site.id, { saleRef: "X-11", soldOn: daysAgo(11), chargeCents: 1_000 });
    expect((await refund(key, site.id, "X-10")).status).toBe(201);
    expect((await refund(key, site.id, "X-11")).status).toBe(400);
    const listed = await (await rule.GET(apiRequest("/api/v1/deposits/rule", { key }))).json();
    expect(listed.rules.map((r: { id: string }) => r.id)).toEqual(["us-wa", "us-id", "us-ca", "us-az", "us-ny"]);
  });

  test("a store with no rule of its own or of its jurisdiction cannot check refunds yet", async () => {
    const { site, key } = await store({ ruleId: null as unknown as string, jurisdiction: "US-TX" });
    await sell(key, site.id, { saleRef: "N-1" });
    const response = await refund(key, site.id, "N-1");
    expect(response.status).toBe(400);
    expect((await response.json()).error.message).toContain("no deposit rule");
  });
});

describe("the Counter check", () => {
  test.each([
    // WAC 173-331-100(7): equivalent size is 50–150 % of the weight of the battery bought; group 24F's typical 19.5 kg is a project estimate (lib/chemistry/group-sizes.ts, from memory)
    [18, true, "92 %"],
    [8, false, "41 %"],
    [31, false, "159 %"],
  ])("a returned battery of %d kg against a group 24F sale: equivalent size %s", async (weightKg, isEquivalent, pct) => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "Q-1", groupSize: "24F" });
    const body = await (await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=Q-1&weightKg=${weightKg}`, { key }))).json();
    expect(body.equivalentSize).toMatchObject({ isEquivalent });
    expect(body.equivalentSize.text).toContain(pct);
    expect(body.equivalentSize.text).toContain("WAC 173-331-100(7)");
  });

  test("writes nothing and answers 400 for a bad weight", async () => {
    const { site, key } = await store();
    await sell(key, site.id, { saleRef: "Q-2" });
    const before = await ledger(site.id);
    expect((await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=Q-2&weightKg=heavy`, { key }))).status).toBe(400);
    await check.GET(apiRequest(`/api/v1/deposits/check?site=${site.id}&sale=Q-2`, { key }));
    expect(await ledger(site.id)).toEqual(before);
  });
});

describe("GET /api/v1/openapi.json", () => {
  test("describes the deposit and import operations from their schemas", async () => {
    const { GET } = await import("@/app/api/v1/openapi.json/route");
    const doc = await GET().json();
    expect(Object.keys(doc.paths)).toEqual(expect.arrayContaining(["/api/v1/deposits", "/api/v1/deposits/returns", "/api/v1/imports/sales", "/api/v1/deposits/reports/{name}"]));
    const kinds = doc.components.schemas.DepositPost.oneOf.map((s: { properties: { kind: { const: string } } }) => s.properties.kind.const);
    expect(kinds).toEqual(["charge", "credit", "refund"]);
    expect(doc.components.schemas.CounterReturn.properties.unit.$ref).toBe("#/components/schemas/UnitIntake");
  });
});

describe("calendar days and rules of a store", () => {
  test.each([
    // noon UTC is the same calendar date from UTC−11 to UTC+11 (IANA zone offsets, common practice)
    ["America/Los_Angeles"],
    ["America/New_York"],
    ["Pacific/Honolulu"],
    ["Asia/Tokyo"],
    ["Europe/Berlin"],
    ["UTC"],
  ])("a sale known only by its date keeps that date in %s", async (zone) => {
    const { saleInstant } = await import("@/lib/db/deposits");
    for (const day of ["2025-01-01", "2025-03-09", "2025-11-02", "2024-02-29", "2025-12-31"]) expect(calendarDay(saleInstant(day), zone)).toBe(day);
  });

  test.each([
    // lib/deposits/rules.ts: the built-in rules by jurisdiction (REFERENCES.md, US state core-charge laws)
    [{ depositRuleId: null, jurisdiction: "US-WA" }, "us-wa", "jurisdiction"],
    [{ depositRuleId: null, jurisdiction: "us-ca" }, "us-ca", "jurisdiction"],
    [{ depositRuleId: "us-ny", jurisdiction: "US-WA" }, "us-ny", "built-in"],
    [{ depositRuleId: null, jurisdiction: "US-TX" }, null, null],
    [{ depositRuleId: "custom:{not json", jurisdiction: "US-WA" }, null, null],
  ])("%o follows %s (%s)", async (site, id, source) => {
    const { siteDepositRule } = await import("@/lib/db/deposits");
    const found = siteDepositRule(site);
    expect(found?.rule.id ?? null).toBe(id);
    expect(found?.source ?? null).toBe(source);
  });
});
