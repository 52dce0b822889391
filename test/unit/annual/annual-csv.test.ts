import Papa from "papaparse";
import { describe, expect, test } from "vitest";
import { annualCsv } from "@/lib/annual/annual-csv";
import { annualFigures } from "@/lib/annual/annual-figures";
import { kgToLb } from "@/lib/units";

// Invented history: 240 kg of batteries (156 kg lead, 36 kg acid) arrive on 2025-01-03 and stay all year.
const figures = annualFigures({
  siteId: "=HYPERLINK(\"x\"), yard",
  year: 2025,
  events: [{ at: new Date("2025-01-03T10:00:00Z"), batteryKg: 240, leadKg: 156, acidKg: 36, unitCount: 12 }],
});
const csv = annualCsv(figures);
const rows = Papa.parse<string[]>(csv.trimEnd(), { newline: "\r\n" }).data;
const rowStarting = (first: string) => rows.find((r) => r[0] === first)!;

describe("annual figures worksheet as CSV", () => {
  test("per-substance rows carry the figures, rounded (kg 3 decimals, lb 2), with range codes as text", () => {
    // 36 kg = 79.366 lb → 01 (40 CFR 370.43(a)); on site 2025-01-03 … 2025-12-31 = 363 days
    expect(rowStarting("Sulfuric acid")).toEqual(["Sulfuric acid", "7664-93-9", "36", kgToLb(36).toFixed(2), "01", "2025-01-03", "36", "79.37", "01", "363", "500", "no"]);
    expect(rowStarting("Lead")).toEqual(["Lead", "7439-92-1", "156", "343.92", "02", "2025-01-03", "156", "343.92", "02", "363", "10000", "no"]);
    expect(rowStarting("Lead-acid batteries (as a mixture)").slice(2, 5)).toEqual(["240", "529.11", "03"]);
  });

  test("one daily row for each day of the year, after its heading", () => {
    const heading = rows.findIndex((r) => r[0] === "Date");
    expect(rows.slice(heading + 1).length).toBe(365);
    expect(rows[heading + 1]).toEqual(["2025-01-01", "0", "0", "0", "0"]);
    expect(rows[heading + 3]).toEqual(["2025-01-03", "240", "156", "36", "12"]);
  });

  test("lines end in CRLF, text that a spreadsheet would run is escaped, commas and quotes are quoted", () => {
    expect(csv.endsWith("\r\n")).toBe(true);
    expect(csv.split("\r\n").length).toBeGreaterThan(380);
    expect(rowStarting("Site")[1]).toBe("'=HYPERLINK(\"x\"), yard");
  });

  test("notes and the caution are in the worksheet", () => {
    expect(csv).toContain("not by the days in the year");
    expect(rowStarting("Caution")[1]).toBe(figures.caution);
  });
});
