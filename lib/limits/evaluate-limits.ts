import { CAUTION } from "@/lib/rules/caution";
import { ruleTrigger, thresholdInBase, type TMetric, type TRule, type TRuleUnit, type TSiteRule } from "@/lib/rules/rule";
import type { TRulebook } from "@/lib/rules/rulebook";
import { formatMass, kgToLb } from "@/lib/units";
import { ageDaysOf, containerAge, type TContainerAge } from "./container-age";
import { reaches } from "./reaches";
import { ruleStatus, worstStatus, type TLimitStatus } from "./rule-status";
import { dateOfUtcDay, isoDateOfUtcDay, utcDay } from "./utc-day";

/** On-hand totals of a site. Masses in kg. Same shape as the running totals the data layer keeps. */
export type TTotals = { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };

export const HISTORY_WINDOW_DAYS = 28;
/** Forecasts further out than this (about ten years) are not given. */
export const FORECAST_HORIZON_DAYS = 3653;

/**
 * The recent intake, cheap to get: one SUM over the site's level changes with
 * asOf − 28 days < at ≤ asOf. The rate used for forecasts is netChangeLast28Days ÷ daysCovered.
 */
export type TIntakeHistory = {
  netChangeLast28Days: TTotals;
  /** For a site younger than the window: the days of history it has (1–28). Default 28. */
  daysCovered?: number;
};

/** A container as the limits see it. States open, sealed and loaded are on site; departed and delivered are not. */
export type TContainerInput = {
  id: string;
  labelNumber: string;
  accumulationStart: Date | null;
  state: string;
  isClosed: boolean;
  hasLeaking: boolean;
};

export type TSiteLimits = {
  /** Set only for batteries held for sale to the public (consumer-product exemption); off where spent units are kept. */
  isConsumerExempt: boolean;
  /** The calendar year of peakBatteryKg, and the most battery mass on hand at any moment of that year. */
  peakYear: number;
  peakBatteryKg: number;
  /** Other universal waste on site (lamps, pesticides, mercury devices, aerosol cans), entered by hand; default 0. */
  otherUniversalWasteKg?: number;
};

export type TRuleResult = {
  ruleId: string;
  title: string;
  metric: TMetric;
  source: "rulebook" | "site";
  status: TLimitStatus;
  /** In the rule's unit, like threshold and margin. */
  value: number;
  threshold: number;
  unit: TRuleUnit;
  /** threshold − value: negative once over. */
  margin: number;
  /** value as a percentage of threshold; null for a zero threshold. */
  percent: number | null;
  /** The first day the rule is expected to be over, at the recent net intake rate (ages: the day after the deadline); null when not rising, exempt or already over. */
  forecastDate: Date | null;
  isExempt: boolean;
  citation: string;
  /** The rule's own caution followed by the general one. */
  caution: string;
  detail: string;
};

export type TContainerLimit = {
  containerId: string;
  labelNumber: string;
  /** null when the container has no accumulation start date (nothing in it yet). */
  ageDays: number | null;
  daysLeft: number | null;
  deadline: Date | null;
  status: TLimitStatus;
  /** The age rule that gives the earliest deadline. */
  ruleId: string | null;
  /** Holds a leaking or damaged unit but is not closed. */
  needsClosing: boolean;
};

export type TLimitsReport = {
  rulebookId: string;
  rulebookVersion: string;
  asOf: Date;
  status: TLimitStatus;
  rules: TRuleResult[];
  containers: TContainerLimit[];
  caution: string;
};

export type TEvaluateLimitsInput = {
  rulebook: TRulebook;
  customRules?: readonly TSiteRule[];
  totals: TTotals;
  containers: readonly TContainerInput[];
  history: TIntakeHistory;
  asOf: Date;
  site: TSiteLimits;
};

const ON_SITE_STATES = new Set(["open", "sealed", "loaded"]);

const TOTAL_OF: Record<Exclude<TMetric, "container-age-days" | "leaking-open-container">, keyof TTotals> = {
  "battery-kg": "batteryKg",
  "lead-kg": "leadKg",
  "acid-kg": "acidKg",
  "unit-count": "unitCount",
};

type TRuleContext = {
  totals: TTotals;
  site: TSiteLimits;
  today: number;
  year: number;
  ratePerDay: TTotals;
  daysCovered: number;
  onSite: readonly TContainerInput[];
  /** Each age rule's result for each on-site container (same order as onSite; null without a start date), computed once for rules and containers alike. */
  ages: Map<TRule, (TContainerAge | null)[]>;
};
type TPartialResult = Pick<TRuleResult, "status" | "value" | "forecastDate" | "isExempt" | "detail">;

