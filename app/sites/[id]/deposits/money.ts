/** Whole cents shown as US dollars with thousands separators ("$1,234.50"); display only, storage stays in cents. */
export function dollars(cents: number): string {
  const sign = cents < 0 ? "-" : "";
  const abs = Math.abs(cents);
  const whole = Math.floor(abs / 100).toLocaleString("en-US");
  return `${sign}$${whole}.${String(abs % 100).padStart(2, "0")}`;
}

/** "15", "15.5" or "$15.00" → 1500; null when it is not an amount of dollars and cents. */
export function parseDollars(text: string): number | null {
  const match = /^\s*\$?(\d{1,7})(?:\.(\d{1,2}))?\s*$/.exec(text);
  if (!match) return null;
  return Number(match[1]) * 100 + Number((match[2] ?? "").padEnd(2, "0"));
}

export type TIssue = { field: string; message: string; line?: number };
