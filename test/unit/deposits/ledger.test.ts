import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import {
  balanceCents,
  DEFAULT_AGE_BUCKETS,
  depositEntry,
  ENTRY_SIGN,
  forfeitedTotals,
  forfeitedTotalsCsv,
  forfeitsDue,
  forfeitsDueCsv,
  outstandingByAge,
  outstandingByAgeCsv,
  returnsToSalesByMonth,
  returnsToSalesByMonthCsv,
  salesFromEntries,
  ZDepositEntry,
  type TDepositEntry,
} from "@/lib/deposits/ledger";
import { getDepositRule } from "@/lib/deposits/rules";

const charge = (saleRef: string, at: string, cents = 1_500) => depositEntry({ kind: "charge", cents, saleRef, at });
const refund = (saleRef: string, at: string, cents = 1_500) => depositEntry({ kind: "refund", cents, saleRef, at });
const forfeit = (saleRef: string, at: string, cents = 1_500) => depositEntry({ kind: "forfeit", cents, saleRef, at });
const credit = (saleRef: string, at: string) => depositEntry({ kind: "credit", cents: 1_500, saleRef, at });

// The signs are the project's ledger convention (DESIGN.md §4 "Deposit entries"; schema DepositEntry.amountCents).
describe("entry kinds and their effect on the deposits held", () => {
  test.each([
    ["charge", 1_500],
    ["refund", -1_500],
    ["forfeit", -1_500],
    ["credit", 0],
  ] as const)("a %s of $15.00 moves the balance by %i cents", (kind, effect) => {
    expect(depositEntry({ kind, cents: 1_500, saleRef: "S-1", at: "2025-01-01" }).amountCents).toBe(effect);
    expect(ENTRY_SIGN[kind] * 1_500).toBe(effect);
  });

  test("a negative or fractional amount is refused", () => {
    expect(() => depositEntry({ kind: "charge", cents: -5, saleRef: "S", at: "2025-01-01" })).toThrow(AppError);
    expect(() => depositEntry({ kind: "charge", cents: 1.5, saleRef: "S", at: "2025-01-01" })).toThrow(AppError);
  });

  test.each([
    [{ kind: "charge", amountCents: -100 }, false],
    [{ kind: "refund", amountCents: 100 }, false],
    [{ kind: "credit", amountCents: 100 }, false],
    [{ kind: "forfeit", amountCents: -100 }, true],
    [{ kind: "charge", amountCents: 0 }, true],
  ])("a stored entry %o passes the sign check: %s", (change, isValid) => {
    expect(ZDepositEntry.safeParse({ saleRef: "S-1", at: "2025-01-01", ...change }).success).toBe(isValid);
  });

  test("balance: charges in, refunds and forfeits out, credits nothing", () => {
    const entries = [charge("A", "2025-01-01"), charge("B", "2025-01-02", 3_000), credit("C", "2025-01-02"), refund("A", "2025-01-10"), forfeit("B", "2025-03-01", 1_000)];
    expect(balanceCents(entries)).toBe(1_500 + 3_000 - 1_500 - 1_000);
  });

  test("entries fold into one line per sale, dated by the first charge or credit", () => {
    const entries = [refund("A", "2025-01-10", 500), charge("A", "2025-01-03"), credit("C", "2025-01-05"), forfeit("A", "2025-02-10", 1_000), charge("Z", "2025-09-01")];
    expect(salesFromEntries({ entries, asOf: "2025-06-30" })).toEqual([
      { saleRef: "A", soldAt: "2025-01-03", depositCents: 1_500, refundedCents: 500, forfeitedCents: 1_000 },
      { saleRef: "C", soldAt: "2025-01-05", depositCents: 0, refundedCents: 0, forfeitedCents: 0 },
    ]);
  });
});