/** Each rule of the site's rulebook and its own rules against the site's totals and containers. */
export function evaluateLimits(input: TEvaluateLimitsInput): TLimitsReport {
  const { rulebook, customRules = [], totals, containers, history, asOf, site } = input;
  const today = utcDay(asOf);
  const daysCovered = Math.min(HISTORY_WINDOW_DAYS, Math.max(1, history.daysCovered ?? HISTORY_WINDOW_DAYS));
  const net = history.netChangeLast28Days;
  const ratePerDay: TTotals = {
    unitCount: net.unitCount / daysCovered,
    batteryKg: net.batteryKg / daysCovered,
    leadKg: net.leadKg / daysCovered,
    electrolyteKg: net.electrolyteKg / daysCovered,
    acidKg: net.acidKg / daysCovered,
  };
  const onSite = containers.filter((c) => ON_SITE_STATES.has(c.state));
  const rules: { rule: TRule; source: TRuleResult["source"] }[] = [
    ...rulebook.rules.map((rule) => ({ rule, source: "rulebook" as const })),
    ...customRules.map((rule) => ({ rule, source: "site" as const })),
  ];
  const ages = new Map(
    rules
      .filter(({ rule }) => rule.metric === "container-age-days")
      .map(({ rule }) => [rule, onSite.map((c) => (c.accumulationStart ? containerAge({ accumulationStart: c.accumulationStart, asOf, rule }) : null))]),
  );
  const ctx: TRuleContext = { totals, site, today, year: asOf.getUTCFullYear(), ratePerDay, daysCovered, onSite, ages };

  const results = rules.map(({ rule, source }) => resultOf(rule, source, ctx));
  const containerResults = onSite.map((c, i) => containerLimit(c, i, ctx, asOf));

  return {
    rulebookId: rulebook.id,
    rulebookVersion: rulebook.version,
    asOf,
    status: worstStatus([...results.map((r) => r.status), ...containerResults.map((c) => c.status)]),
    rules: results,
    containers: containerResults,
    caution: CAUTION,
  };
}

function resultOf(rule: TRule, source: TRuleResult["source"], ctx: TRuleContext): TRuleResult {
  const threshold = thresholdInBase(rule);
  const partial =
    rule.metric === "container-age-days"
      ? ageResult(rule, ctx)
      : rule.metric === "leaking-open-container"
        ? leakingResult(rule, ctx)
        : totalResult(rule, threshold, ctx);
  const value = rule.unit === "lb" ? kgToLb(partial.value) : partial.value;
  return {
    ruleId: rule.id,
    title: rule.title,
    metric: rule.metric,
    source,
    status: partial.status,
    value,
    threshold: rule.threshold,
    unit: rule.unit,
    margin: rule.threshold - value,
    percent: threshold > 0 ? (partial.value / threshold) * 100 : null,
    forecastDate: partial.forecastDate,
    isExempt: partial.isExempt,
    citation: rule.citation,
    caution: rule.caution ? `${rule.caution} ${CAUTION}` : CAUTION,
    detail: partial.detail,
  };
}

/** Masses and counts against the site's totals; value returned in base units (kg or count). */
function totalResult(rule: TRule, threshold: number, ctx: TRuleContext): TPartialResult {
  const key = TOTAL_OF[rule.metric as keyof typeof TOTAL_OF];
  const other = rule.addsOtherUniversalWaste ? (ctx.site.otherUniversalWasteKg ?? 0) : 0;
  const value = ctx.totals[key] + other;
  const show = (n: number) =>
    key === "unitCount" ? `${n.toLocaleString("en-US", { maximumFractionDigits: 1 })} units` : formatMass(n, rule.unit === "lb" ? "lb" : "kg");
  const against = `${show(value)} on hand${other > 0 ? ` (with ${show(other)} of other universal waste)` : ""} against ${show(threshold)}.`;

  if (rule.isConsumerExemptible && ctx.site.isConsumerExempt) {
    return {
      status: "ok",
      value,
      forecastDate: null,
      isExempt: true,
      detail: `Not applied: the site is marked as holding batteries for sale to the public (consumer-product exemption). ${against} Spent batteries do not qualify for the exemption.`,
    };
  }

  const status = ruleStatus(rule, value, threshold);
  const yearEnd = `31 December ${ctx.year}`;
  if (status === "exceeded") {
    const holds = rule.sticky ? ` This holds until ${yearEnd}, even if the amount falls.` : "";
    return { status, value, forecastDate: null, isExempt: false, detail: `At or over the limit: ${against}${holds}` };
  }
  // 40 CFR 273.9: reaching 5 000 kg at any time makes the site a large quantity handler for the rest of that calendar year.
  if (rule.sticky && ctx.site.peakYear === ctx.year && reaches(ctx.site.peakBatteryKg, threshold)) {
    return {
      status: "exceeded",
      value,
      forecastDate: null,
      isExempt: false,
      detail: `${show(ctx.site.peakBatteryKg)} was on hand earlier in ${ctx.year}, at or over ${show(threshold)}: this holds until ${yearEnd}. Now ${against}`,
    };
  }

  const rate = ctx.ratePerDay[key];
  const forecastDate = forecast(rule, threshold - value, rate, ctx.today);
  const window = `the last ${ctx.daysCovered} days`;
  const outlook =
    rate > 0
      ? forecastDate
        ? ` At the net intake of ${window} (${show(rate)} a day) it is reached about ${isoDateOfUtcDay(utcDay(forecastDate))}.`
        : ` At the net intake of ${window} it is more than ten years away.`
      : ` Net intake over ${window} is flat or falling: no date forecast.`;
  return { status, value, forecastDate, isExempt: false, detail: against + outlook };
}

