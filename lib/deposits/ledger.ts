import { z } from "zod";
import { AppError } from "@/lib/errors";
import { addDays, calendarDay, daysBetween, monthOf, type TCalendarDay } from "@/lib/deposits/calendar-day";
import type { TDepositRule } from "@/lib/deposits/rules";
import { toCsv, type TCsvColumn } from "@/lib/deposits/to-csv";

export const DEPOSIT_ENTRY_KINDS = ["charge", "credit", "refund", "forfeit"] as const;
export type TDepositEntryKind = (typeof DEPOSIT_ENTRY_KINDS)[number];

/**
 * Signed effect of each kind on the deposits the store holds. A charge adds the deposit taken; a refund
 * pays it back; a forfeit releases it once the window has passed; a credit (a used battery handed in
 * at the sale, so no deposit taken) changes nothing and is kept for the returns count.
 */
export const ENTRY_SIGN: Readonly<Record<TDepositEntryKind, 1 | 0 | -1>> = Object.freeze({
  charge: 1,
  credit: 0,
  refund: -1,
  forfeit: -1,
});

/** One ledger line as stored: `amountCents` is already the signed effect on the balance. */
export type TDepositEntry = {
  kind: TDepositEntryKind;
  amountCents: number;
  saleRef: string;
  at: Date | TCalendarDay;
};

export const ZDepositEntry = z
  .object({
    kind: z.enum(DEPOSIT_ENTRY_KINDS, { error: "kind must be charge, credit, refund or forfeit" }),
    amountCents: z.int({ error: "amount must be whole cents" }),
    saleRef: z.string().trim().min(1, { error: "sale id is missing" }).max(64, { error: "sale id must be at most 64 characters" }),
    at: z.union([z.date(), z.string()]),
  })
  .refine((e) => Math.sign(e.amountCents) === ENTRY_SIGN[e.kind] || e.amountCents === 0, {
    error: "amount has the wrong sign for its kind: a charge adds, a refund or forfeit takes away, a credit is 0",
    path: ["amountCents"],
  });

/** Builds an entry from a positive amount, applying the kind's sign. */
export function depositEntry({
  kind,
  cents,
  saleRef,
  at,
}: {
  kind: TDepositEntryKind;
  cents: number;
  saleRef: string;
  at: Date | TCalendarDay;
}): TDepositEntry {
  if (!Number.isInteger(cents) || cents < 0) {
    throw new AppError("invalid_input", "The amount is not valid.", [{ field: "cents", message: "amount must be whole cents, 0 or more" }]);
  }
  return { kind, amountCents: ENTRY_SIGN[kind] * cents, saleRef, at };
}

/** The deposits the store holds: the sum of the signed entries. */
export function balanceCents(entries: readonly Pick<TDepositEntry, "amountCents">[]): number {
  let total = 0;
  for (const e of entries) total += e.amountCents;
  return total;
}

/** A sale as the ledger sees it: what was charged and what has gone out since. */
export type TLedgerSale = {
  saleRef: string;
  soldAt: Date | TCalendarDay;
  depositCents: number;
  refundedCents?: number;
  forfeitedCents?: number;
};

/**
 * Folds entries into one line per sale (entries after `asOf` are left out). The sale date is the day
 * of its first charge or credit; refunds and forfeits are returned as positive amounts.
 */
export function salesFromEntries({
  entries,
  asOf,
  timeZone = "UTC",
}: {
  entries: readonly TDepositEntry[];
  asOf?: Date | TCalendarDay;
  timeZone?: string;
}): Array<Required<TLedgerSale> & { soldAt: TCalendarDay }> {
  const asOfDay = asOf === undefined ? undefined : calendarDay(asOf, timeZone);
  type TFold = Required<TLedgerSale> & { soldAt: TCalendarDay; firstDay: TCalendarDay; openedOn?: TCalendarDay };
  const bySale = new Map<string, TFold>();
  for (const entry of entries) {
    const day = calendarDay(entry.at, timeZone);
    if (asOfDay !== undefined && day > asOfDay) continue;
    let sale = bySale.get(entry.saleRef);
    if (!sale) {
      sale = { saleRef: entry.saleRef, soldAt: day, firstDay: day, depositCents: 0, refundedCents: 0, forfeitedCents: 0 };
      bySale.set(entry.saleRef, sale);
    }
    if (day < sale.firstDay) sale.firstDay = day;
    if ((entry.kind === "charge" || entry.kind === "credit") && (sale.openedOn === undefined || day < sale.openedOn)) {
      sale.openedOn = day;
    }
    if (entry.kind === "charge") sale.depositCents += entry.amountCents;
    else if (entry.kind === "refund") sale.refundedCents -= entry.amountCents;
    else if (entry.kind === "forfeit") sale.forfeitedCents -= entry.amountCents;
  }
  return [...bySale.values()].map(({ firstDay, openedOn, ...sale }) => ({ ...sale, soldAt: openedOn ?? firstDay }));
}

