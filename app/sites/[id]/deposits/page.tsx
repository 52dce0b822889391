import type { Metadata } from "next";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { can } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { depositReports, listDeposits } from "@/lib/db/deposits";
import { listDepositRules } from "@/lib/deposits/rules";
import { calendarDay } from "@/lib/deposits/calendar-day";
import { dollars } from "./money";
import { ForfeitButton } from "./forfeit-button";
import { ImportPanel } from "./import-panel";
import { ReturnsChart } from "./returns-chart";
import { RuleForm } from "./rule-form";
import { SaleForm } from "./sale-form";

export const metadata: Metadata = { title: "Deposits" };
export const dynamic = "force-dynamic";

const KIND_WORDS: Record<string, string> = { charge: "Charge taken", credit: "Handed in at sale", refund: "Refund paid", forfeit: "Forfeited" };
const SOURCE_WORDS = { "built-in": "chosen for this store", custom: "this store's own rule", jurisdiction: "the rule of the store's jurisdiction" };
const SHOWN_DUE = 20;

export default async function DepositsPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "deposits.read");
  const [reports, latest] = await Promise.all([depositReports(actor, { siteId: site.id }), listDeposits(actor, { siteId: site.id, limit: 25 })]);
  const { rule } = reports;
  const canWrite = can(actor, "deposits.write", site.id);
  const canImport = can(actor, "sales.import", site.id);
  const canSetRule = can(actor, "setup.write", site.id);
  const heldSales = reports.outstanding.reduce((n, b) => n + b.saleCount, 0);
  const dueCents = reports.forfeitsDue.reduce((n, d) => n + d.amountCents, 0);
  const csv = (name: string) => `/api/v1/deposits/reports/${name}.csv?site=${site.id}`;
  const zone = reports.site.timeZone;

  return (
    <Shell actor={actor} site={site} active="deposits">
      <h1>Deposits</h1>
      <p className="lede">
        Core charges taken at the till, paid back when the used battery comes back, and released once the refund window has passed. Days are
        counted on the store&apos;s calendar ({zone}); the day of the sale is day 0.
      </p>
      <dl className="figures" aria-label="Deposit figures">
        <div data-figure="balance">
          <dt>Deposits held now</dt>
          <dd>{dollars(reports.balanceCents)}</dd>
        </div>
        <div data-figure="held-sales">
          <dt>Sales holding a deposit</dt>
          <dd>{heldSales.toLocaleString("en-US")}</dd>
        </div>
        <div data-figure="due">
          <dt>Past the window</dt>
          <dd>{dollars(dueCents)}</dd>
        </div>
        <div data-figure="forfeited">
          <dt>Forfeited, last 12 months</dt>
          <dd>{dollars(reports.forfeited.reduce((n, f) => n + f.forfeitedCents, 0))}</dd>
        </div>
      </dl>

      <h2>The rule this store follows</h2>
      {rule ? (
        <section className="card" aria-label="Deposit rule">
          <p style={{ marginTop: 0 }}>
            <strong>{rule.title}</strong> <span className="muted small">({SOURCE_WORDS[rule.source]})</span>
            <br />
            <span className="small">Citation: {rule.citation}</span>
          </p>
          <table className="dense" aria-label="What the rule says">
            <tbody>
              <tr>
                <th>Refund window</th>
                <td>
                  {rule.refundWindowDays} days from the sale{rule.isReceiptRequired ? ", with the sales receipt" : ""}
                </td>
              </tr>
              <tr>
                <th>Least core charge</th>
                <td>{rule.minChargeCents === null ? "the rule sets no amount" : `${dollars(rule.minChargeCents)} a battery`}</td>
              </tr>
              <tr>
                <th>Take-back duty</th>
                <td>
                  {rule.takeBackDuty ? rule.takeBackDuty.text : "none recorded"}
                  {rule.perPersonPerDayLimit ? ` Limit: ${rule.perPersonPerDayLimit} a day from one person.` : ""}
                </td>
              </tr>
              {rule.equivalentSize && (
                <tr>
                  <th>Equivalent size</th>
                  <td>
                    {rule.equivalentSize.minPct}–{rule.equivalentSize.maxPct} % of the {rule.equivalentSize.basis} of the battery bought
                  </td>
                </tr>
              )}
              {rule.fee && (
                <tr>
                  <th>Fee</th>
                  <td>
                    {rule.fee.text} {rule.fee.isRefundable ? "(refundable)" : "(not refundable)"}
                  </td>
                </tr>
              )}
            </tbody>
          </table>
          {rule.postedNotice && (
            <p className="caution" style={{ marginBottom: 0 }} data-testid="posted-notice">
              <strong>Reminder: posted notice</strong>
              {rule.postedNotice.text}
            </p>
          )}
          {rule.projectChoices.length > 0 && (
            <details className="small" style={{ marginTop: "0.5rem" }}>
              <summary>How we read this rule</summary>
              <ul>
                {rule.projectChoices.map((c) => (
                  <li key={c}>{c}</li>
                ))}
              </ul>
            </details>
          )}
          <p className="caution" style={{ marginBottom: 0 }}>
            {GENERAL_CAUTION}
          </p>
        </section>
      ) : (
        <p className="error-box">This store has no deposit rule yet, so refunds cannot be checked. An administrator chooses one below.</p>
      )}
      {canSetRule && (
        <RuleForm
          siteId={site.id}
          rules={listDepositRules().map((r) => ({ id: r.id, title: r.title, citation: r.citation, refundWindowDays: r.refundWindowDays }))}
          current={rule}
        />
      )}

      {(canWrite || canImport) && (
        <div className="grid two" style={{ alignItems: "start", marginTop: "1.2rem" }}>
          {canWrite && <SaleForm siteId={site.id} minChargeCents={rule?.minChargeCents ?? null} citation={rule?.citation ?? null} />}
          {canImport && <ImportPanel siteId={site.id} />}
        </div>
      )}

      <h2>Outstanding deposits by age</h2>
      <table className="dense" aria-label="Outstanding deposits by age">
        <thead>
          <tr>
            <th>Age since sale</th>
            <th className="num">Sales</th>
            <th className="num">Deposit held</th>
          </tr>
        </thead>
        <tbody>
          {reports.outstanding.map((b) => (
            <tr key={b.label}>
              <td>{b.label}</td>
              <td className="num">{b.saleCount.toLocaleString("en-US")}</td>
              <td className="num">{dollars(b.outstandingCents)}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="small">
        <a href={csv("outstanding")}>Download as CSV</a>
      </p>

      <h2>Returns against sales, by month</h2>
      <p className="small muted">Returned = a used battery handed in at the sale or brought back for a refund. Last 12 months.</p>
      {reports.returns.length > 0 ? <ReturnsChart rows={reports.returns} /> : <p className="muted">No sales yet.</p>}
      <table className="dense" aria-label="Returns against sales by month">
        <thead>
          <tr>
            <th>Month</th>
            <th className="num">Sold</th>
            <th className="num">Returned</th>
            <th className="num">Returned per sold</th>
          </tr>
        </thead>
        <tbody>
          {reports.returns.map((m) => (
            <tr key={m.month}>
              <td>{m.month}</td>
              <td className="num">{m.soldQuantity.toLocaleString("en-US")}</td>
              <td className="num">{m.returnedQuantity.toLocaleString("en-US")}</td>
              <td className="num">{m.ratio === null ? "—" : `${(m.ratio * 100).toFixed(1)} %`}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="small">
        <a href={csv("returns")}>Download as CSV</a>
      </p>

      <h2>Forfeited</h2>
      {reports.forfeited.length === 0 ? (
        <p className="muted">Nothing forfeited yet.</p>
      ) : (
        <table className="dense" aria-label="Forfeited by month">
          <thead>
            <tr>
              <th>Month</th>
              <th className="num">Forfeits</th>
              <th className="num">Forfeited</th>
            </tr>
          </thead>
          <tbody>
            {reports.forfeited.map((f) => (
              <tr key={f.period}>
                <td>{f.period}</td>
                <td className="num">{f.forfeitCount}</td>
                <td className="num">{dollars(f.forfeitedCents)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      <p className="small">
        <a href={csv("forfeited")}>Download as CSV</a>
      </p>

      <h2>Past the refund window</h2>
      {rule && (
        <p className="small">
          Sales older than {rule.refundWindowDays} days ({rule.citation}) with deposit still held, as of {reports.asOf}. Booking them as forfeited
          releases the deposit from the balance.
        </p>
      )}
      {reports.forfeitsDue.length === 0 ? (
        <p className="muted">None.</p>
      ) : (
        <table className="dense" aria-label="Sales past the refund window">
          <thead>
            <tr>
              <th>Sale</th>
              <th>Sold on</th>
              <th>Last refund day</th>
              <th className="num">Days since sale</th>
              <th className="num">To forfeit</th>
            </tr>
          </thead>
          <tbody>
            {reports.forfeitsDue.slice(0, SHOWN_DUE).map((d) => (
              <tr key={d.saleRef}>
                <td>{d.saleRef}</td>
                <td>{d.soldOn}</td>
                <td>{d.lastRefundDay}</td>
                <td className="num">{d.daysSinceSale}</td>
                <td className="num">{dollars(d.amountCents)}</td>
              </tr>
            ))}
          </tbody>
          {reports.forfeitsDue.length > SHOWN_DUE && (
            <tfoot>
              <tr>
                <td colSpan={5}>and {reports.forfeitsDue.length - SHOWN_DUE} more (all in the CSV)</td>
              </tr>
            </tfoot>
          )}
        </table>
      )}
      <div className="row" style={{ marginTop: "0.5rem" }}>
        {canWrite && rule && <ForfeitButton siteId={site.id} count={reports.forfeitsDue.length} totalCents={dueCents} />}
        <a className="small" href={csv("forfeits-due")}>
          Download as CSV
        </a>
      </div>
      <p className="caution small">{GENERAL_CAUTION}</p>

      <h2>Latest entries</h2>
      <table className="dense" aria-label="Latest deposit entries">
        <thead>
          <tr>
            <th>When</th>
            <th>Entry</th>
            <th>Sale</th>
            <th className="num">Effect on balance</th>
            <th>Unit</th>
          </tr>
        </thead>
        <tbody>
          {latest.entries.map((e) => (
            <tr key={e.id}>
              <td>{calendarDay(e.at, zone)}</td>
              <td>{KIND_WORDS[e.kind] ?? e.kind}</td>
              <td>{e.saleRef}</td>
              <td className="num">{dollars(e.amountCents)}</td>
              <td className="small">{e.unitId ? e.unitId.slice(0, 8) : "—"}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {latest.entries.length === 0 && <p className="muted">No entries yet.</p>}
    </Shell>
  );
}
