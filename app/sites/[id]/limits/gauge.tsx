import Link from "next/link";
import type { TRuleResult } from "@/lib/limits/evaluate-limits";
import { isoDateOfUtcDay, utcDay } from "@/lib/limits/utc-day";
import type { TRule } from "@/lib/rules/rule";
import { formatMass, lbToKg } from "@/lib/units";
import styles from "./limits.module.css";
import { StatusWord } from "./status-word";

/** A value in the rule's own unit, as the rule is written (Tier II in lb, the handler category in kg). */
export function ruleAmount(value: number, unit: string): string {
  if (unit === "kg" || unit === "lb") return formatMass(unit === "lb" ? lbToKg(value) : value, unit, 1);
  const n = value.toLocaleString("en-US", { maximumFractionDigits: 1 });
  return unit === "days" ? `${n} days` : `${n} ${Math.abs(value) === 1 ? "unit" : "units"}`;
}

/** Where approaching starts, in the rule's unit: warningMargin before the threshold when set, else warningPct of it. */
export function warningLevel(rule: Pick<TRule, "threshold" | "warningPct" | "warningMargin">): number {
  return rule.warningMargin !== undefined ? rule.threshold - rule.warningMargin : (rule.threshold * rule.warningPct) / 100;
}

const pct = (v: number, max: number) => `${Math.max(0, Math.min(100, (v / max) * 100)).toFixed(2)}%`;

/**
 * One rule as a horizontal bar: the fill is the value, the solid mark the threshold, the dashed mark the
 * warning level; the words below give the value, the margin and the forecast date, so nothing rests on colour.
 */
export function Gauge({ result, rule, drillHref }: { result: TRuleResult; rule?: TRule; drillHref?: string }) {
  const hasScale = result.threshold > 0;
  const warning = rule ? warningLevel(rule) : null;
  const max = Math.max(result.threshold * 1.25, result.value * 1.05, 1);
  const value = ruleAmount(result.value, result.unit);
  const forecast = result.forecastDate ? isoDateOfUtcDay(utcDay(new Date(result.forecastDate))) : null;
  return (
    <article className={`card ${styles.rule}`} aria-labelledby={`rule-${result.ruleId}`} data-rule={result.ruleId} data-status={result.status}>
      <div className={styles.ruleHead}>
        <h3 id={`rule-${result.ruleId}`}>
          {result.title}
          {result.source === "site" && <span className="hint"> · site rule</span>}
        </h3>
        <StatusWord status={result.status} />
      </div>
      {hasScale && (
        <div
          className={styles.gauge}
          role="meter"
          aria-valuemin={0}
          aria-valuemax={result.threshold}
          aria-valuenow={Math.min(result.value, result.threshold)}
          aria-valuetext={`${value} of ${ruleAmount(result.threshold, result.unit)}`}
          aria-label={result.title}
        >
          <span className={`${styles.fill} ${styles[result.status] ?? ""}`} style={{ width: pct(result.value, max) }} />
          {warning !== null && warning > 0 && warning < result.threshold && (
            <>
              <span className={`${styles.mark} ${styles.warning}`} style={{ left: pct(warning, max) }} />
              <span className={`${styles.markLabel} ${styles.below}`} style={{ left: pct(warning, max) }}>
                warning {ruleAmount(warning, result.unit)}
              </span>
            </>
          )}
          <span className={styles.mark} style={{ left: pct(result.threshold, max) }} />
          <span className={styles.markLabel} style={{ left: pct(result.threshold, max) }}>
            limit {ruleAmount(result.threshold, result.unit)}
          </span>
        </div>
      )}
      <dl className={styles.facts}>
        <div>
          <dt>Now</dt>
          <dd data-testid="rule-value">{drillHref ? <Link href={drillHref}>{value}</Link> : value}</dd>
        </div>
        <div>
          <dt>{result.margin >= 0 ? "Margin" : "Over by"}</dt>
          <dd>{ruleAmount(Math.abs(result.margin), result.unit)}</dd>
        </div>
        {result.percent !== null && (
          <div>
            <dt>Of the limit</dt>
            <dd>{result.percent.toFixed(1)} %</dd>
          </div>
        )}
        <div>
          <dt>Expected over</dt>
          <dd>{forecast ?? "no date"}</dd>
        </div>
      </dl>
      <p className="small" style={{ margin: 0 }}>
        {result.detail}
      </p>
      <p className={styles.citation}>Source: {result.citation}</p>
      <p className="caution" style={{ margin: 0 }}>
        {result.caution}
      </p>
    </article>
  );
}
