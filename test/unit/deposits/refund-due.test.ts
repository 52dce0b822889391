import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { AppError } from "@/lib/errors";
import { isEquivalentSize, refundDue } from "@/lib/deposits/refund-due";
import { getDepositRule } from "@/lib/deposits/rules";

const sale = (soldAt: Date | string, over: Partial<{ depositCents: number; quantity: number; alreadyReturned: number }> = {}) => ({
  soldAt,
  depositCents: 1_500,
  quantity: 1,
  alreadyReturned: 0,
  ...over,
});

// Day counting is ours (project choice): the sale day is day 0, a return on day N is inside an N-day window.
describe("window boundaries", () => {
  test.each([
    // 30-day windows: RCW 70A.205.515 (WA), Idaho Code §39-7003, 6 NYCRR 374-1.7 (NY, V2)
    ["us-wa", "2025-01-01", "2025-01-31", 30, true],
    ["us-wa", "2025-01-01", "2025-02-01", 31, false],
    ["us-id", "2025-01-01", "2025-01-31", 30, true],
    ["us-id", "2025-01-01", "2025-02-01", 31, false],
    ["us-ny", "2025-01-01", "2025-01-31", 30, true],
    ["us-ny", "2025-01-01", "2025-02-01", 31, false],
    // 45-day windows: Cal. HSC §25215.25 (CA), A.R.S. §44-1323 (AZ)
    ["us-ca", "2025-01-01", "2025-02-15", 45, true],
    ["us-ca", "2025-01-01", "2025-02-16", 46, false],
    ["us-az", "2025-01-01", "2025-02-15", 45, true],
    ["us-az", "2025-01-01", "2025-02-16", 46, false],
    // same day and across a leap day (RCW 70A.205.515 window; calendar arithmetic)
    ["us-wa", "2025-03-10", "2025-03-10", 0, true],
    ["us-wa", "2024-02-01", "2024-03-02", 30, true],
    ["us-wa", "2024-02-01", "2024-03-03", 31, false],
    ["us-ca", "2024-12-20", "2025-02-03", 45, true],
  ])("%s: sold %s, returned %s is day %i, inside %s", (ruleId, soldOn, returnedOn, days, isInside) => {
    const rule = getDepositRule(ruleId);
    const due = refundDue({ rule, sale: sale(soldOn), returnedAt: returnedOn });
    expect(due.daysSinceSale).toBe(days);
    expect(due.windowDays).toBe(rule.refundWindowDays);
    expect(due.isInsideWindow).toBe(isInside);
    expect(due.refundCents).toBe(isInside ? 1_500 : 0);
    expect(due.forfeitCents).toBe(isInside ? 0 : 1_500);
    expect(due.reason).toContain(`day ${days}`);
  });

  test("the last refund day is the sale day plus the window", () => {
    const due = refundDue({ rule: getDepositRule("us-ca"), sale: sale("2025-01-01"), returnedAt: "2025-01-02" });
    expect(due.lastRefundDay).toBe("2025-02-15");
  });

  test("instants count in the store's time zone: the same two moments are day 30 in UTC and day 31 in Los Angeles", () => {
    const rule = getDepositRule("us-wa");
    const soldAt = new Date("2025-01-01T03:00:00Z"); // 2024-12-31 19:00 in Los Angeles
    const returnedAt = new Date("2025-01-31T12:00:00Z"); // 2025-01-31 04:00 in Los Angeles
    const utc = refundDue({ rule, sale: sale(soldAt), returnedAt });
    const la = refundDue({ rule, sale: sale(soldAt), returnedAt, timeZone: "America/Los_Angeles" });
    expect([utc.daysSinceSale, utc.isInsideWindow]).toEqual([30, true]);
    expect([la.daysSinceSale, la.isInsideWindow]).toEqual([31, false]);
  });

  test("a clock time late on the sale day does not shorten the window", () => {
    const rule = getDepositRule("us-wa");
    const due = refundDue({ rule, sale: sale(new Date("2025-01-01T23:59:00Z")), returnedAt: new Date("2025-01-31T23:58:00Z") });
    expect(due.isInsideWindow).toBe(true);
  });
});

