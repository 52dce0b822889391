import { ruleTrigger, type TRule } from "@/lib/rules/rule";
import { lbToKg } from "@/lib/units";
import { reaches } from "./reaches";

export type TLimitStatus = "ok" | "approaching" | "exceeded";

const RANK: Record<TLimitStatus, number> = { ok: 0, approaching: 1, exceeded: 2 };
export const worstStatus = (statuses: Iterable<TLimitStatus>): TLimitStatus => {
  let worst: TLimitStatus = "ok";
  for (const s of statuses) if (RANK[s] > RANK[worst]) worst = s;
  return worst;
};

/**
 * A value against a rule, both in base units (kg for masses, else the rule's unit). "approaching" starts
 * at warningMargin before the threshold when the rule has one, otherwise at warningPct of it.
 */
export function ruleStatus(rule: TRule, value: number, threshold: number): TLimitStatus {
  const isOver = ruleTrigger(rule) === "above" ? value > threshold : reaches(value, threshold);
  if (isOver) return "exceeded";
  if (threshold <= 0) return "ok"; // a zero threshold (leaking units) has no warning band
  if (rule.warningMargin !== undefined) {
    const warningMargin = rule.unit === "lb" ? lbToKg(rule.warningMargin) : rule.warningMargin;
    return threshold - value <= warningMargin ? "approaching" : "ok";
  }
  return value >= (threshold * rule.warningPct) / 100 ? "approaching" : "ok";
}