describe("forfeitsDue: charges past their window with deposit still held", () => {
  const sales = [
    { saleRef: "S-1", soldAt: "2025-01-01", depositCents: 1_500 },
    { saleRef: "S-2", soldAt: "2025-01-01", depositCents: 3_000, refundedCents: 1_500 },
    { saleRef: "S-3", soldAt: "2025-01-01", depositCents: 1_500, refundedCents: 1_500 },
    { saleRef: "S-4", soldAt: "2024-12-01", depositCents: 1_500, forfeitedCents: 1_500 },
    { saleRef: "S-5", soldAt: "2025-01-01", depositCents: 0 },
  ];

  test.each([
    // RCW 70A.205.515: 30 days (WA); Cal. HSC §25215.25: 45 days (CA)
    ["us-wa", "2025-01-31", []],
    ["us-wa", "2025-02-01", [["S-1", 1_500], ["S-2", 1_500]]],
    ["us-ca", "2025-02-15", []],
    ["us-ca", "2025-02-16", [["S-1", 1_500], ["S-2", 1_500]]],
  ])("%s as of %s", (ruleId, asOf, expected) => {
    const due = forfeitsDue({ sales, asOf, rule: getDepositRule(ruleId) });
    expect(due.map((d) => [d.saleRef, d.amountCents])).toEqual(expected);
  });

  test("each line says when its window closed", () => {
    const [first] = forfeitsDue({ sales, asOf: "2025-02-01", rule: getDepositRule("us-wa") });
    expect(first).toEqual({ saleRef: "S-1", soldOn: "2025-01-01", lastRefundDay: "2025-01-31", daysSinceSale: 31, amountCents: 1_500 });
  });

  test("from the ledger itself: a sale whose refund came in time forfeits nothing", () => {
    const entries = [charge("A", "2025-01-01"), charge("B", "2025-01-01"), refund("B", "2025-01-20")];
    const due = forfeitsDue({ sales: salesFromEntries({ entries }), asOf: "2025-03-01", rule: getDepositRule("us-wa") });
    expect(due.map((d) => d.saleRef)).toEqual(["A"]);
  });

  test("as CSV", () => {
    const csv = forfeitsDueCsv(forfeitsDue({ sales, asOf: "2025-02-01", rule: getDepositRule("us-wa") }));
    expect(csv).toBe(
      "Sale,Sold on,Last refund day,Days since sale,To forfeit (USD)\r\nS-1,2025-01-01,2025-01-31,31,15.00\r\nS-2,2025-01-01,2025-01-31,31,15.00\r\n",
    );
  });
});

describe("outstandingByAge", () => {
  // Ages at 2025-06-30: the buckets' edges 0/30, 31/60, 61/90 and 91.
  const asOf = "2025-06-30";
  const entries: TDepositEntry[] = [
    charge("age-0", "2025-06-30", 100),
    charge("age-30", "2025-05-31", 200),
    charge("age-31", "2025-05-30", 400),
    charge("age-60", "2025-05-01", 800),
    charge("age-61", "2025-04-30", 1_600),
    charge("age-90", "2025-04-01", 3_200),
    charge("age-91", "2025-03-31", 6_400),
    charge("refunded", "2025-06-01"),
    refund("refunded", "2025-06-02"),
    charge("future", "2025-07-01", 99_900),
  ];

  test("each sale lands in its bucket by whole days since the sale; nothing dated after asOf counts", () => {
    const rows = outstandingByAge({ entries, asOf, buckets: DEFAULT_AGE_BUCKETS });
    expect(rows.map((r) => [r.label, r.saleCount, r.outstandingCents])).toEqual([
      ["0–30 days", 2, 300],
      ["31–60 days", 2, 1_200],
      ["61–90 days", 2, 4_800],
      ["over 90 days", 1, 6_400],
    ]);
    const sum = rows.reduce((s, r) => s + r.outstandingCents, 0);
    expect(sum).toBe(balanceCents(entries.filter((e) => e.saleRef !== "future")));
  });

  test("as CSV", () => {
    expect(outstandingByAgeCsv(outstandingByAge({ entries, asOf }))).toBe(
      "Age since sale,Sales,Deposit held (USD)\r\n0–30 days,2,3.00\r\n31–60 days,2,12.00\r\n61–90 days,2,48.00\r\nover 90 days,1,64.00\r\n",
    );
  });

  test.each([
    ["a gap", [{ label: "a", minDays: 0, maxDays: 30 }, { label: "b", minDays: 32, maxDays: null }], "age ranges must follow one another without gaps or overlaps"],
    ["no open end", [{ label: "a", minDays: 0, maxDays: 30 }], "the last age range must be open-ended"],
    ["not from 0", [{ label: "a", minDays: 1, maxDays: null }], "the first age range must start at 0 days"],
  ])("buckets with %s are refused", (_case, buckets, message) => {
    try {
      outstandingByAge({ entries, asOf, buckets });
      throw new Error("expected an error");
    } catch (error) {
      expect((error as AppError).issues).toEqual([{ field: "buckets", message }]);
    }
  });
});

