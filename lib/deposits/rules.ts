import { z } from "zod";
import { AppError } from "@/lib/errors";
import { isCalendarDay } from "@/lib/deposits/calendar-day";

const text = (what: string, max: number, missing = `${what} is missing`) =>
  z
    .string({ error: (issue) => (issue.input === undefined ? missing : `${what} must be text`) })
    .trim()
    .min(1, { error: missing })
    .max(max, { error: `${what} must be at most ${max} characters` });

const wholeNumber = (what: string, min: number, max: number) => {
  const error = `${what} must be a whole number from ${min} to ${max}`;
  return z.int({ error }).min(min, { error }).max(max, { error });
};

const percent = (what: string, min: number, max: number) => {
  const error = `${what} must be from ${min} to ${max} %`;
  return z.number({ error }).min(min, { error }).max(max, { error });
};

/**
 * A deposit (core charge) rule for one jurisdiction. Amounts are per battery, in US cents.
 * `minChargeCents: null` means the rule sets no amount; `takeBackDuty: null` means the rule states
 * no duty to take used batteries back. `projectChoices` lists every value or reading that is ours
 * rather than the cited text's.
 */
export const ZDepositRule = z
  .object({
    id: z
      .string({ error: "id must be text" })
      .regex(/^[a-z0-9][a-z0-9-]{1,62}$/, { error: "id must be 2 to 63 lower-case letters, digits or dashes" }),
    title: text("title", 120),
    jurisdiction: text("jurisdiction", 40),
    minChargeCents: wholeNumber("minimum charge (cents)", 0, 100_000).nullable(),
    refundWindowDays: wholeNumber("refund window (days)", 1, 3_650),
    isReceiptRequired: z.boolean().default(false),
    takeBackDuty: z
      .object({
        text: text("take-back duty", 500),
        mustAcceptAtLeastSold: z.boolean({ error: "say whether the store must accept as many as it sold" }),
      })
      .nullable(),
    perPersonPerDayLimit: wholeNumber("limit per person per day", 1, 1_000).optional(),
    postedNotice: z
      .object({
        text: text("notice", 500),
        minWidthMm: z.number().positive({ error: "notice width must be above 0 mm" }).optional(),
        minHeightMm: z.number().positive({ error: "notice height must be above 0 mm" }).optional(),
      })
      .optional(),
    equivalentSize: z
      .object({
        minPct: percent("the lower bound", 0, 100),
        maxPct: percent("the upper bound", 100, 1_000),
        basis: z.literal("weight"),
      })
      .optional(),
    fee: z
      .object({
        amountCents: wholeNumber("fee (cents)", 0, 100_000),
        text: text("fee description", 300),
        isRefundable: z.boolean(),
        effectiveFrom: z
          .string()
          .refine(isCalendarDay, { error: "effective date must be YYYY-MM-DD" })
          .optional(),
      })
      .optional(),
    citation: text("citation", 300, "citation is required: name the law, regulation or permit this rule comes from"),
    /** REFERENCES.md status of the values: V, V2, C, M; an administrator's own rule is "custom". */
    sourceStatus: z.enum(["V", "V2", "C", "M", "custom"]).default("custom"),
    projectChoices: z.array(z.string().trim().min(1)).default([]),
  });

export type TDepositRule = z.output<typeof ZDepositRule>;
export type TDepositRuleInput = z.input<typeof ZDepositRule>;

// Values from REFERENCES.md "US state core-charge laws"; everything else is listed in projectChoices.
const PER_BATTERY = "Amounts are read as per battery sold (project choice: the reference gives the amount without a unit).";

