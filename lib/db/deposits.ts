/**
 * The core-charge ledger of a store: sales with their deposit, refunds and credits at returns, forfeits
 * once the window has passed, and the store's balance (`Site.depositBalanceCents`), which every entry
 * moves in its own transaction. Window verdicts come from the pure library (lib/deposits); this module
 * loads, locks, writes and records the trail.
 *
 * Ledger conventions (ours):
 * - every charge belongs to a `Sale` row with the same sale reference; one charge entry a sale line;
 * - a credit entry is one used battery handed in at the sale (no deposit taken on it); it is linked to
 *   the unit when that battery is logged at the Counter;
 * - a refund entry is one battery brought back inside the window, for its share of the line's deposit;
 * - a forfeit entry releases what is still held on a sale once its window has passed.
 * So a sale's charged batteries are its quantity less its credits, and its returns are its refunds.
 */
import { randomUUID } from "node:crypto";
import { z } from "zod";
import type { TActor } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { groupWeight } from "@/lib/chemistry";
import { calendarDay, isCalendarDay, monthOf, type TCalendarDay } from "@/lib/deposits/calendar-day";
import { formatDollars } from "@/lib/deposits/cents";
import {
  forfeitedTotals,
  forfeitedTotalsCsv,
  forfeitsDue,
  forfeitsDueCsv,
  outstandingByAge,
  outstandingByAgeCsv,
  returnsToSalesByMonth,
  returnsToSalesByMonthCsv,
  type TAgeRow,
  type TForfeitDue,
  type TForfeitTotalRow,
  type TReturnsMonthRow,
} from "@/lib/deposits/ledger";
import { isEquivalentSize, refundDue, type TRefundDue } from "@/lib/deposits/refund-due";
import { listDepositRules, ZDepositRule, type TDepositRule } from "@/lib/deposits/rules";
import { AppError, fieldIssues } from "@/lib/errors";
import { ZUnitIntake } from "@/lib/intake/schema";
import { databaseProvider, db, type TDb, type TTx } from "./client";
import { withDbErrors } from "./errors";
import { Prisma } from "./generated/sqlite/client";
import { DEFAULT_DATABASE_URL } from "./migrate/database-url";
import { siteFor } from "./sites";
import { recordIntake, type TIntakeResult } from "./units";
import { writeTrail } from "./trail";

type TSiteRow = Awaited<ReturnType<typeof siteFor>>;
type TClient = TDb | TTx;

// ---------- time, rules, SQL helpers ----------

/**
 * The store's time zone, from its jurisdiction, for counting calendar days (project choice: the site has
 * no zone of its own; Idaho is taken as Mountain time, though its north keeps Pacific time).
 */
const TIME_ZONES: Readonly<Record<string, string>> = {
  "US-WA": "America/Los_Angeles",
  "US-CA": "America/Los_Angeles",
  "US-ID": "America/Boise",
  "US-AZ": "America/Phoenix",
  "US-NY": "America/New_York",
};
export const siteTimeZone = (jurisdiction: string): string => TIME_ZONES[jurisdiction.toUpperCase()] ?? "UTC";

/**
 * The instant stored for a sale known only by its date. Noon UTC falls on that same calendar date in every
 * zone from UTC−11 to UTC+11, so the store's calendar day of the stored instant is the date given.
 */
export const saleInstant = (day: TCalendarDay): Date => new Date(`${day}T12:00:00.000Z`);

/** A custom rule is kept in `Site.depositRuleId` as this prefix and the rule's JSON (there is no table for it). */
const CUSTOM_PREFIX = "custom:";

export type TSiteDepositRule = { rule: TDepositRule; source: "built-in" | "custom" | "jurisdiction" };

/** The site's deposit rule: the one chosen, else the built-in rule of its jurisdiction; null when neither. */
export function siteDepositRule(site: { depositRuleId: string | null; jurisdiction: string }): TSiteDepositRule | null {
  const stored = site.depositRuleId;
  if (stored?.startsWith(CUSTOM_PREFIX)) {
    let json: unknown;
    try {
      json = JSON.parse(stored.slice(CUSTOM_PREFIX.length));
    } catch {
      return null;
    }
    const parsed = ZDepositRule.safeParse(json);
    return parsed.success ? { rule: parsed.data, source: "custom" } : null;
  }
  if (stored) {
    const rule = listDepositRules().find((r) => r.id === stored);
    return rule ? { rule, source: "built-in" } : null;
  }
  const rule = listDepositRules().find((r) => r.jurisdiction === site.jurisdiction.toUpperCase());
  return rule ? { rule, source: "jurisdiction" } : null;
}

function requireRule(site: TSiteRow): TDepositRule {
  const found = siteDepositRule(site);
  if (!found) {
    throw new AppError("invalid_input", "This store has no deposit rule yet: an administrator chooses one on the Deposits screen.", [
      { field: "site", message: "the store has no deposit rule" },
    ]);
  }
  return found.rule;
}

const provider = () => databaseProvider(process.env.DATABASE_URL || DEFAULT_DATABASE_URL);

