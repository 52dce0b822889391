import type { Metadata } from "next";
import Link from "next/link";
import { pageActor } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { organisationLimits } from "@/lib/db/limits";
import { addTotals, ZERO_TOTALS } from "@/lib/db/totals";
import { worstStatus } from "@/lib/limits/rule-status";
import { CAUTION } from "@/lib/rules/caution";
import styles from "../sites/[id]/limits/limits.module.css";
import { StatusWord } from "../sites/[id]/limits/status-word";

export const metadata: Metadata = { title: "All sites’ limits" };
export const dynamic = "force-dynamic";

/** Every site the person may see × each rule: one glance at the whole organisation. */
export default async function OrganisationLimitsPage() {
  const actor = await pageActor();
  const sites = await organisationLimits(actor);
  // Rulebook rules become columns in the order first met; each site's own rules share one column.
  const columns: { id: string; title: string }[] = [];
  for (const s of sites) for (const r of s.report.rules) if (r.source === "rulebook" && !columns.some((c) => c.id === r.ruleId)) columns.push({ id: r.ruleId, title: r.title.split(":")[0]! });
  const org = sites.reduce((sum, s) => addTotals(sum, s.site.totals), ZERO_TOTALS);
  const system = sites[0]?.site.unitSystem ?? "kg";
  return (
    <Shell actor={actor}>
      <h1>All sites’ limits</h1>
      <p className="lede">Each site you can see against each rule that applies there. Open a site for its gauges, deadlines and daily line.</p>
      <p className="caution" role="note">
        <strong>Caution</strong>
        {CAUTION}
      </p>
      <div style={{ overflowX: "auto" }}>
        <table className={`dense ${styles.rollup}`} aria-label="Limits by site">
          <thead>
            <tr>
              <th>Site</th>
              <th>Overall</th>
              {columns.map((c) => (
                <th key={c.id} title={c.id}>
                  {c.title}
                </th>
              ))}
              <th>Site rules</th>
              <th>Containers</th>
              <th className="num">Battery mass</th>
            </tr>
          </thead>
          <tbody>
            {sites.map(({ site, report }) => {
              const siteRules = report.rules.filter((r) => r.source === "site");
              const overdue = report.containers.filter((c) => c.status === "exceeded").length;
              const soon = report.containers.filter((c) => c.status === "approaching").length;
              return (
                <tr key={site.id} data-site={site.id}>
                  <td>
                    <Link href={`/sites/${site.id}/limits`}>{site.name}</Link>
                  </td>
                  <td>
                    <StatusWord status={report.status} />
                  </td>
                  {columns.map((c) => {
                    const r = report.rules.find((x) => x.ruleId === c.id);
                    return <td key={c.id}>{r ? <StatusWord status={r.status} /> : <span className="muted">not in its rulebook</span>}</td>;
                  })}
                  <td>{siteRules.length ? <StatusWord status={worstStatus(siteRules.map((r) => r.status))} prefix={`${siteRules.length} ·`} /> : <span className="muted">none</span>}</td>
                  <td className="small">
                    {overdue > 0 && `${overdue} over · `}
                    {soon > 0 && `${soon} due soon · `}
                    {report.containers.length} on site
                  </td>
                  <td className="num">
                    <Mass kg={site.totals.batteryKg} system={site.unitSystem} />
                  </td>
                </tr>
              );
            })}
          </tbody>
          {sites.length > 1 && (
            <tfoot>
              <tr>
                <th colSpan={columns.length + 4}>All your sites: {org.unitCount.toLocaleString("en-US")} units</th>
                <th className="num">
                  <Mass kg={org.batteryKg} system={system} />
                </th>
              </tr>
            </tfoot>
          )}
        </table>
      </div>
      {sites.length === 0 && <p>None of your sites lets you see its limits.</p>}
    </Shell>
  );
}