const BUILT_IN: TDepositRuleInput[] = [
  {
    id: "us-wa",
    title: "Washington core charge",
    jurisdiction: "US-WA",
    minChargeCents: 500,
    refundWindowDays: 30,
    isReceiptRequired: true,
    takeBackDuty: {
      text: "Accept used batteries from customers, at least as many as the new batteries they bought.",
      mustAcceptAtLeastSold: true,
    },
    postedNotice: {
      text: "Post the notice the law requires, at least 8.5 × 11 in (215.9 × 279.4 mm).",
      // 8.5 in and 11 in × 25.4 mm/in (exact by definition of the inch)
      minWidthMm: 215.9,
      minHeightMm: 279.4,
    },
    equivalentSize: { minPct: 50, maxPct: 150, basis: "weight" },
    citation: "RCW 70A.205.515, RCW 70A.205.520; WAC 173-331-100(7)",
    sourceStatus: "V",
    projectChoices: [PER_BATTERY],
  },
  {
    id: "us-id",
    title: "Idaho battery fee",
    jurisdiction: "US-ID",
    minChargeCents: 1_000,
    refundWindowDays: 30,
    takeBackDuty: null,
    citation: "Idaho Code §39-7003",
    sourceStatus: "V",
    projectChoices: [
      PER_BATTERY,
      "The $10 fee is kept as the minimum charge: it is taken at the sale and comes back when a used battery is returned within 30 days.",
      "Our reference states no take-back duty, so none is recorded.",
    ],
  },
  {
    id: "us-ca",
    title: "California battery deposit and take-back",
    jurisdiction: "US-CA",
    minChargeCents: null,
    refundWindowDays: 45,
    takeBackDuty: {
      text: "Accept used batteries free of charge, up to 6 a day from any one person.",
      mustAcceptAtLeastSold: false,
    },
    perPersonPerDayLimit: 6,
    fee: {
      amountCents: 200,
      text: "California battery fee of $2 a battery from 2022-04-01, separate from the deposit.",
      isRefundable: false,
      effectiveFrom: "2022-04-01",
    },
    citation: "Cal. Health & Safety Code §25215.2, §25215.25",
    sourceStatus: "V",
    projectChoices: [
      PER_BATTERY,
      "The reference sets no deposit amount, so no minimum is recorded.",
      "The battery fee is read as not refundable: the reference names it apart from the refundable deposit.",
    ],
  },
  {
    id: "us-az",
    title: "Arizona battery deposit",
    jurisdiction: "US-AZ",
    minChargeCents: null,
    refundWindowDays: 45,
    takeBackDuty: {
      text: "Accept used batteries of the type and in the quantity sold.",
      mustAcceptAtLeastSold: true,
    },
    citation: "A.R.S. §44-1323",
    sourceStatus: "V",
    projectChoices: [PER_BATTERY, "The reference sets no deposit amount, so no minimum is recorded."],
  },
  {
    id: "us-ny",
    title: "New York battery deposit",
    jurisdiction: "US-NY",
    minChargeCents: 500,
    refundWindowDays: 30,
    takeBackDuty: { text: "Accept used batteries free of charge.", mustAcceptAtLeastSold: false },
    citation: "N.Y. ECL §27-1701; 6 NYCRR 374-1.7",
    sourceStatus: "V2",
    projectChoices: [
      PER_BATTERY,
      "The $5 deposit is kept as the minimum charge.",
      "Read in a secondary copy only (status V2): check the current text before relying on it.",
    ],
  },
];

function deepFreeze<T>(value: T): T {
  if (value && typeof value === "object") {
    for (const inner of Object.values(value)) deepFreeze(inner);
    Object.freeze(value);
  }
  return value;
}

// Parsed through the same schema an administrator's rule goes through, so the table cannot drift from it.
const RULES: ReadonlyMap<string, TDepositRule> = new Map(
  BUILT_IN.map((input) => {
    const rule = deepFreeze(ZDepositRule.parse(input));
    return [rule.id, rule] as const;
  }),
);

/** The built-in deposit rules, in a fixed order (WA, ID, CA, AZ, NY). */
export function listDepositRules(): readonly TDepositRule[] {
  return [...RULES.values()];
}

export function getDepositRule(id: string): TDepositRule {
  const rule = RULES.get(id);
  if (!rule) throw new AppError("not_found", `There is no deposit rule "${id}".`);
  return rule;
}
