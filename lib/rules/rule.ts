import { z } from "zod";
import { lbToKg } from "@/lib/units";

/** What a rule watches. Masses are the site's on-hand totals; ages are per container. */
export const METRICS = [
  "battery-kg",
  "lead-kg",
  "acid-kg",
  "unit-count",
  "container-age-days",
  "leaking-open-container",
] as const;
export type TMetric = (typeof METRICS)[number];

export const RULE_UNITS = ["kg", "lb", "count", "days"] as const;
export type TRuleUnit = (typeof RULE_UNITS)[number];

/**
 * When a threshold counts as crossed. Regulatory mass thresholds are met "at or above" (40 CFR 273.9
 * "5 000 kilograms or more"; 40 CFR 370.10(a) "equal to or greater than"); a time limit is broken only
 * once it has passed ("no longer than one year", 40 CFR 273.15(a)).
 */
export const TRIGGERS = ["at-or-above", "above"] as const;
export type TTrigger = (typeof TRIGGERS)[number];

const UNITS_FOR: Record<TMetric, readonly TRuleUnit[]> = {
  "battery-kg": ["kg", "lb"],
  "lead-kg": ["kg", "lb"],
  "acid-kg": ["kg", "lb"],
  "unit-count": ["count"],
  "container-age-days": ["days"],
  "leaking-open-container": ["count"],
};

/** Why a unit does not fit a metric, in words a clerk understands; null when it fits. */
export function unitProblem(metric: TMetric, unit: TRuleUnit): string | null {
  if (UNITS_FOR[metric].includes(unit)) return null;
  if (metric === "unit-count" || metric === "leaking-open-container") return "a count rule must use the unit count";
  if (metric === "container-age-days") return "a container age rule must use the unit days";
  return "a mass rule must use the unit kg or lb";
}

const refineRule = (
  rule: { metric: TMetric; unit: TRuleUnit; threshold: number; sticky?: "calendar-year" },
  ctx: z.RefinementCtx,
) => {
  const problem = unitProblem(rule.metric, rule.unit);
  if (problem) ctx.addIssue({ code: "custom", path: ["unit"], message: problem });
  if (rule.unit === "days" && !Number.isInteger(rule.threshold)) {
    ctx.addIssue({ code: "custom", path: ["threshold"], message: "a limit in days must be a whole number of days" });
  }
  // The year's peak is kept for battery mass only (Site.peakBatteryKg), so only that metric can stick.
  if (rule.sticky && rule.metric !== "battery-kg") {
    ctx.addIssue({ code: "custom", path: ["sticky"], message: "only a battery mass rule can hold for the calendar year" });
  }
};

/** A rule of a shipped rulebook. */
export const ZRule = z
  .object({
    id: z.string().min(1),
    title: z.string().min(1),
    metric: z.enum(METRICS),
    threshold: z.number().min(0),
    unit: z.enum(RULE_UNITS),
    /** "approaching" from this share of the threshold. */
    warningPct: z.number().min(0).max(100),
    /** When set, "approaching" starts when the margin (threshold − value, in the rule's unit) is this or less, instead of warningPct. */
    warningMargin: z.number().min(0).optional(),
    /** Default: "above" for container age and leaking containers, "at-or-above" for masses and counts. */
    trigger: z.enum(TRIGGERS).optional(),
    citation: z.string().min(1),
    caution: z.string(),
    /** Once crossed in a calendar year, the rule stays crossed until 31 December of that year. */
    sticky: z.literal("calendar-year").optional(),
    /** Not applied at a site marked as holding batteries for sale to the public (Site.isConsumerExempt). */
    isConsumerExemptible: z.boolean().optional(),
    /** The threshold counts all universal waste at the site, so other universal waste is added to the battery mass. */
    addsOtherUniversalWaste: z.boolean().optional(),
  })
  .superRefine(refineRule);
export type TRule = z.output<typeof ZRule>;

const CUSTOM_METRICS = ["battery-kg", "lead-kg", "acid-kg", "unit-count", "container-age-days"] as const;
const CITATION_MESSAGE = "a site rule needs its source: give the permit, code section or document it comes from";

/**
 * A site's own rule (a permit limit, a fire-code cap): same shape as a rulebook rule, but it must name
 * its source and cannot hold for the calendar year.
 */
export const ZCustomRule = z
  .object({
    title: z.string({ error: "give the rule a short title" }).trim().min(1, "give the rule a short title").max(120, "the title must be at most 120 characters"),
    metric: z.enum(CUSTOM_METRICS, { error: `what the rule watches must be one of: ${CUSTOM_METRICS.join(", ")}` }),
    threshold: z.coerce
      .number({ error: "the limit must be a number" })
      .positive("the limit must be more than 0"),
    unit: z.enum(RULE_UNITS, { error: `the unit must be one of: ${RULE_UNITS.join(", ")}` }),
    warningPct: z.coerce
      .number({ error: "the warning level must be a number" })
      .min(1, "the warning level must be between 1 and 100 %")
      .max(100, "the warning level must be between 1 and 100 %")
      .default(80),
    citation: z.string({ error: CITATION_MESSAGE }).trim().min(1, CITATION_MESSAGE).max(300, "the source must be at most 300 characters"),
    caution: z.string().trim().max(500, "the caution must be at most 500 characters").default(""),
  })
  .superRefine(refineRule);
export type TCustomRule = z.output<typeof ZCustomRule>;
export type TCustomRuleInput = z.input<typeof ZCustomRule>;

/** A site rule as stored (Prisma `CustomRule`): the parsed fields plus its id. */
export type TSiteRule = TCustomRule & { id: string };

/** The trigger that applies to a rule, with the defaults by metric. */
export const ruleTrigger = (rule: Pick<TRule, "metric" | "trigger">): TTrigger =>
  rule.trigger ?? (rule.metric === "container-age-days" || rule.metric === "leaking-open-container" ? "above" : "at-or-above");

/** The threshold in the unit values are kept in: kg for masses (lb converted exactly), else as given. */
export const thresholdInBase = (rule: Pick<TRule, "threshold" | "unit">): number =>
  rule.unit === "lb" ? lbToKg(rule.threshold) : rule.threshold;