describe("returnsToSalesByMonth", () => {
  const sales = [
    { soldAt: "2025-01-05", quantity: 4 },
    { soldAt: "2025-01-20", quantity: 6 },
    { soldAt: "2025-03-02", quantity: 5 },
  ];
  const returns = [
    { returnedAt: "2025-01-10", quantity: 7 },
    { returnedAt: "2025-04-01", quantity: 2 },
  ];

  test("ratio per month, months with neither filled in, no ratio where nothing was sold", () => {
    expect(returnsToSalesByMonth({ sales, returns })).toEqual([
      { month: "2025-01", soldQuantity: 10, returnedQuantity: 7, ratio: 0.7 },
      { month: "2025-02", soldQuantity: 0, returnedQuantity: 0, ratio: null },
      { month: "2025-03", soldQuantity: 5, returnedQuantity: 0, ratio: 0 },
      { month: "2025-04", soldQuantity: 0, returnedQuantity: 2, ratio: null },
    ]);
  });

  test("months follow the store's calendar: 1 Feb 05:00 UTC is still January in Los Angeles", () => {
    const rows = returnsToSalesByMonth({ sales: [{ soldAt: new Date("2025-02-01T05:00:00Z"), quantity: 1 }], returns: [], timeZone: "America/Los_Angeles" });
    expect(rows.map((r) => r.month)).toEqual(["2025-01"]);
  });

  test("across a year end, and as CSV", () => {
    const rows = returnsToSalesByMonth({ sales: [{ soldAt: "2024-12-30", quantity: 3 }], returns: [{ returnedAt: "2025-01-02", quantity: 1 }] });
    expect(returnsToSalesByMonthCsv(rows)).toBe("Month,Batteries sold,Batteries returned,Returned per sold\r\n2024-12,3,0,0\r\n2025-01,0,1,\r\n");
  });

  test("nothing in, nothing out", () => {
    expect(returnsToSalesByMonth({ sales: [], returns: [] })).toEqual([]);
  });
});

describe("forfeitedTotals", () => {
  const entries = [
    forfeit("A", "2025-01-31", 1_500),
    forfeit("B", "2025-02-01", 1_000),
    forfeit("C", "2025-02-20", 500),
    charge("D", "2025-02-01"),
    forfeit("E", "2026-01-01", 200),
  ];

  test.each([
    ["month", [["2025-01", 1, 1_500], ["2025-02", 2, 1_500], ["2026-01", 1, 200]]],
    ["year", [["2025", 3, 3_000], ["2026", 1, 200]]],
  ] as const)("by %s", (by, expected) => {
    expect(forfeitedTotals({ entries, by }).map((r) => [r.period, r.forfeitCount, r.forfeitedCents])).toEqual(expected);
  });

  test("as CSV", () => {
    expect(forfeitedTotalsCsv(forfeitedTotals({ entries, by: "year" }))).toBe("Period,Forfeits,Forfeited (USD)\r\n2025,3,30.00\r\n2026,1,2.00\r\n");
  });
});