describe("what the clerk is told", () => {
  const wa = getDepositRule("us-wa");

  test("inside the window: refund, with the receipt called out (RCW 70A.205.515: refund with receipt)", () => {
    const due = refundDue({ rule: wa, sale: sale("2025-03-01", { depositCents: 3_000, quantity: 2 }), returnedAt: "2025-03-13" });
    expect(due.refundCents).toBe(1_500);
    expect(due.refundQuantity).toBe(1);
    expect(due.options.map((o) => o.kind)).toEqual(["refund"]);
    expect(due.reason).toBe(
      "Returned on day 12 of the 30-day refund window (sold 2025-03-01, last day 2025-03-31). Refund $15.00 for 1 battery. The refund is tied to the sales receipt: check it.",
    );
    expect(due.citation).toBe(wa.citation);
    expect(due.caution).toBe(GENERAL_CAUTION);
  });

  test("outside the window: no refund; take it back free under the take-back duty, or record the forfeit (RCW 70A.205.515)", () => {
    const due = refundDue({ rule: wa, sale: sale("2025-01-01", { depositCents: 3_000, quantity: 2, alreadyReturned: 1 }), returnedAt: "2025-02-03" });
    expect(due.refundCents).toBe(0);
    expect(due.forfeitCents).toBe(1_500);
    expect(due.options.map((o) => o.kind)).toEqual(["accept-free", "forfeit"]);
    expect(due.options[0]!.text).toContain("at least 2 batteries");
    expect(due.options[1]!.text).toContain("$15.00");
    expect(due.reason).toContain("3 days after the 30-day refund window ended on 2025-01-31");
    expect(due.reason).toContain("No refund is due");
  });

  test("California: the free take-back is limited to 6 a day from one person (Cal. HSC §25215.2)", () => {
    const due = refundDue({ rule: getDepositRule("us-ca"), sale: sale("2025-01-01"), returnedAt: "2025-03-01" });
    expect(due.options[0]).toMatchObject({ kind: "accept-free" });
    expect(due.options[0]!.text).toContain("up to 6 a day from one person");
  });

  test("Idaho: no take-back duty is recorded, so taking it back free is the store's choice (Idaho Code §39-7003)", () => {
    const due = refundDue({ rule: getDepositRule("us-id"), sale: sale("2025-01-01", { depositCents: 1_000 }), returnedAt: "2025-02-15" });
    expect(due.options.map((o) => o.kind)).toEqual(["accept-free", "forfeit"]);
    expect(due.options[0]!.text).toContain("no duty");
  });

  test("no deposit taken at the sale (a used battery was handed in): nothing to refund, take it back free", () => {
    const due = refundDue({ rule: wa, sale: sale("2025-03-01", { depositCents: 0 }), returnedAt: "2025-03-02" });
    expect(due.refundCents).toBe(0);
    expect(due.forfeitCents).toBe(0);
    expect(due.options.map((o) => o.kind)).toEqual(["accept-free"]);
    expect(due.reason).toContain("No deposit was taken");
  });

  test("every battery of the sale already returned: nothing left to refund", () => {
    const due = refundDue({ rule: wa, sale: sale("2025-03-01", { quantity: 2, depositCents: 3_000, alreadyReturned: 2 }), returnedAt: "2025-03-02" });
    expect(due.refundCents).toBe(0);
    expect(due.options.map((o) => o.kind)).toEqual(["accept-free"]);
    expect(due.reason).toContain("All 2 batteries on this sale have already been returned");
  });

  test("more batteries handed in than the sale has left: refund the rest, take the extra back free", () => {
    const due = refundDue({ rule: wa, sale: sale("2025-03-01", { quantity: 2, depositCents: 3_000, alreadyReturned: 1 }), returnedAt: "2025-03-02", returnQuantity: 3 });
    expect(due.refundQuantity).toBe(1);
    expect(due.refundCents).toBe(1_500);
    expect(due.options.map((o) => o.kind)).toEqual(["refund", "accept-free"]);
    expect(due.reason).toContain("The other 2 batteries are more than the sale has left");
  });

  test("an uneven deposit is shared out to the cent: $10.00 over 3 batteries refunds 3.33, 3.33, 3.34", () => {
    const refunds = [0, 1, 2].map(
      (alreadyReturned) =>
        refundDue({ rule: wa, sale: sale("2025-03-01", { quantity: 3, depositCents: 1_000, alreadyReturned }), returnedAt: "2025-03-02" }).refundCents,
    );
    expect(refunds).toEqual([333, 333, 334]);
  });

  test("any split of returns inside the window refunds exactly the whole deposit (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 0, max: 100_000 }),
        fc.integer({ min: 1, max: 100 }).chain((quantity) => fc.tuple(fc.constant(quantity), fc.array(fc.integer({ min: 1, max: quantity }), { maxLength: 20 }))),
        (depositCents, [quantity, steps]) => {
          let returned = 0;
          let total = 0;
          for (const step of steps) {
            if (returned === quantity) break;
            const due = refundDue({ rule: wa, sale: sale("2025-03-01", { quantity, depositCents, alreadyReturned: returned }), returnedAt: "2025-03-05", returnQuantity: step });
            total += due.refundCents;
            returned += due.refundQuantity;
          }
          if (returned < quantity) {
            total += refundDue({ rule: wa, sale: sale("2025-03-01", { quantity, depositCents, alreadyReturned: returned }), returnedAt: "2025-03-05", returnQuantity: quantity - returned }).refundCents;
          }
          expect(total).toBe(depositCents);
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe("refused input", () => {
  const wa = getDepositRule("us-wa");
  const issues = (run: () => unknown) => {
    try {
      run();
    } catch (error) {
      expect(error).toBeInstanceOf(AppError);
      return (error as AppError).issues;
    }
    throw new Error("expected an error");
  };

  test("a return before the sale", () => {
    expect(issues(() => refundDue({ rule: wa, sale: sale("2025-03-10"), returnedAt: "2025-03-09" }))).toEqual([
      { field: "returnedAt", message: "return date 2025-03-09 is before the sale date 2025-03-10" },
    ]);
  });

  test.each([
    ["quantity 0", { quantity: 0 }, "sale.quantity", "quantity must be a whole number of 1 or more"],
    ["a negative deposit", { depositCents: -1 }, "sale.depositCents", "deposit must be whole cents, 0 or more"],
    ["more returned than sold", { quantity: 1, alreadyReturned: 2 }, "sale.alreadyReturned", "returned so far cannot be more than the quantity sold"],
  ])("%s", (_case, change, field, message) => {
    expect(issues(() => refundDue({ rule: wa, sale: sale("2025-03-01", change), returnedAt: "2025-03-02" }))).toEqual([{ field, message }]);
  });

  test("a date that is not a calendar date, and an unknown time zone", () => {
    expect(issues(() => refundDue({ rule: wa, sale: sale("2025-3-1"), returnedAt: "2025-03-02" }))).toEqual([{ field: "date", message: "date must be YYYY-MM-DD" }]);
    expect(issues(() => refundDue({ rule: wa, sale: sale(new Date()), returnedAt: new Date(), timeZone: "Mars/Base" }))[0]!.field).toBe("timeZone");
  });
});

describe("equivalent size (WAC 173-331-100(7): 50–150 % of the weight of the battery bought)", () => {
  const wa = getDepositRule("us-wa");
  test.each([
    [18, 9, true],
    [18, 8.99, false],
    [18, 27, true],
    [18, 27.01, false],
    [18, 18, true],
  ])("sold %d kg, returned %d kg → %s", (soldMassKg, returnedMassKg, expected) => {
    expect(isEquivalentSize({ rule: wa, soldMassKg, returnedMassKg })).toBe(expected);
  });

  test("a rule without the test answers null (Cal. HSC §25215.2 has none)", () => {
    expect(isEquivalentSize({ rule: getDepositRule("us-ca"), soldMassKg: 18, returnedMassKg: 2 })).toBeNull();
  });
});

describe("one battery too many", () => {
  test("the reason reads right in the singular", () => {
    const due = refundDue({ rule: getDepositRule("us-az"), sale: sale("2025-03-01"), returnedAt: "2025-03-02", returnQuantity: 2 });
    expect(due.reason).toContain("The other 1 battery is one more than the sale has left and earns no refund.");
    // A.R.S. §44-1323: accept the type and quantity sold
    expect(due.options.map((o) => o.kind)).toEqual(["refund", "accept-free"]);
    expect(due.options[1]!.text).toContain("at least 1 battery");
  });
});