/** A DateTime as Prisma writes it to SQLite (text, UTC, "+00:00"), so raw writes sort and compare with its own. */
export const dbTimeText = (at: Date): string => at.toISOString().replace("Z", "+00:00");

/**
 * The rows of a JSON array of arrays as a table `j` with one column `value` (each element), for bulk
 * writes in one statement and one parameter: a parameter a value costs Prisma about 4 µs each, which
 * made 100 000-row imports take 13 s. The only dialect-specific SQL of the ledger.
 */
export function jsonRows(rows: readonly unknown[]): Prisma.Sql {
  const json = JSON.stringify(rows);
  return provider() === "postgresql" ? Prisma.sql`json_array_elements(CAST(${json} AS json)) AS j` : Prisma.sql`json_each(${json}) AS j`;
}

/** Element `i` of the row `j.value`, as text or integer. */
export const jsonText = (i: number) => Prisma.raw(`(j.value ->> ${Math.trunc(i)})`);
export const jsonInt = (i: number) => Prisma.raw(`CAST(j.value ->> ${Math.trunc(i)} AS INTEGER)`);

/** An instant as a parameter of a raw write, in the column's own format. */
export const timeParam = (at: Date): Prisma.Sql =>
  provider() === "postgresql" ? Prisma.sql`CAST(${at.toISOString()} AS TIMESTAMP(3))` : Prisma.sql`${dbTimeText(at)}`;

/**
 * Takes the store's row lock before reading what a deposit write depends on: on PostgreSQL the update
 * holds the row until commit, so two refunds of one sale cannot both see it unrefunded (SQLite already
 * runs one write transaction at a time).
 */
async function lockSite(tx: TTx, siteId: string): Promise<void> {
  await tx.site.update({ where: { id: siteId }, data: { depositBalanceCents: { increment: 0 } } });
}

const toNumber = (value: unknown): number => (typeof value === "bigint" ? Number(value) : Number(value ?? 0));
const toDate = (value: unknown): Date => (value instanceof Date ? value : new Date(String(value).replace(" ", "T")));

/** What each sale still holds (its entries summed), for sales holding more than nothing. */
async function heldBySale(client: TClient, siteId: string): Promise<Array<{ saleRef: string; soldAt: Date; heldCents: number }>> {
  const rows = await client.$queryRaw<Array<{ saleRef: string; soldAt: unknown; heldCents: unknown }>>`
    SELECT s."saleRef" AS "saleRef", s."soldAt" AS "soldAt", SUM(e."amountCents") AS "heldCents"
    FROM "Sale" s JOIN "DepositEntry" e ON e."siteId" = s."siteId" AND e."saleRef" = s."saleRef"
    WHERE s."siteId" = ${siteId}
    GROUP BY s."saleRef", s."soldAt"
    HAVING SUM(e."amountCents") > 0`;
  return rows.map((r) => ({ saleRef: r.saleRef, soldAt: toDate(r.soldAt), heldCents: toNumber(r.heldCents) }));
}

// ---------- request schemas ----------

const ZSite = z.string({ error: "site is required" }).trim().min(1, { error: "site is required" });
const ZSaleRef = z
  .string({ error: "sale reference is required" })
  .trim()
  .min(1, { error: "sale reference is required" })
  .max(64, { error: "sale reference must be at most 64 characters" });
const ZProduct = z
  .string({ error: "product is required" })
  .trim()
  .min(1, { error: "product is required" })
  .max(200, { error: "product must be at most 200 characters" });
const ZGroupSize = z.string({ error: "group size must be text" }).trim().max(20, { error: "group size must be at most 20 characters" }).default("");
const wholeNumber = (what: string, min: number, max: number) => {
  const error = `${what} must be a whole number from ${min} to ${max}`;
  return z.int({ error }).min(min, { error }).max(max, { error });
};
const ZSoldOn = z
  .string({ error: "sale date must be YYYY-MM-DD" })
  .refine(isCalendarDay, { error: "sale date must be a real date, YYYY-MM-DD" })
  .optional();
const ZUnitId = z.string({ error: "unit must be a unit id" }).min(1, { error: "unit must be a unit id" }).optional();

const ZChargeSale = z
  .object({
    kind: z.literal("charge"),
    site: ZSite,
    saleRef: ZSaleRef,
    product: ZProduct,
    groupSize: ZGroupSize,
    quantity: wholeNumber("quantity", 1, 100),
    /** The core charge taken on each battery that came without a used one, in cents. */
    chargeCents: wholeNumber("core charge (cents a battery)", 1, 100_000),
    /** Batteries of the sale matched by a used one handed in at the till: no charge on those. */
    handedIn: wholeNumber("used batteries handed in", 0, 99).default(0),
    soldOn: ZSoldOn,
  })
  .refine((v) => v.handedIn < v.quantity, {
    error: "handed-in batteries must be fewer than the batteries sold; when every one was matched, record a credit sale",
    path: ["handedIn"],
  });

