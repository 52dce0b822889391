import { z } from "zod";
import { AppError, fieldIssues } from "@/lib/errors";
import { addDays, calendarDay, daysBetween, type TCalendarDay } from "@/lib/deposits/calendar-day";
import { formatDollars } from "@/lib/deposits/cents";
import { GENERAL_CAUTION } from "@/lib/cautions";
import type { TDepositRule } from "@/lib/deposits/rules";

/**
 * What the clerk may do with a returned battery. `refund`: pay back the deposit now. `accept-free`:
 * take the battery without paying anything (a take-back duty where the rule has one). `forfeit`: the
 * deposit left on the sale is no longer owed and is recorded as forfeited.
 */
export type TRefundOption = { kind: "refund" | "accept-free" | "forfeit"; text: string };

export type TRefundDue = {
  isInsideWindow: boolean;
  /** Calendar days from the sale to the return: the sale day is day 0. */
  daysSinceSale: number;
  windowDays: number;
  /** The last calendar day on which a return still earns its refund. */
  lastRefundDay: TCalendarDay;
  refundCents: number;
  /** Batteries of this return that earn a refund. */
  refundQuantity: number;
  /** Deposit left on the sale that becomes forfeit (only outside the window). */
  forfeitCents: number;
  reason: string;
  options: TRefundOption[];
  citation: string;
  caution: string;
};

const ZSaleForRefund = z
  .object({
    soldAt: z.union([z.date(), z.string()]),
    depositCents: z.int({ error: "deposit must be whole cents, 0 or more" }).min(0, { error: "deposit must be whole cents, 0 or more" }),
    quantity: z.int({ error: "quantity must be a whole number of 1 or more" }).min(1, { error: "quantity must be a whole number of 1 or more" }),
    alreadyReturned: z.int({ error: "returned so far must be a whole number, 0 or more" }).min(0, { error: "returned so far must be a whole number, 0 or more" }),
  })
  .refine((s) => s.alreadyReturned <= s.quantity, {
    error: "returned so far cannot be more than the quantity sold",
    path: ["alreadyReturned"],
  });

const ZReturnQuantity = z.int({ error: "batteries returned must be a whole number of 1 or more" }).min(1, {
  error: "batteries returned must be a whole number of 1 or more",
});

export type TRefundDueInput = {
  rule: TDepositRule;
  /** `depositCents` is the whole deposit taken on the sale line, for all `quantity` batteries. */
  sale: { soldAt: Date | TCalendarDay; depositCents: number; quantity: number; alreadyReturned: number };
  returnedAt: Date | TCalendarDay;
  /** Batteries handed in now against this sale; default 1. */
  returnQuantity?: number;
  /** IANA zone of the store, for turning instants into its calendar days; default "UTC". */
  timeZone?: string;
};

const batteries = (n: number) => (n === 1 ? "1 battery" : `${n} batteries`);
const days = (n: number) => (n === 1 ? "1 day" : `${n} days`);

/**
 * Share of a line's deposit carried by its first `n` batteries. Rounding down per step means the
 * shares of any split of returns add up to the whole deposit once every battery is back.
 */
const depositShare = (depositCents: number, quantity: number, n: number) => Math.floor((depositCents * n) / quantity);

function acceptFreeOption(rule: TDepositRule, soldQuantity: number): TRefundOption {
  const duty = rule.takeBackDuty;
  if (!duty) {
    return {
      kind: "accept-free",
      text: "Take the battery back free if the store chooses; this rule records no duty to take it back.",
    };
  }
  const limit = rule.perPersonPerDayLimit ? ` The duty covers up to ${rule.perPersonPerDayLimit} a day from one person.` : "";
  const atLeast = duty.mustAcceptAtLeastSold ? ` For this sale that means at least ${batteries(soldQuantity)}.` : "";
  return { kind: "accept-free", text: `Take the battery back free: ${duty.text}${atLeast}${limit}` };
}

/**
 * Whether a return still earns its deposit under `rule`, how much to pay back, and what the clerk may
 * do otherwise. Day counting: calendar days in the store's zone, the sale day is day 0, and a return on
 * day `refundWindowDays` is the last one inside (day 30 is inside a 30-day window, day 31 is not).
 */
