import { describe, expect, test } from "vitest";
import { AppError, fieldIssues } from "@/lib/errors";
import { getDepositRule, listDepositRules, ZDepositRule } from "@/lib/deposits/rules";

// Every row: REFERENCES.md "US state core-charge laws", with the source named in the row.
describe("built-in deposit rules", () => {
  test.each([
    {
      source: "RCW 70A.205.515, .520; WAC 173-331-100(7) (V)",
      id: "us-wa",
      jurisdiction: "US-WA",
      minChargeCents: 500,
      refundWindowDays: 30,
      mustAcceptAtLeastSold: true,
      perPersonPerDayLimit: undefined,
      citationParts: ["RCW 70A.205.515", "70A.205.520", "WAC 173-331-100(7)"],
      sourceStatus: "V",
    },
    {
      source: "Idaho Code §39-7003 (V)",
      id: "us-id",
      jurisdiction: "US-ID",
      minChargeCents: 1_000,
      refundWindowDays: 30,
      mustAcceptAtLeastSold: null,
      perPersonPerDayLimit: undefined,
      citationParts: ["§39-7003"],
      sourceStatus: "V",
    },
    {
      source: "Cal. HSC §25215.2, §25215.25 (V)",
      id: "us-ca",
      jurisdiction: "US-CA",
      minChargeCents: null,
      refundWindowDays: 45,
      mustAcceptAtLeastSold: false,
      perPersonPerDayLimit: 6,
      citationParts: ["§25215.2", "§25215.25"],
      sourceStatus: "V",
    },
    {
      source: "A.R.S. §44-1323 (V)",
      id: "us-az",
      jurisdiction: "US-AZ",
      minChargeCents: null,
      refundWindowDays: 45,
      mustAcceptAtLeastSold: true,
      perPersonPerDayLimit: undefined,
      citationParts: ["A.R.S. §44-1323"],
      sourceStatus: "V",
    },
    {
      source: "ECL §27-1701; 6 NYCRR 374-1.7 (V2)",
      id: "us-ny",
      jurisdiction: "US-NY",
      minChargeCents: 500,
      refundWindowDays: 30,
      mustAcceptAtLeastSold: false,
      perPersonPerDayLimit: undefined,
      citationParts: ["§27-1701", "6 NYCRR 374-1.7"],
      sourceStatus: "V2",
    },
  ])("$id: $source", (row) => {
    const rule = getDepositRule(row.id);
    expect(rule.jurisdiction).toBe(row.jurisdiction);
    expect(rule.minChargeCents).toBe(row.minChargeCents);
    expect(rule.refundWindowDays).toBe(row.refundWindowDays);
    expect(rule.takeBackDuty?.mustAcceptAtLeastSold ?? null).toBe(row.mustAcceptAtLeastSold);
    expect(rule.perPersonPerDayLimit).toBe(row.perPersonPerDayLimit);
    for (const part of row.citationParts) expect(rule.citation).toContain(part);
    expect(rule.sourceStatus).toBe(row.sourceStatus);
  });

  test("Washington: notice at least 8.5 × 11 in and equivalent size 50–150 % by weight (RCW 70A.205.520; WAC 173-331-100(7))", () => {
    const wa = getDepositRule("us-wa");
    // 25.4 mm per inch, exact
    expect(wa.postedNotice?.minWidthMm).toBeCloseTo(8.5 * 25.4, 9);
    expect(wa.postedNotice?.minHeightMm).toBeCloseTo(11 * 25.4, 9);
    expect(wa.postedNotice?.text).toContain("8.5 × 11 in");
    expect(wa.equivalentSize).toEqual({ minPct: 50, maxPct: 150, basis: "weight" });
    expect(wa.isReceiptRequired).toBe(true);
  });

  test("California: $2 battery fee from 2022-04-01, apart from the deposit (Cal. HSC §25215.2)", () => {
    expect(getDepositRule("us-ca").fee).toMatchObject({ amountCents: 200, effectiveFrom: "2022-04-01", isRefundable: false });
  });

  test("every built-in rule has a citation, and lists what is ours rather than the law's", () => {
    const rules = listDepositRules();
    expect(rules.map((r) => r.id)).toEqual(["us-wa", "us-id", "us-ca", "us-az", "us-ny"]);
    for (const rule of rules) {
      expect(rule.citation.length).toBeGreaterThan(5);
      expect(rule.projectChoices.length).toBeGreaterThan(0);
    }
  });

  test("the built-in table cannot be changed by a caller", () => {
    const wa = getDepositRule("us-wa");
    expect(() => {
      (wa as { refundWindowDays: number }).refundWindowDays = 99;
    }).toThrow(TypeError);
    expect(getDepositRule("us-wa").refundWindowDays).toBe(30);
  });

  test("an unknown id is a not-found error", () => {
    expect(() => getDepositRule("us-zz")).toThrow(AppError);
    try {
      getDepositRule("us-zz");
    } catch (error) {
      expect((error as AppError).status).toBe(404);
    }
  });
});

describe("ZDepositRule: an administrator's own rule", () => {
  const custom = {
    id: "county-core",
    title: "County core charge",
    jurisdiction: "US-WA-KING",
    minChargeCents: 1_500,
    refundWindowDays: 60,
    takeBackDuty: null,
    citation: "County ordinance 12.34 (invented for the test)",
  };
  const issuesOf = (input: unknown) => {
    const result = ZDepositRule.safeParse(input);
    return result.success ? [] : fieldIssues(result.error.issues);
  };

  test("a complete custom rule parses, marked custom, with no project choices", () => {
    expect(ZDepositRule.parse(custom)).toEqual({ ...custom, isReceiptRequired: false, sourceStatus: "custom", projectChoices: [] });
  });

  test.each([
    ["missing", undefined],
    ["empty", ""],
    ["blank", "   "],
  ])("a %s citation is refused, saying what to give", (_case, citation) => {
    expect(issuesOf({ ...custom, citation })).toEqual([
      { field: "citation", message: "citation is required: name the law, regulation or permit this rule comes from" },
    ]);
  });

  test.each([
    ["a window of 0 days", { refundWindowDays: 0 }, "refundWindowDays", "refund window (days) must be a whole number from 1 to 3650"],
    ["a fractional charge", { minChargeCents: 12.5 }, "minChargeCents", "minimum charge (cents) must be a whole number from 0 to 100000"],
    ["an id with spaces", { id: "my rule" }, "id", "id must be 2 to 63 lower-case letters, digits or dashes"],
    ["no title", { title: " " }, "title", "title is missing"],
    ["an equivalent size upper bound under 100 %", { equivalentSize: { minPct: 50, maxPct: 90, basis: "weight" } }, "equivalentSize.maxPct", "the upper bound must be from 100 to 1000 %"],
  ])("%s is refused", (_case, change, field, message) => {
    expect(issuesOf({ ...custom, ...change })).toEqual([{ field, message }]);
  });
});
