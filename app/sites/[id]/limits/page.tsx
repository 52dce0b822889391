import type { Metadata } from "next";
import Link from "next/link";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { TotalsFigures } from "@/app/_ui/totals-figures";
import { can } from "@/lib/auth/permissions";
import { db } from "@/lib/db/client";
import { annualOfSite } from "@/lib/db/annual";
import { limitsOfSite } from "@/lib/db/limits";
import type { TLimitsReport, TRuleResult } from "@/lib/limits/evaluate-limits";
import { isoDateOfUtcDay, utcDay } from "@/lib/limits/utc-day";
import { thresholdInBase, type TRule } from "@/lib/rules/rule";
import { kgToLb } from "@/lib/units";
import { Gauge, warningLevel } from "./gauge";
import styles from "./limits.module.css";
import { OnHandChart, type TChartThreshold } from "./on-hand-chart";
import { RuleForm } from "./rule-form";
import { StatusWord } from "./status-word";

export const metadata: Metadata = { title: "Limits" };
export const dynamic = "force-dynamic";

/** Where a number on this screen comes from: the list of what is on hand behind it. */
function drillHref(siteId: string, result: TRuleResult, report: TLimitsReport): string {
  const base = `/sites/${siteId}/yard/units`;
  if (result.metric === "leaking-open-container") return `${base}?scope=damaged`;
  if (result.metric === "container-age-days") {
    const worst = report.containers.filter((c) => c.ruleId === result.ruleId && c.daysLeft !== null).sort((a, b) => a.daysLeft! - b.daysLeft!)[0];
    return worst ? `${base}?container=${worst.containerId}` : base;
  }
  return base;
}

const CHARTS = [
  { metric: "battery-kg", title: "Battery mass on hand", key: "batteryKg" },
  { metric: "acid-kg", title: "Sulfuric acid on hand", key: "acidKg" },
  { metric: "lead-kg", title: "Lead on hand", key: "leadKg" },
] as const;

export default async function LimitsPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "limits.read");
  const asOf = new Date();
  const year = asOf.getUTCFullYear();
  const [{ report, definitions }, annual] = await Promise.all([limitsOfSite(db(), site, asOf), annualOfSite(db(), site.id, year)]);
  const byId = new Map<string, TRule>(definitions.map((r) => [r.id, r]));
  const unit = site.unitSystem === "lb" ? "lb" : "kg";
  const toUnit = (kg: number) => (unit === "lb" ? kgToLb(kg) : kg);
  const today = utcDay(asOf) - utcDay(new Date(Date.UTC(year, 0, 1)));
  const days = annual.days.slice(0, today + 1);
  const withDates = report.containers.filter((c) => c.deadline !== null).sort((a, b) => a.daysLeft! - b.daysLeft!);
  const needsClosing = report.containers.filter((c) => c.needsClosing);

  return (
    <Shell actor={actor} site={site} active="limits">
      <div className="row" style={{ justifyContent: "space-between" }}>
        <div>
          <h1>Limits</h1>
          <p className="lede">
            {site.name} against rulebook {report.rulebookId} {report.rulebookVersion} and its own rules, as of {asOf.toISOString().slice(0, 16).replace("T", " ")} UTC.
          </p>
        </div>
        <p style={{ margin: 0 }} data-testid="site-status">
          <StatusWord status={report.status} prefix="Site:" />
        </p>
      </div>
      <p className="caution" role="note">
        <strong>Caution</strong>
        {report.caution}
      </p>
      <TotalsFigures totals={site} system={site.unitSystem} />

      <h2>Rules</h2>
      {report.rules.map((r) => (
        <Gauge key={r.ruleId} result={r} rule={byId.get(r.ruleId)} drillHref={drillHref(site.id, r, report)} />
      ))}
      {report.rules.length === 0 && <p className="muted">This rulebook has no rules of its own and the site has none yet.</p>}

      <h2>Container deadlines</h2>
      {needsClosing.length > 0 && (
        <p className="caution danger">
          <strong>Needs a closed container</strong>
          {needsClosing.map((c) => c.labelNumber).join(", ")} hold a leaking or cracked unit but are not closed.
        </p>
      )}
      <table className="dense" aria-label="Container deadlines">
        <thead>
          <tr>
            <th>Container</th>
            <th className="num">Day</th>
            <th className="num">Days left</th>
            <th>Last day</th>
            <th>Status</th>
          </tr>
        </thead>
        <tbody>
          {withDates.slice(0, 50).map((c) => (
            <tr key={c.containerId}>
              <td>
                <Link href={`/sites/${site.id}/yard/units?container=${c.containerId}`}>{c.labelNumber}</Link>
              </td>
              <td className="num">{c.ageDays}</td>
              <td className="num">{c.daysLeft}</td>
              <td>{c.deadline ? isoDateOfUtcDay(utcDay(c.deadline)) : "—"}</td>
              <td>
                <StatusWord status={c.status} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {withDates.length === 0 && <p className="muted">No container on site has a start date yet.</p>}
      {withDates.length > 50 && <p className="small muted">The 50 nearest deadlines of {withDates.length}.</p>}

      <h2>On hand each day of {year}</h2>
      <p className="small muted">The most on hand during each UTC day so far this year, in {unit}; limits drawn solid, warning levels dashed.</p>
      {CHARTS.map((chart) => {
        const thresholds: TChartThreshold[] = definitions
          .filter((r) => r.metric === chart.metric)
          .flatMap((r) => {
            const limitKg = thresholdInBase(r);
            const warnKg = thresholdInBase({ threshold: warningLevel(r), unit: r.unit });
            const name = r.title.split(":")[0]!;
            return [
              { label: `${name}: limit`, value: toUnit(limitKg), isWarning: false },
              { label: `${name}: warning`, value: toUnit(warnKg), isWarning: true },
            ];
          });
        return (
          <OnHandChart
            key={chart.metric}
            title={chart.title}
            unit={unit}
            points={days.map((d) => ({ date: d.date, value: toUnit(d[chart.key]) }))}
            thresholds={thresholds}
          />
        );
      })}
      <p className="small">
        Full figures for the year: <Link href={`/api/v1/sites/${site.id}/annual?year=${year}&format=csv`}>annual figures (CSV)</Link> ·{" "}
        <Link href={`/api/v1/sites/${site.id}/annual?year=${year}&format=pdf`}>worksheet (PDF)</Link>
      </p>

      {can(actor, "setup.write", site.id) && (
        <>
          <h2>Add a site rule</h2>
          <p className="small muted">A permit or fire-code limit of this site, evaluated beside the rulebook. Every rule needs its source.</p>
          <RuleForm siteId={site.id} />
        </>
      )}
      <p className={styles.citation} style={{ marginTop: "1rem" }}>
        See every site at once on <Link href="/limits">all sites’ limits</Link>.
      </p>
    </Shell>
  );
}
