import type { Metadata } from "next";
import Link from "next/link";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { can } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { ZRecordsQuery, listDocuments, shipmentRecords } from "@/lib/db/papers";
import { formatMass, type TUnitSystem } from "@/lib/units";
import styles from "../loads/loads.module.css";
import { VerifyButton } from "./verify-button";

export const metadata: Metadata = { title: "Papers" };
export const dynamic = "force-dynamic";

const KIND_WORDS: Record<string, string> = { manifest: "Load manifest", "receipt-form": "Receipt form", records: "Shipment records", label: "Container label", annual: "Annual figures worksheet" };
const minute = (d: Date) => d.toISOString().slice(0, 16).replace("T", " ") + " UTC";

export default async function PapersPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "loads.read");
  const query = await searchParams;
  const todayIso = new Date().toISOString().slice(0, 10);
  const period = ZRecordsQuery.safeParse({ site: site.id, from: query.from ?? `${todayIso.slice(0, 4)}-01-01`, to: query.to ?? todayIso });
  const system: TUnitSystem = site.unitSystem === "lb" ? "lb" : "kg";
  const canIssue = can(actor, "papers.issue", site.id);
  const [documents, records] = await Promise.all([listDocuments(actor, { siteId: site.id }), period.success ? shipmentRecords(actor, period.data) : Promise.resolve(null)]);
  const range = period.success ? `site=${site.id}&from=${period.data.from}&to=${period.data.to}` : "";

  return (
    <Shell actor={actor} site={site} active="papers">
      <h1>Papers</h1>
      <p className="lede">
        Every paper issued at {site.name}, kept with the data it was made from, the rulebook version and its sha256: any of them can be made again and shown to be the same document.
      </p>

      <h2>Issued papers</h2>
      <table className="dense" aria-label="Issued papers">
        <thead>
          <tr>
            <th>Issued</th>
            <th>Paper</th>
            <th>Load</th>
            <th>By</th>
            <th>Rulebook</th>
            <th>sha256</th>
            <th>Open and check</th>
          </tr>
        </thead>
        <tbody>
          {documents.map((d) => (
            <tr key={d.id} data-document={d.id}>
              <td>{minute(d.issuedAt)}</td>
              <td>{KIND_WORDS[d.kind] ?? d.kind}</td>
              <td>{d.loadId ? <Link href={`/sites/${site.id}/loads/${d.loadId}`}>{d.loadReference}</Link> : "—"}</td>
              <td>{d.issuedByLabel}</td>
              <td>
                {d.rulebookId} {d.rulebookVersion}
              </td>
              <td className={styles.hash}>{d.sha256}</td>
              <td>
                <a href={`/api/v1/records/documents/${d.id}/regenerated.pdf`} target="_blank" rel="noopener">
                  Open
                </a>{" "}
                <VerifyButton documentId={d.id} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {documents.length === 0 && <p className="muted">No paper issued yet. Manifests and receipt forms are made from a load’s page.</p>}

      <h2 id="records-heading">Shipment records</h2>
      <p className="muted">
        Shipments received and sent with the fields of 40 CFR 273.39 (received: origin name and address, quantity by type, date received; sent: destination name and address, quantity by type, date it left). A large quantity handler keeps them at least three years.
      </p>
      <form method="get" className="row" aria-label="Shipment records period" style={{ alignItems: "end" }}>
        <div>
          <label htmlFor="from">From</label>
          <input id="from" name="from" type="date" defaultValue={period.success ? period.data.from : String(query.from ?? "")} />
        </div>
        <div>
          <label htmlFor="to">To</label>
          <input id="to" name="to" type="date" defaultValue={period.success ? period.data.to : String(query.to ?? "")} />
        </div>
        <button type="submit">Show</button>
        {records && (
          <>
            <a className="button" href={`/api/v1/records?${range}&format=csv`}>
              Download CSV
            </a>
            {canIssue && (
              <a className="button" href={`/api/v1/records?${range}&format=pdf`} target="_blank" rel="noopener">
                Issue as PDF
              </a>
            )}
          </>
        )}
      </form>
      {!period.success && (
        <div className="error-box" role="alert">
          {period.error.issues.map((i) => (
            <p key={i.message}>{i.message}</p>
          ))}
        </div>
      )}
      {records && (
        <table className="dense" aria-labelledby="records-heading">
          <thead>
            <tr>
              <th>Direction</th>
              <th>Date</th>
              <th>From / to</th>
              <th>Type</th>
              <th className="num">Count</th>
              <th className="num">Mass</th>
              <th>Reference</th>
            </tr>
          </thead>
          <tbody>
            {records.rows.map((row, i) => (
              <tr key={i}>
                <td>{row.direction === "received" ? "Received" : "Sent"}</td>
                <td>{row.date}</td>
                <td>
                  {row.counterpartName}
                  {row.counterpartAddress && <div className="small muted">{row.counterpartAddress}</div>}
                </td>
                <td>{row.type}</td>
                <td className="num">{row.count.toLocaleString("en-US")}</td>
                <td className="num">{formatMass(row.massKg, system)}</td>
                <td>{row.reference}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {records && records.rows.length === 0 && <p className="muted">No shipments received or sent in this period.</p>}
      {records?.notes.map((note) => (
        <p key={note} className="small muted" data-testid="records-note">
          {note}
        </p>
      ))}
      <p className="caution" role="note">
        {GENERAL_CAUTION}
      </p>
    </Shell>
  );
}