/** The first day over at a steady rate: gap ÷ rate days from today, rounded up to a whole day. */
function forecast(rule: TRule, gap: number, ratePerDay: number, today: number): Date | null {
  if (!(ratePerDay > 0)) return null;
  const days = gap / ratePerDay;
  // "above" needs to pass the threshold; "at-or-above" only to reach it. The 1e-9 absorbs float noise in gap ÷ rate.
  const whole = ruleTrigger(rule) === "above" ? Math.floor(days + 1e-9) + 1 : Math.max(1, Math.ceil(days - 1e-9));
  return whole > FORECAST_HORIZON_DAYS ? null : dateOfUtcDay(today + whole);
}

function ageResult(rule: TRule, ctx: TRuleContext): TPartialResult {
  let worst: { label: string; age: TContainerAge } | null = null;
  let overCount = 0;
  const ages = ctx.ages.get(rule) ?? [];
  for (let i = 0; i < ages.length; i++) {
    const age = ages[i];
    if (!age) continue;
    if (age.status === "exceeded") overCount += 1;
    if (!worst || age.daysLeft < worst.age.daysLeft) worst = { label: ctx.onSite[i].labelNumber, age };
  }
  if (!worst) {
    return { status: "ok", value: 0, forecastDate: null, isExempt: false, detail: "No container on site has a start date yet." };
  }
  const { label, age } = worst;
  const lastDay = isoDateOfUtcDay(utcDay(age.deadline));
  if (age.status === "exceeded") {
    const others = overCount > 1 ? ` ${overCount} containers are over the limit in all.` : "";
    return {
      status: age.status,
      value: age.ageDays,
      forecastDate: null,
      isExempt: false,
      detail: `Container ${label} is on day ${age.ageDays} of ${rule.threshold}: its last day was ${lastDay}.${others}`,
    };
  }
  const left = age.daysLeft === 0 ? "today is its last day" : `${age.daysLeft} days left, last day ${lastDay}`;
  return {
    status: age.status,
    value: age.ageDays,
    forecastDate: age.firstDayOver,
    isExempt: false,
    detail: `Oldest container ${label} is on day ${age.ageDays} of ${rule.threshold}: ${left}.`,
  };
}

function leakingResult(rule: TRule, ctx: TRuleContext): TPartialResult {
  const open = ctx.onSite.filter((c) => c.hasLeaking && !c.isClosed);
  const status = ruleStatus(rule, open.length, rule.threshold);
  const detail =
    open.length === 0
      ? "No leaking or damaged unit is in an open container."
      : `${open.length === 1 ? "1 container holds" : `${open.length} containers hold`} a leaking or damaged unit and ${open.length === 1 ? "is" : "are"} not closed: ${open.map((c) => c.labelNumber).join(", ")}.`;
  return { status, value: open.length, forecastDate: null, isExempt: false, detail };
}

function containerLimit(container: TContainerInput, index: number, ctx: TRuleContext, asOf: Date): TContainerLimit {
  const needsClosing = container.hasLeaking && !container.isClosed;
  const base = { containerId: container.id, labelNumber: container.labelNumber, needsClosing };
  let best: { rule: TRule; age: TContainerAge } | null = null;
  for (const [rule, ages] of ctx.ages) {
    const age = ages[index];
    if (age && (!best || age.daysLeft < best.age.daysLeft)) best = { rule, age };
  }
  if (!best) {
    const start = container.accumulationStart;
    return { ...base, ageDays: start ? ageDaysOf(start, asOf) : null, daysLeft: null, deadline: null, status: "ok", ruleId: null };
  }
  const { rule, age } = best;
  return { ...base, ageDays: age.ageDays, daysLeft: age.daysLeft, deadline: age.deadline, status: age.status, ruleId: rule.id };
}