export type TForfeitDue = {
  saleRef: string;
  soldOn: TCalendarDay;
  lastRefundDay: TCalendarDay;
  daysSinceSale: number;
  /** Deposit still held on the sale, to be recorded as a forfeit entry. */
  amountCents: number;
};

/**
 * Sales whose refund window has closed by `asOf` with deposit still held: each one's remainder is due
 * to be forfeited. A sale is past its window from day `refundWindowDays + 1` (see refund-due.ts).
 */
export function forfeitsDue({
  sales,
  asOf,
  rule,
  timeZone = "UTC",
}: {
  sales: readonly TLedgerSale[];
  asOf: Date | TCalendarDay;
  rule: TDepositRule;
  timeZone?: string;
}): TForfeitDue[] {
  const asOfDay = calendarDay(asOf, timeZone);
  const due: TForfeitDue[] = [];
  for (const sale of sales) {
    const soldOn = calendarDay(sale.soldAt, timeZone);
    const daysSinceSale = daysBetween(soldOn, asOfDay);
    const heldCents = sale.depositCents - (sale.refundedCents ?? 0) - (sale.forfeitedCents ?? 0);
    if (daysSinceSale <= rule.refundWindowDays || heldCents <= 0) continue;
    due.push({ saleRef: sale.saleRef, soldOn, lastRefundDay: addDays(soldOn, rule.refundWindowDays), daysSinceSale, amountCents: heldCents });
  }
  return due.sort((a, b) => (a.soldOn < b.soldOn ? -1 : a.soldOn > b.soldOn ? 1 : a.saleRef < b.saleRef ? -1 : 1));
}

export type TAgeBucket = { label: string; minDays: number; maxDays: number | null };

/** Ages in whole days since the sale; "over 90 days" starts at day 91 so day 90 sits in 61–90. */
export const DEFAULT_AGE_BUCKETS: readonly TAgeBucket[] = Object.freeze([
  { label: "0–30 days", minDays: 0, maxDays: 30 },
  { label: "31–60 days", minDays: 31, maxDays: 60 },
  { label: "61–90 days", minDays: 61, maxDays: 90 },
  { label: "over 90 days", minDays: 91, maxDays: null },
]);

function bucketProblem(buckets: readonly TAgeBucket[]): string | null {
  if (buckets.length === 0) return "give at least one age range";
  if (buckets[0]!.minDays !== 0) return "the first age range must start at 0 days";
  for (let i = 0; i < buckets.length; i++) {
    const { minDays, maxDays } = buckets[i]!;
    if (maxDays !== null && maxDays < minDays) return "an age range ends before it starts";
    if (maxDays === null && i < buckets.length - 1) return "only the last age range may be open-ended";
    if (i > 0 && minDays !== buckets[i - 1]!.maxDays! + 1) return "age ranges must follow one another without gaps or overlaps";
  }
  return buckets.at(-1)!.maxDays === null ? null : "the last age range must be open-ended";
}

export type TAgeRow = { label: string; minDays: number; maxDays: number | null; saleCount: number; outstandingCents: number };

/**
 * Deposit still held, by how long ago the sale was made, as of `asOf`. Sales with nothing held are
 * left out; every bucket appears, empty ones with zeros.
 */
export function outstandingByAge({
  entries,
  asOf,
  buckets = DEFAULT_AGE_BUCKETS,
  timeZone = "UTC",
}: {
  entries: readonly TDepositEntry[];
  asOf: Date | TCalendarDay;
  buckets?: readonly TAgeBucket[];
  timeZone?: string;
}): TAgeRow[] {
  const problem = bucketProblem(buckets);
  if (problem) throw new AppError("invalid_input", "The age ranges are not usable.", [{ field: "buckets", message: problem }]);
  const asOfDay = calendarDay(asOf, timeZone);
  const rows: TAgeRow[] = buckets.map((b) => ({ ...b, saleCount: 0, outstandingCents: 0 }));
  for (const sale of salesFromEntries({ entries, asOf: asOfDay, timeZone })) {
    const heldCents = sale.depositCents - sale.refundedCents - sale.forfeitedCents;
    if (heldCents <= 0) continue;
    const ageDays = daysBetween(sale.soldAt, asOfDay);
    const row = rows.find((r) => ageDays >= r.minDays && (r.maxDays === null || ageDays <= r.maxDays))!;
    row.saleCount += 1;
    row.outstandingCents += heldCents;
  }
  return rows;
}

export type TReturnsMonthRow = {
  month: string;
  soldQuantity: number;
  returnedQuantity: number;
  /** Returned ÷ sold for the month; null when nothing was sold. */
  ratio: number | null;
};

