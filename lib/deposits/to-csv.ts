import Papa from "papaparse";
import { centsToDollars } from "@/lib/deposits/cents";

/**
 * One column of a CSV export. `kind` decides how a value is written: text is guarded against
 * spreadsheet formulas, numbers are written as they are, money takes whole cents and writes dollars
 * ("12.50", "-2.50" — the guard would spoil a negative amount, so only text gets it).
 */
export type TCsvColumn<TRow> = {
  header: string;
  value: (row: TRow) => string | number | null | undefined;
  kind?: "text" | "number" | "money";
};

// A cell starting with one of these runs as a formula in common spreadsheets (OWASP "CSV injection").
const FORMULA_START = /^[=+\-@\t\r]/;
const guardText = (text: string) => (FORMULA_START.test(text) ? `'${text}` : text);

function cell(value: string | number | null | undefined, kind: TCsvColumn<unknown>["kind"]): string {
  if (value === null || value === undefined) return "";
  if (kind === "money") {
    if (typeof value !== "number") throw new TypeError("a money column needs whole cents");
    return centsToDollars(value);
  }
  if (typeof value === "number") {
    if (!Number.isFinite(value)) throw new RangeError(`cannot write ${value} to a CSV file`);
    return String(value);
  }
  return kind === "number" ? value : guardText(value);
}

/** RFC 4180 CSV: a header line, then one line per row, CRLF line ends; papaparse quotes as needed. */
export function toCsv<TRow>(rows: readonly TRow[], columns: readonly TCsvColumn<TRow>[]): string {
  const header = columns.map((c) => guardText(c.header));
  const data = rows.map((row) => columns.map((c) => cell(c.value(row), c.kind ?? "text")));
  return Papa.unparse([header, ...data], { newline: "\r\n", escapeFormulae: false }) + "\r\n";
}