const ZCreditSale = z.object({
  kind: z.literal("credit"),
  site: ZSite,
  saleRef: ZSaleRef,
  product: ZProduct,
  groupSize: ZGroupSize,
  quantity: wholeNumber("quantity", 1, 100),
  soldOn: ZSoldOn,
  /** The handed-in battery, when it was already logged at the Counter. */
  unitId: ZUnitId,
});

const ZRefund = z.object({ kind: z.literal("refund"), site: ZSite, saleRef: ZSaleRef, unitId: ZUnitId });

/** `POST /api/v1/deposits`: a sale with its charge (or its credits), or one battery's refund. */
export const ZDepositPost = z.discriminatedUnion("kind", [ZChargeSale, ZCreditSale, ZRefund], {
  error: "kind must be charge, credit or refund (forfeits are booked by running forfeits)",
});
export type TDepositPost = z.output<typeof ZDepositPost>;
export type TSalePost = z.output<typeof ZChargeSale> | z.output<typeof ZCreditSale>;

export const ZDepositQuery = z.object({
  site: ZSite,
  sale: ZSaleRef.optional(),
  limit: z.coerce.number({ error: "limit must be 1 to 500" }).int({ error: "limit must be 1 to 500" }).min(1, { error: "limit must be 1 to 500" }).max(500, { error: "limit must be 1 to 500" }).optional(),
});

export const ZReturnCheckQuery = z.object({
  site: ZSite,
  sale: ZSaleRef,
  weightKg: z.coerce.number({ error: "weight must be a number of kg" }).positive({ error: "weight must be above 0 kg" }).max(3000, { error: "weight must be at most 3 000 kg" }).optional(),
  groupSize: z.string().trim().max(60).optional(),
});

export const RETURN_ACTIONS = ["refund", "credit", "accept-free", "forfeit"] as const;
export type TReturnAction = (typeof RETURN_ACTIONS)[number];

/** `POST /api/v1/deposits/returns`: a used battery logged at the Counter against a sale, and what to do about its deposit. */
export const ZCounterReturn = z
  .object({
    unit: ZUnitIntake,
    action: z.enum(RETURN_ACTIONS, { error: "action must be refund, credit, accept-free or forfeit" }),
  })
  .superRefine((v, ctx) => {
    if (!v.unit.saleRef) ctx.addIssue({ code: "custom", path: ["unit", "saleRef"], message: "scan or type the sale reference" });
  });
export type TCounterReturn = z.output<typeof ZCounterReturn>;

export const ZForfeitRun = z.object({ site: ZSite });

export const ZDepositRuleChoice = z
  .object({
    site: ZSite,
    /** A built-in rule id, or null to fall back to the rule of the site's jurisdiction. */
    ruleId: z.string({ error: "rule must be a rule id" }).min(1, { error: "rule must be a rule id" }).nullable().optional(),
    /** An administrator's own rule (same fields as a built-in one; the citation is required). */
    custom: z.record(z.string(), z.unknown(), { error: "custom rule must be an object" }).optional(),
  })
  .superRefine((v, ctx) => {
    if ((v.ruleId === undefined) === (v.custom === undefined)) {
      ctx.addIssue({ code: "custom", path: ["ruleId"], message: "give either a built-in rule id or a custom rule, not both" });
    }
  });
export type TDepositRuleChoice = z.output<typeof ZDepositRuleChoice>;

export const REPORT_NAMES = ["outstanding", "returns", "forfeited", "forfeits-due"] as const;
export type TReportName = (typeof REPORT_NAMES)[number];

// ---------- sale state and the return verdict ----------

type TSaleState = {
  sale: { id: string; saleRef: string; soldAt: Date; product: string; groupSize: string; quantity: number; depositCents: number };
  credits: number;
  unlinkedCreditIds: string[];
  refunds: number;
  refundedCents: number;
  forfeitedCents: number;
  heldCents: number;
  chargedQuantity: number;
};

async function saleState(client: TClient, siteId: string, saleRef: string): Promise<TSaleState | null> {
  const sale = await client.sale.findUnique({ where: { siteId_saleRef: { siteId, saleRef } } });
  if (!sale) return null;
  const entries = await client.depositEntry.findMany({
    where: { siteId, saleRef },
    select: { id: true, kind: true, amountCents: true, unitId: true },
    orderBy: { at: "asc" },
  });
  const state: TSaleState = { sale, credits: 0, unlinkedCreditIds: [], refunds: 0, refundedCents: 0, forfeitedCents: 0, heldCents: 0, chargedQuantity: 0 };
  for (const e of entries) {
    if (e.kind === "credit") {
      state.credits++;
      if (!e.unitId) state.unlinkedCreditIds.push(e.id);
    } else if (e.kind === "refund") {
      state.refunds++;
      state.refundedCents -= e.amountCents;
    } else if (e.kind === "forfeit") {
      state.forfeitedCents -= e.amountCents;
    }
  }
  state.heldCents = sale.depositCents - state.refundedCents - state.forfeitedCents;
  state.chargedQuantity = sale.quantity - state.credits;
  return state;
}

export type TReturnOption = { kind: TReturnAction; text: string };