export function refundDue(input: TRefundDueInput): TRefundDue {
  const { rule, timeZone = "UTC" } = input;
  const parsedSale = ZSaleForRefund.safeParse(input.sale);
  const parsedQuantity = ZReturnQuantity.safeParse(input.returnQuantity ?? 1);
  if (!parsedSale.success || !parsedQuantity.success) {
    const issues = [
      ...(parsedSale.success ? [] : fieldIssues(parsedSale.error.issues).map((i) => ({ ...i, field: `sale.${i.field}` }))),
      ...(parsedQuantity.success ? [] : [{ field: "returnQuantity", message: parsedQuantity.error.issues[0]!.message }]),
    ];
    throw new AppError("invalid_input", "The sale or the return is not complete.", issues);
  }
  const sale = input.sale;
  const returnQuantity = parsedQuantity.data;

  const soldOn = calendarDay(sale.soldAt, timeZone);
  const returnedOn = calendarDay(input.returnedAt, timeZone);
  const daysSinceSale = daysBetween(soldOn, returnedOn);
  if (daysSinceSale < 0) {
    throw new AppError("invalid_input", "The return date is before the sale date.", [
      { field: "returnedAt", message: `return date ${returnedOn} is before the sale date ${soldOn}` },
    ]);
  }
  const windowDays = rule.refundWindowDays;
  const lastRefundDay = addDays(soldOn, windowDays);
  const isInsideWindow = daysSinceSale <= windowDays;

  const remaining = sale.quantity - sale.alreadyReturned;
  const refundQuantity = isInsideWindow ? Math.min(returnQuantity, remaining) : 0;
  const refundCents =
    depositShare(sale.depositCents, sale.quantity, sale.alreadyReturned + refundQuantity) -
    depositShare(sale.depositCents, sale.quantity, sale.alreadyReturned);
  const leftCents = sale.depositCents - depositShare(sale.depositCents, sale.quantity, sale.alreadyReturned);
  const forfeitCents = isInsideWindow ? 0 : leftCents;
  const extra = Math.max(0, returnQuantity - remaining);

  const when = isInsideWindow
    ? `Returned on day ${daysSinceSale} of the ${windowDays}-day refund window (sold ${soldOn}, last day ${lastRefundDay}).`
    : `Returned on day ${daysSinceSale}, ${days(daysSinceSale - windowDays)} after the ${windowDays}-day refund window ended on ${lastRefundDay} (sold ${soldOn}).`;

  const isHeld = sale.depositCents > 0 && remaining > 0;
  let outcome: string;
  if (sale.depositCents === 0) {
    outcome = "No deposit was taken on this sale (a used battery was handed in when it was bought), so there is nothing to refund.";
  } else if (remaining === 0) {
    outcome = `All ${batteries(sale.quantity)} on this sale have already been returned, so no deposit is left to refund.`;
  } else if (isInsideWindow) {
    outcome = `Refund ${formatDollars(refundCents)} for ${batteries(refundQuantity)}.`;
    if (rule.isReceiptRequired) outcome += " The refund is tied to the sales receipt: check it.";
    if (extra > 0) {
      outcome += ` The other ${batteries(extra)} ${extra === 1 ? "is one more than the sale has left and earns" : "are more than the sale has left and earn"} no refund.`;
    }
  } else {
    outcome = `No refund is due under ${rule.citation}.`;
  }

  const options: TRefundOption[] = [];
  if (isHeld && isInsideWindow) {
    options.push({ kind: "refund", text: `Pay back ${formatDollars(refundCents)} (${rule.citation}).` });
  }
  if (!isHeld || !isInsideWindow || extra > 0) options.push(acceptFreeOption(rule, sale.quantity));
  if (isHeld && !isInsideWindow) {
    options.push({ kind: "forfeit", text: `Record the ${formatDollars(leftCents)} still held on this sale as forfeited.` });
  }

  return {
    isInsideWindow,
    daysSinceSale,
    windowDays,
    lastRefundDay,
    refundCents,
    refundQuantity,
    forfeitCents,
    reason: `${when} ${outcome}`,
    options,
    citation: rule.citation,
    caution: GENERAL_CAUTION,
  };
}

/**
 * Whether a returned battery counts as the "equivalent size" of the one bought, where the rule defines
 * it as a share of weight (WA: 50–150 %, WAC 173-331-100(7)); null when the rule has no such test.
 */
export function isEquivalentSize({
  rule,
  soldMassKg,
  returnedMassKg,
}: {
  rule: TDepositRule;
  soldMassKg: number;
  returnedMassKg: number;
}): boolean | null {
  if (!rule.equivalentSize) return null;
  if (!(soldMassKg > 0) || !(returnedMassKg > 0)) {
    throw new AppError("invalid_input", "Both weights are needed.", [
      { field: soldMassKg > 0 ? "returnedMassKg" : "soldMassKg", message: "weight must be above 0 kg" },
    ]);
  }
  const pct = (returnedMassKg / soldMassKg) * 100;
  return pct >= rule.equivalentSize.minPct && pct <= rule.equivalentSize.maxPct;
}
