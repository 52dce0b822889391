import { describe, expect, test } from "vitest";
import fc from "fast-check";
import Papa from "papaparse";
import { centsToDollars, dollarsToCents, formatDollars } from "@/lib/deposits/cents";
import { toCsv, type TCsvColumn } from "@/lib/deposits/to-csv";

type TRow = { name: string; count: number | null; cents: number };
const columns: TCsvColumn<TRow>[] = [
  { header: "Name", value: (r) => r.name },
  { header: "Count", value: (r) => r.count, kind: "number" },
  { header: "Amount (USD)", value: (r) => r.cents, kind: "money" },
];

// Quoting per RFC 4180; the formula guard per OWASP "CSV injection" (common practice).
describe("toCsv", () => {
  test.each([
    ["plain", "Starter", "Starter"],
    ["a comma", "Starter, heavy", '"Starter, heavy"'],
    ["a quote", 'the "big" one', '"the ""big"" one"'],
    ["a line break", "two\nlines", '"two\nlines"'],
    ["a leading space", " padded", '" padded"'],
    ["a formula", "=SUM(A1:A9)", "'=SUM(A1:A9)"],
    ["a leading minus in text", "-5 units", "'-5 units"],
    ["a leading at-sign", "@cmd", "'@cmd"],
  ])("text with %s", (_case, name, expected) => {
    expect(toCsv([{ name, count: 1, cents: 0 }], columns)).toBe(`Name,Count,Amount (USD)\r\n${expected},1,0.00\r\n`);
  });

  test("money is written in dollars, negative amounts unguarded; an empty number stays empty", () => {
    expect(toCsv([{ name: "x", count: null, cents: -250 }], columns)).toBe("Name,Count,Amount (USD)\r\nx,,-2.50\r\n");
  });

  test("no rows: the header only", () => {
    expect(toCsv([], columns)).toBe("Name,Count,Amount (USD)\r\n");
  });

  test("a money column given text, or a number that is not finite, is a programming error", () => {
    expect(() => toCsv([{ name: "x", count: Number.NaN, cents: 0 }], columns)).toThrow(RangeError);
    expect(() => toCsv([{ name: "x", count: 1, cents: 0 }], [{ header: "m", value: () => "1.00", kind: "money" }])).toThrow(TypeError);
  });

  test("any text that does not start like a formula reads back unchanged (property)", () => {
    fc.assert(
      fc.property(fc.array(fc.string({ maxLength: 30 }).filter((s) => !/^[=+\-@\t\r]/.test(s)), { minLength: 1, maxLength: 10 }), (names) => {
        const csv = toCsv(names.map((name) => ({ name, count: 0, cents: 0 })), columns);
        const parsed = Papa.parse<string[]>(csv, { newline: "\r\n", skipEmptyLines: false }).data;
        expect(parsed.slice(1, 1 + names.length).map((r) => r[0])).toEqual(names);
      }),
      { numRuns: 200 },
    );
  });
});

describe("cents", () => {
  test.each([
    ["15", 1_500],
    ["15.5", 1_550],
    ["15.00", 1_500],
    ["$15.00", 1_500],
    ["0.29", 29],
    ["0", 0],
    ["15.005", null],
    ["-5.00", null],
    ["1,000.00", null],
    [".50", null],
    ["", null],
  ])("dollarsToCents(%j) = %s", (text, cents) => {
    expect(dollarsToCents(text)).toBe(cents);
  });

  test.each([
    [1_500, "15.00", "$15.00"],
    [5, "0.05", "$0.05"],
    [-250, "-2.50", "-$2.50"],
    [0, "0.00", "$0.00"],
  ])("%i cents is %s, or %s in a sentence", (cents, plain, sentence) => {
    expect(centsToDollars(cents)).toBe(plain);
    expect(formatDollars(cents)).toBe(sentence);
  });
});