export type TReturnCheck = {
  sale: {
    saleRef: string;
    soldOn: TCalendarDay;
    product: string;
    groupSize: string;
    quantity: number;
    depositCents: number;
    handedIn: number;
    refunded: number;
    refundedCents: number;
    forfeitedCents: number;
    heldCents: number;
  };
  due: TRefundDue;
  options: TReturnOption[];
  rule: { id: string; title: string; citation: string; refundWindowDays: number; isCustom: boolean };
  equivalentSize: { isEquivalent: boolean | null; text: string } | null;
  caution: string;
};

function assessReturn({
  state,
  rule,
  isCustom,
  returnedAt,
  timeZone,
  returnedKg,
}: {
  state: TSaleState;
  rule: TDepositRule;
  isCustom: boolean;
  returnedAt: Date;
  timeZone: string;
  returnedKg?: number;
}): TReturnCheck {
  const { sale } = state;
  const hasCharge = state.chargedQuantity > 0 && sale.depositCents > 0;
  const due = refundDue({
    rule,
    sale: hasCharge
      ? { soldAt: sale.soldAt, depositCents: sale.depositCents, quantity: state.chargedQuantity, alreadyReturned: state.refunds }
      : { soldAt: sale.soldAt, depositCents: 0, quantity: sale.quantity, alreadyReturned: 0 },
    returnedAt,
    timeZone,
  });
  let options: TReturnOption[] = [...due.options];
  let reason = due.reason;
  if (state.heldCents <= 0 && hasCharge) {
    // Forfeited (or fully refunded): nothing is held, whatever the window says.
    options = options.filter((o) => o.kind !== "refund" && o.kind !== "forfeit");
    if (state.forfeitedCents > 0) reason += ` The ${formatDollars(state.forfeitedCents)} left on this sale was already recorded as forfeited.`;
    if (!options.some((o) => o.kind === "accept-free")) {
      options.push({ kind: "accept-free", text: "Take the battery back free; nothing is held on this sale." });
    }
    due.refundCents = 0;
    due.refundQuantity = 0;
    due.forfeitCents = 0;
  }
  if (state.unlinkedCreditIds.length > 0) {
    const credit: TReturnOption = {
      kind: "credit",
      text: `Handed in when the new battery was bought (${state.unlinkedCreditIds.length} of ${state.credits} not yet logged): record it against the sale; no money changes hands.`,
    };
    // On the day of the sale a used battery is most likely the one handed in at the till.
    if (due.daysSinceSale === 0 || !options.some((o) => o.kind === "refund")) options.unshift(credit);
    else options.splice(1, 0, credit);
  }

  let equivalentSize: TReturnCheck["equivalentSize"] = null;
  if (rule.equivalentSize && sale.groupSize) {
    const sold = groupWeight(sale.groupSize);
    const range = `${rule.equivalentSize.minPct}–${rule.equivalentSize.maxPct} %`;
    if (!sold) {
      equivalentSize = { isEquivalent: null, text: `No typical weight is known for group ${sale.groupSize}, so equivalent size (${range} of the weight, ${rule.citation}) cannot be checked here.` };
    } else if (returnedKg === undefined) {
      equivalentSize = { isEquivalent: null, text: `Equivalent size is ${range} of the weight of the battery sold (group ${sale.groupSize}, about ${sold.valueKg} kg; project estimate). Weigh the returned battery to check.` };
    } else {
      const isEquivalent = isEquivalentSize({ rule, soldMassKg: sold.valueKg, returnedMassKg: returnedKg });
      const pct = Math.round((returnedKg / sold.valueKg) * 100);
      equivalentSize = {
        isEquivalent,
        text: `The returned battery (${returnedKg.toFixed(1)} kg) is ${pct} % of a typical group ${sale.groupSize} battery (${sold.valueKg} kg, project estimate): ${isEquivalent ? "inside" : "outside"} the ${range} that counts as equivalent size (${rule.citation}).`,
      };
    }
  }

  return {
    sale: {
      saleRef: sale.saleRef,
      soldOn: calendarDay(sale.soldAt, timeZone),
      product: sale.product,
      groupSize: sale.groupSize,
      quantity: sale.quantity,
      depositCents: sale.depositCents,
      handedIn: state.credits,
      refunded: state.refunds,
      refundedCents: state.refundedCents,
      forfeitedCents: state.forfeitedCents,
      heldCents: state.heldCents,
    },
    due: { ...due, reason },
    options,
    rule: { id: rule.id, title: rule.title, citation: rule.citation, refundWindowDays: rule.refundWindowDays, isCustom },
    equivalentSize,
    caution: GENERAL_CAUTION,
  };
}

const ACTION_WORDS: Record<TReturnAction, string> = {
  refund: "a refund",
  credit: "recording it as handed in at the sale",
  "accept-free": "taking it back free",
  forfeit: "recording a forfeit",
};

function assertAction(check: TReturnCheck, action: TReturnAction, field = "action"): void {
  if (check.options.some((o) => o.kind === action)) return;
  const open = check.options.map((o) => o.kind).join(", ");
  throw new AppError("invalid_input", `${ACTION_WORDS[action][0]!.toUpperCase()}${ACTION_WORDS[action].slice(1)} is not open for this return.`, [
    { field, message: `${check.due.reason} What the rule allows: ${open}.` },
  ]);
}

