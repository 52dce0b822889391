/**
 * Money is held as whole US cents; dollars appear only at the edges (CSV in, CSV out, clerk text).
 * Parsing never goes through floating point, so "0.29" is exactly 29 cents.
 */

const DOLLARS = /^\$?(\d{1,7})(?:\.(\d{1,2}))?$/;

/** "15", "15.5", "15.00" or "$15.00" → 1500; anything else (signs, commas, three decimals) → null. */
export function dollarsToCents(text: string): number | null {
  const match = DOLLARS.exec(text);
  if (!match) return null;
  const fraction = (match[2] ?? "").padEnd(2, "0");
  return Number(match[1]) * 100 + Number(fraction);
}

/** 1500 → "15.00"; -250 → "-2.50". For files. */
export function centsToDollars(cents: number): string {
  if (!Number.isInteger(cents)) throw new RangeError(`cents must be a whole number, got ${cents}`);
  const sign = cents < 0 ? "-" : "";
  const abs = Math.abs(cents);
  return `${sign}${Math.floor(abs / 100)}.${String(abs % 100).padStart(2, "0")}`;
}

/** 1500 → "$15.00". For sentences a clerk reads. */
export function formatDollars(cents: number): string {
  const plain = centsToDollars(cents);
  return plain.startsWith("-") ? `-$${plain.slice(1)}` : `$${plain}`;
}
