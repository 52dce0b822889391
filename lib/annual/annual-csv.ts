import Papa from "papaparse";
import type { TAnnualFigures } from "./annual-figures";

const round = (value: number, decimals: number): number => Number(value.toFixed(decimals));
const kg = (value: number) => round(value, 3);
const lb = (value: number) => round(value, 2);

/**
 * The annual figures worksheet as CSV (RFC 4180, CRLF): a heading block, the per-substance figures, opening
 * and closing amounts, the notes and caution, then the daily amounts. Text cells that a spreadsheet would
 * run as a formula are escaped.
 */
export function annualCsv(figures: TAnnualFigures): string {
  const rows: (string | number)[][] = [
    ["Annual figures worksheet (Tier II)"],
    ["Site", figures.siteId],
    ["Year", figures.year],
    ["Period (UTC)", `${figures.firstDate} to ${figures.lastDate}`],
    ["Days in year", figures.daysInYear],
    ["Rulebook", `${figures.rulebookId} ${figures.rulebookVersion}`],
    [],
    [
      "Substance",
      "CAS number",
      "Maximum daily amount (kg)",
      "Maximum daily amount (lb)",
      "Maximum range code",
      "Date of maximum",
      "Average daily amount (kg)",
      "Average daily amount (lb)",
      "Average range code",
      "Days on site",
      "Tier II threshold (lb)",
      "At or above threshold",
    ],
    ...figures.substances.map((s) => [
      s.name,
      s.casNumber ?? "",
      kg(s.maxDailyKg),
      lb(s.maxDailyLb),
      s.maxDailyCode ?? "",
      s.maxDate ?? "",
      kg(s.averageDailyKg),
      lb(s.averageDailyLb),
      s.averageDailyCode ?? "",
      s.daysOnSite,
      s.thresholdLb ?? "",
      s.isAtOrAboveThreshold === null ? "" : s.isAtOrAboveThreshold ? "yes" : "no",
    ]),
    [],
    ["On hand", "Battery (kg)", "Lead (kg)", "Sulfuric acid (kg)", "Units"],
    [`Opening, 00:00 on ${figures.firstDate}`, ...amounts(figures.openingBalance)],
    [`Closing, end of ${figures.lastDate}`, ...amounts(figures.closingBalance)],
    [],
    ["Notes"],
    ...figures.notes.map((note) => [note]),
    [],
    ["Caution", figures.caution],
    [],
    ["Daily on hand (the most on hand during each UTC day)"],
    ["Date", "Battery (kg)", "Lead (kg)", "Sulfuric acid (kg)", "Units"],
    ...figures.days.map((d) => [d.date, ...amounts(d)]),
  ];
  return Papa.unparse(rows, { newline: "\r\n", escapeFormulae: true }) + "\r\n";
}

const amounts = (a: { batteryKg: number; leadKg: number; acidKg: number; unitCount: number }) => [
  kg(a.batteryKg),
  kg(a.leadKg),
  kg(a.acidKg),
  a.unitCount,
];