async function unitForLink(client: TClient, siteId: string, unitId: string): Promise<void> {
  const unit = await client.unit.findUnique({ where: { id: unitId }, select: { siteId: true } });
  if (!unit || unit.siteId !== siteId) throw new AppError("invalid_input", "That unit is not at this store.", [{ field: "unitId", message: "choose a unit logged at this store" }]);
  const linked = await client.depositEntry.findFirst({ where: { unitId }, select: { kind: true, saleRef: true } });
  if (linked) {
    throw new AppError("invalid_input", "That unit already has a deposit entry.", [
      { field: "unitId", message: `this unit already has a ${linked.kind} on sale ${linked.saleRef}` },
    ]);
  }
}

const noSale = (saleRef: string) =>
  new AppError("invalid_input", `There is no sale ${saleRef} at this store.`, [{ field: "saleRef", message: `no sale ${saleRef} at this store: check the receipt` }]);

// ---------- reads ----------

export type TDepositEntryView = { id: string; kind: string; amountCents: number; saleRef: string; unitId: string | null; at: Date; createdBy: string };

/** Balance, rule and the latest entries of a store (optionally of one sale). */
export async function listDeposits(actor: TActor, { siteId, saleRef, limit = 50 }: { siteId: string; saleRef?: string; limit?: number }) {
  const site = await siteFor(actor, siteId, "deposits.read");
  const entries: TDepositEntryView[] = await db().depositEntry.findMany({
    where: { siteId: site.id, ...(saleRef ? { saleRef } : {}) },
    orderBy: [{ at: "desc" }, { id: "desc" }],
    take: Math.min(limit, 500),
  });
  const found = siteDepositRule(site);
  return {
    site: { id: site.id, name: site.name, jurisdiction: site.jurisdiction, timeZone: siteTimeZone(site.jurisdiction) },
    balanceCents: site.depositBalanceCents,
    rule: found ? { ...found.rule, source: found.source } : null,
    entries,
    caution: GENERAL_CAUTION,
  };
}

/** The deposits a store holds, from its row (moved with every entry), never from summing history. */
export async function depositBalance(actor: TActor, siteId: string): Promise<number> {
  return (await siteFor(actor, siteId, "deposits.read")).depositBalanceCents;
}

/** The Counter's check of a returned battery against its sale: the window verdict, the refund due and what the rule allows. */
export async function checkReturn(
  actor: TActor,
  { siteId, saleRef, weightKg, groupSize, at }: { siteId: string; saleRef: string; weightKg?: number; groupSize?: string; at?: Date },
): Promise<TReturnCheck> {
  const site = await siteFor(actor, siteId, "deposits.read");
  const rule = requireRule(site);
  const state = await saleState(db(), site.id, saleRef);
  if (!state) throw new AppError("not_found", `There is no sale ${saleRef} at this store: check the receipt.`);
  const returnedKg = weightKg ?? (groupSize ? groupWeight(groupSize)?.valueKg : undefined);
  return assessReturn({
    state,
    rule,
    isCustom: siteDepositRule(site)?.source === "custom",
    returnedAt: at ?? new Date(),
    timeZone: siteTimeZone(site.jurisdiction),
    returnedKg,
  });
}

// ---------- writes ----------

/**
 * Records a sale with its deposit: a `charge` sale takes the core charge on each battery not matched by a
 * used one handed in (those get a credit each); a `credit` sale had every battery matched. One transaction:
 * the sale, its entries, the balance and the trail.
 */