function nextMonth(month: string): string {
  const [year, m] = month.split("-").map(Number) as [number, number];
  return m === 12 ? `${year + 1}-01` : `${year}-${String(m + 1).padStart(2, "0")}`;
}

/**
 * Batteries returned against batteries sold, per calendar month of the store, from the first month with
 * either to the last; months in between with neither appear with zeros.
 */
export function returnsToSalesByMonth({
  sales,
  returns,
  timeZone = "UTC",
}: {
  sales: readonly { soldAt: Date | TCalendarDay; quantity: number }[];
  returns: readonly { returnedAt: Date | TCalendarDay; quantity: number }[];
  timeZone?: string;
}): TReturnsMonthRow[] {
  const sold = new Map<string, number>();
  const returned = new Map<string, number>();
  for (const s of sales) {
    const month = monthOf(calendarDay(s.soldAt, timeZone));
    sold.set(month, (sold.get(month) ?? 0) + s.quantity);
  }
  for (const r of returns) {
    const month = monthOf(calendarDay(r.returnedAt, timeZone));
    returned.set(month, (returned.get(month) ?? 0) + r.quantity);
  }
  const months = [...new Set([...sold.keys(), ...returned.keys()])].sort();
  if (months.length === 0) return [];
  const rows: TReturnsMonthRow[] = [];
  for (let month = months[0]!; month <= months.at(-1)!; month = nextMonth(month)) {
    const soldQuantity = sold.get(month) ?? 0;
    const returnedQuantity = returned.get(month) ?? 0;
    rows.push({ month, soldQuantity, returnedQuantity, ratio: soldQuantity === 0 ? null : returnedQuantity / soldQuantity });
  }
  return rows;
}

export type TForfeitTotalRow = { period: string; forfeitCount: number; forfeitedCents: number };

/** Forfeit entries totalled per month ("YYYY-MM") or per year ("YYYY"), as positive amounts. */
export function forfeitedTotals({
  entries,
  by = "month",
  timeZone = "UTC",
}: {
  entries: readonly TDepositEntry[];
  by?: "month" | "year";
  timeZone?: string;
}): TForfeitTotalRow[] {
  const totals = new Map<string, TForfeitTotalRow>();
  for (const entry of entries) {
    if (entry.kind !== "forfeit") continue;
    const day = calendarDay(entry.at, timeZone);
    const period = by === "year" ? day.slice(0, 4) : monthOf(day);
    const row = totals.get(period) ?? { period, forfeitCount: 0, forfeitedCents: 0 };
    row.forfeitCount += 1;
    row.forfeitedCents -= entry.amountCents;
    totals.set(period, row);
  }
  return [...totals.values()].sort((a, b) => (a.period < b.period ? -1 : 1));
}

// CSV exports of the reports, with plain column names.

const OUTSTANDING_COLUMNS: TCsvColumn<TAgeRow>[] = [
  { header: "Age since sale", value: (r) => r.label },
  { header: "Sales", value: (r) => r.saleCount, kind: "number" },
  { header: "Deposit held (USD)", value: (r) => r.outstandingCents, kind: "money" },
];

const RETURNS_COLUMNS: TCsvColumn<TReturnsMonthRow>[] = [
  { header: "Month", value: (r) => r.month },
  { header: "Batteries sold", value: (r) => r.soldQuantity, kind: "number" },
  { header: "Batteries returned", value: (r) => r.returnedQuantity, kind: "number" },
  { header: "Returned per sold", value: (r) => (r.ratio === null ? null : Number(r.ratio.toFixed(3))), kind: "number" },
];

const FORFEITED_COLUMNS: TCsvColumn<TForfeitTotalRow>[] = [
  { header: "Period", value: (r) => r.period },
  { header: "Forfeits", value: (r) => r.forfeitCount, kind: "number" },
  { header: "Forfeited (USD)", value: (r) => r.forfeitedCents, kind: "money" },
];

const FORFEITS_DUE_COLUMNS: TCsvColumn<TForfeitDue>[] = [
  { header: "Sale", value: (r) => r.saleRef },
  { header: "Sold on", value: (r) => r.soldOn },
  { header: "Last refund day", value: (r) => r.lastRefundDay },
  { header: "Days since sale", value: (r) => r.daysSinceSale, kind: "number" },
  { header: "To forfeit (USD)", value: (r) => r.amountCents, kind: "money" },
];

export const outstandingByAgeCsv = (rows: readonly TAgeRow[]): string => toCsv(rows, OUTSTANDING_COLUMNS);
export const returnsToSalesByMonthCsv = (rows: readonly TReturnsMonthRow[]): string => toCsv(rows, RETURNS_COLUMNS);
export const forfeitedTotalsCsv = (rows: readonly TForfeitTotalRow[]): string => toCsv(rows, FORFEITED_COLUMNS);
export const forfeitsDueCsv = (rows: readonly TForfeitDue[]): string => toCsv(rows, FORFEITS_DUE_COLUMNS);