export async function recordSale(actor: TActor, input: TSalePost, { at }: { at?: Date } = {}) {
  const site = await siteFor(actor, input.site, "deposits.write");
  const timeZone = siteTimeZone(site.jurisdiction);
  // `at` lets the demo loader backdate; the API always uses the current time.
  const now = at ?? new Date();
  const today = calendarDay(now, timeZone);
  if (input.soldOn && input.soldOn > today) {
    throw new AppError("invalid_input", "The sale date is in the future.", [{ field: "soldOn", message: `sale date must be ${today} or earlier` }]);
  }
  const soldAt = input.soldOn && input.soldOn !== today ? saleInstant(input.soldOn) : now;
  const handedIn = input.kind === "charge" ? input.handedIn : input.quantity;
  let depositCents = 0;
  if (input.kind === "charge") {
    const rule = siteDepositRule(site)?.rule;
    if (rule && rule.minChargeCents !== null && input.chargeCents < rule.minChargeCents) {
      throw new AppError("invalid_input", "The core charge is below the rule's least charge.", [
        { field: "chargeCents", message: `the core charge must be at least ${formatDollars(rule.minChargeCents)} a battery (${rule.citation})` },
      ]);
    }
    depositCents = (input.quantity - handedIn) * input.chargeCents;
  }
  const unitId = input.kind === "credit" ? input.unitId : undefined;
  if (await db().sale.findUnique({ where: { siteId_saleRef: { siteId: site.id, saleRef: input.saleRef } }, select: { id: true } })) {
    throw new AppError("invalid_input", `Sale ${input.saleRef} is already recorded at this store.`, [
      { field: "saleRef", message: `sale ${input.saleRef} is already recorded at this store` },
    ]);
  }
  if (unitId) await unitForLink(db(), site.id, unitId);

  return withDbErrors(
    () =>
      db().$transaction(async (tx) => {
        const sale = await tx.sale.create({
          data: { siteId: site.id, saleRef: input.saleRef, soldAt, product: input.product, groupSize: input.groupSize, quantity: input.quantity, depositCents },
        });
        const entries = [
          ...(depositCents > 0 ? [{ kind: "charge", amountCents: depositCents, unitId: null as string | null }] : []),
          ...Array.from({ length: handedIn }, (_, i) => ({ kind: "credit", amountCents: 0, unitId: i === 0 ? (unitId ?? null) : null })),
        ].map((e) => ({ ...e, id: randomUUID(), siteId: site.id, saleRef: sale.saleRef, at: soldAt, createdBy: actor.ref }));
        await tx.depositEntry.createMany({ data: entries });
        const updated = await tx.site.update({ where: { id: site.id }, data: { depositBalanceCents: { increment: depositCents } } });
        await writeTrail(tx, actor, {
          siteId: site.id,
          action: input.kind === "charge" ? "deposit.charged" : "deposit.credited",
          entity: "sale",
          entityId: sale.id,
          after: { sale, entries: entries.map(({ kind, amountCents, unitId: u }) => ({ kind, amountCents, unitId: u })) },
          at: now,
        });
        return { sale, entries, balanceCents: updated.depositBalanceCents };
      }),
    { conflict: `Sale ${input.saleRef} is already recorded at this store.` },
  );
}

export type TBookedReturn = {
  action: TReturnAction;
  entry: TDepositEntryView | null;
  /** Signed effect on the balance. */
  amountCents: number;
  balanceCents: number;
  message: string;
  check: TReturnCheck;
};

/** Books the deposit side of one returned battery inside the caller's transaction, re-checking the sale under the store's lock. */
async function bookReturn(
  tx: TTx,
  actor: TActor,
  { site, saleRef, unitId, action, now, field }: { site: TSiteRow; saleRef: string; unitId: string | null; action: TReturnAction; now: Date; field?: string },
): Promise<TBookedReturn> {
  await lockSite(tx, site.id);
  const rule = requireRule(site);
  const state = await saleState(tx, site.id, saleRef);
  if (!state) throw noSale(saleRef);
  if (unitId) await unitForLink(tx, site.id, unitId);
  const timeZone = siteTimeZone(site.jurisdiction);
  const check = assessReturn({ state, rule, isCustom: siteDepositRule(site)?.source === "custom", returnedAt: now, timeZone });
  assertAction(check, action, field);

  let entry: TDepositEntryView | null = null;
  let amountCents = 0;
  let message: string;
  const base = { siteId: site.id, saleRef, unitId, at: now, createdBy: actor.ref };
  if (action === "refund") {
    amountCents = -check.due.refundCents;
    entry = await tx.depositEntry.create({ data: { ...base, kind: "refund", amountCents } });
    message = `Refund ${formatDollars(check.due.refundCents)} paid on sale ${saleRef}.`;
  } else if (action === "credit") {
    if (!unitId) {
      throw new AppError("invalid_input", "A handed-in battery is recorded against the unit logged for it.", [
        { field: "unitId", message: "log the handed-in battery at the Counter with the sale reference" },
      ]);
    }
    entry = await tx.depositEntry.update({ where: { id: state.unlinkedCreditIds[0]! }, data: { unitId } });
    message = `Recorded as handed in at sale ${saleRef}; no money changes hands.`;
  } else if (action === "forfeit") {
    amountCents = -state.heldCents;
    entry = await tx.depositEntry.create({ data: { ...base, kind: "forfeit", amountCents } });
    message = `The ${formatDollars(state.heldCents)} still held on sale ${saleRef} is recorded as forfeited; the battery is taken back free.`;
  } else {
    message = `Taken back free; no deposit is paid back on sale ${saleRef}.`;
  }
  const updated = amountCents === 0 ? await tx.site.findUniqueOrThrow({ where: { id: site.id } }) : await tx.site.update({ where: { id: site.id }, data: { depositBalanceCents: { increment: amountCents } } });
  await writeTrail(tx, actor, {
    siteId: site.id,
    action: `deposit.return-${action}`,
    entity: entry ? "deposit" : "sale",
    entityId: entry?.id ?? state.sale.id,
    after: { saleRef, action, unitId, amountCents, daysSinceSale: check.due.daysSinceSale, windowDays: check.due.windowDays, ruleId: rule.id },
    at: now,
  });
  return { action, entry, amountCents, balanceCents: updated.depositBalanceCents, message, check };
}

/** One battery back against a sale, by API: a refund inside the window (optionally linked to a unit already logged). */
export async function recordRefund(actor: TActor, input: z.output<typeof ZRefund>, { at }: { at?: Date } = {}): Promise<TBookedReturn> {
  const site = await siteFor(actor, input.site, "deposits.write");
  requireRule(site);
  const now = at ?? new Date();
  return db().$transaction((tx) => bookReturn(tx, actor, { site, saleRef: input.saleRef, unitId: input.unitId ?? null, action: "refund", now, field: "saleRef" }));
}

/** `POST /api/v1/deposits`: a charge or credit sale, or one refund. */
export async function postDepositEntry(actor: TActor, input: TDepositPost) {
  if (input.kind === "refund") return { kind: input.kind, ...(await recordRefund(actor, input)) };
  return { kind: input.kind, ...(await recordSale(actor, input)) };
}

export type TCounterReturnResult = TIntakeResult & { body: Record<string, unknown> & { deposit: TBookedReturn & { isBooked: true } } };

const RETURN_SCOPE = "POST /api/v1/deposits/returns";

async function replayReturn(scope: string, key: string): Promise<TCounterReturnResult | null> {
  const row = await db().idempotencyKey.findUnique({ where: { scope_key: { scope, key } } });
  return row ? { status: row.status, body: JSON.parse(row.body), isReplay: true } : null;
}

/**
 * A used battery logged at the Counter against a sale, and its deposit booked — one transaction: the unit, its
 * totals and trail event (recordIntake), then the refund, credit or forfeit linked to it, checked under the
 * store's lock, and the idempotency record of the whole answer. A choice the rule does not allow (the window
 * closed, the sale already refunded) rolls the unit back too, so nothing is written and the clerk sees why.
 * A retry with the same key answers with the first response, even once the window has closed since.
 */
export async function recordReturn(actor: TActor, input: TCounterReturn, idempotencyKey?: string): Promise<TCounterReturnResult> {
  const site = await siteFor(actor, input.unit.site, "deposits.write");
  if (idempotencyKey) {
    const earlier = await replayReturn(`${actor.ref} ${RETURN_SCOPE}`, idempotencyKey);
    if (earlier) return earlier;
  }
  requireRule(site);
  const saleRef = input.unit.saleRef!;
  const result = await recordIntake(actor, input.unit, idempotencyKey, {
    idempotencyScope: RETURN_SCOPE,
    within: async (tx, unit) => ({ deposit: { isBooked: true, ...(await bookReturn(tx, actor, { site, saleRef, unitId: unit.id, action: input.action, now: unit.at })) } }),
  });
  return result as TCounterReturnResult;
}

const FORFEIT_BATCH = 1_000;

/** Books a forfeit entry for every sale whose window has closed with deposit still held, in one transaction. */
export async function runForfeits(actor: TActor, { siteId, at }: { siteId: string; at?: Date }) {
  const site = await siteFor(actor, siteId, "deposits.write");
  const rule = requireRule(site);
  const timeZone = siteTimeZone(site.jurisdiction);
  const now = at ?? new Date();
  return db().$transaction(
    async (tx) => {
      await lockSite(tx, site.id);
      const held = await heldBySale(tx, site.id);
      const due = forfeitsDue({ sales: held.map((h) => ({ saleRef: h.saleRef, soldAt: h.soldAt, depositCents: h.heldCents })), asOf: now, rule, timeZone });
      const runId = randomUUID();
      for (let i = 0; i < due.length; i += FORFEIT_BATCH) {
        const rows = due.slice(i, i + FORFEIT_BATCH).map((d, k) => [i + k, d.saleRef, -d.amountCents]);
        await tx.$executeRaw`
          INSERT INTO "DepositEntry" ("id","siteId","kind","amountCents","saleRef","at","createdBy")
          SELECT ${runId} || ':' || ${jsonText(0)}, ${site.id}, 'forfeit', ${jsonInt(2)}, ${jsonText(1)}, ${timeParam(now)}, ${actor.ref}
          FROM ${jsonRows(rows)}`;
      }
      const totalCents = due.reduce((sum, d) => sum + d.amountCents, 0);
      const updated = await tx.site.update({ where: { id: site.id }, data: { depositBalanceCents: { increment: -totalCents } } });
      await writeTrail(tx, actor, {
        siteId: site.id,
        action: "deposit.forfeits-booked",
        entity: "site",
        entityId: site.id,
        after: { count: due.length, totalCents, ruleId: rule.id, windowDays: rule.refundWindowDays, saleRefs: due.slice(0, 200).map((d) => d.saleRef) },
        at: now,
      });
      return { count: due.length, totalCents, balanceCents: updated.depositBalanceCents, forfeits: due.slice(0, 500), citation: rule.citation, caution: GENERAL_CAUTION };
    },
    { timeout: 120_000, maxWait: 10_000 },
  );
}

/** Chooses the store's deposit rule: a built-in one, a custom one (stored as JSON on the site), or back to its jurisdiction's. */
export async function setDepositRule(actor: TActor, input: TDepositRuleChoice) {
  const site = await siteFor(actor, input.site, "setup.write");
  let stored: string | null;
  if (input.custom !== undefined) {
    const parsed = z.object({ custom: ZDepositRule }).safeParse({
      custom: { jurisdiction: site.jurisdiction, projectChoices: [], ...input.custom, id: `custom-${site.id.slice(-12).toLowerCase()}`, sourceStatus: "custom" },
    });
    if (!parsed.success) throw new AppError("invalid_input", "Some fields of the rule need fixing.", fieldIssues(parsed.error.issues));
    stored = CUSTOM_PREFIX + JSON.stringify(parsed.data.custom);
  } else if (input.ruleId) {
    if (!listDepositRules().some((r) => r.id === input.ruleId)) {
      throw new AppError("invalid_input", "There is no such rule.", [{ field: "ruleId", message: `choose one of ${listDepositRules().map((r) => r.id).join(", ")}` }]);
    }
    stored = input.ruleId;
  } else {
    stored = null;
  }
  return db().$transaction(async (tx) => {
    const updated = await tx.site.update({ where: { id: site.id }, data: { depositRuleId: stored } });
    await writeTrail(tx, actor, { siteId: site.id, action: "deposit-rule.set", entity: "site", entityId: site.id, before: { depositRuleId: site.depositRuleId }, after: { depositRuleId: stored } });
    const found = siteDepositRule(updated);
    return { rule: found ? { ...found.rule, source: found.source } : null };
  });
}

// ---------- reports ----------

export type TDepositReports = {
  site: { id: string; name: string; timeZone: string };
  asOf: TCalendarDay;
  balanceCents: number;
  outstanding: TAgeRow[];
  returns: TReturnsMonthRow[];
  forfeited: TForfeitTotalRow[];
  forfeitsDue: TForfeitDue[];
  rule: (TDepositRule & { source: TSiteDepositRule["source"] }) | null;
  caution: string;
};

const REPORT_MONTHS = 12;

/** Outstanding deposits by age, returns against sales by month (last 12 months), forfeits by month, and what is due to forfeit. */
export async function depositReports(actor: TActor, { siteId, at }: { siteId: string; at?: Date }): Promise<TDepositReports> {
  const site = await siteFor(actor, siteId, "deposits.read");
  const timeZone = siteTimeZone(site.jurisdiction);
  const now = at ?? new Date();
  const asOf = calendarDay(now, timeZone);
  const [year, month] = monthOf(asOf).split("-").map(Number) as [number, number];
  const firstMonthStart = new Date(Date.UTC(year, month - REPORT_MONTHS, 1));
  const firstMonth = firstMonthStart.toISOString().slice(0, 7);
  // A day's margin for zones behind UTC; rows before the first month are dropped below.
  const from = new Date(firstMonthStart.getTime() - 86_400_000);
  const found = siteDepositRule(site);

  const [held, sales, returned, forfeits] = await Promise.all([
    heldBySale(db(), site.id),
    db().sale.findMany({ where: { siteId: site.id, soldAt: { gte: from } }, select: { soldAt: true, quantity: true } }),
    db().depositEntry.findMany({ where: { siteId: site.id, kind: { in: ["refund", "credit"] }, at: { gte: from } }, select: { at: true } }),
    db().depositEntry.findMany({ where: { siteId: site.id, kind: "forfeit" }, select: { kind: true, amountCents: true, saleRef: true, at: true } }),
  ]);
  const outstanding = outstandingByAge({
    entries: held.map((h) => ({ kind: "charge" as const, amountCents: h.heldCents, saleRef: h.saleRef, at: h.soldAt })),
    asOf: now,
    timeZone,
  });
  const returns = returnsToSalesByMonth({
    sales: sales.map((s) => ({ soldAt: s.soldAt, quantity: s.quantity })),
    returns: returned.map((r) => ({ returnedAt: r.at, quantity: 1 })),
    timeZone,
  }).filter((r) => r.month >= firstMonth && r.month <= monthOf(asOf));
  const forfeited = forfeitedTotals({ entries: forfeits.map((f) => ({ ...f, kind: "forfeit" as const })), by: "month", timeZone });
  const due = found
    ? forfeitsDue({ sales: held.map((h) => ({ saleRef: h.saleRef, soldAt: h.soldAt, depositCents: h.heldCents })), asOf: now, rule: found.rule, timeZone })
    : [];
  return {
    site: { id: site.id, name: site.name, timeZone },
    asOf,
    balanceCents: site.depositBalanceCents,
    outstanding,
    returns,
    forfeited,
    forfeitsDue: due,
    rule: found ? { ...found.rule, source: found.source } : null,
    caution: GENERAL_CAUTION,
  };
}

/** One report as a CSV file. */
export async function depositReportCsv(actor: TActor, { siteId, name, at }: { siteId: string; name: TReportName; at?: Date }): Promise<string> {
  const reports = await depositReports(actor, { siteId, at });
  switch (name) {
    case "outstanding":
      return outstandingByAgeCsv(reports.outstanding);
    case "returns":
      return returnsToSalesByMonthCsv(reports.returns);
    case "forfeited":
      return forfeitedTotalsCsv(reports.forfeited);
    case "forfeits-due":
      return forfeitsDueCsv(reports.forfeitsDue);
  }
}
