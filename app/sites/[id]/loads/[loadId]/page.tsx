import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { can } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { NON_SPILLABLE_CAUTION } from "@/lib/chemistry";
import { AppError } from "@/lib/errors";
import { listCarriers, listFacilities } from "@/lib/db/facilities";
import { getLoad, loadableContainers, type TLoadView } from "@/lib/db/loads";
import { formatMass, type TUnitSystem } from "@/lib/units";
import styles from "../loads.module.css";
import { LoadSteps, WeightFlag, stateWord } from "../load-state";
import { AddContainers, BasisChoice, Checklist, CorrectionForm, DepartForm, LoadDetailsForm, ReceiveForm, ReconcileForm, RemoveContainer, StateButton } from "./load-actions";

export const metadata: Metadata = { title: "Load" };
export const dynamic = "force-dynamic";

const day = (d: Date | string | null) => (d ? new Date(d).toISOString().slice(0, 10) : "—");
const minute = (d: Date | string | null) => (d ? new Date(d).toISOString().slice(0, 16).replace("T", " ") + " UTC" : "—");
const pct = (v: number) => `${v > 0 ? "+" : v < 0 ? "−" : ""}${Math.abs(v).toFixed(2)} %`;

const ACTION_WORDS: Record<string, string> = {
  "load.created": "Planned",
  "load.updated": "Edited",
  "load.container-added": "Container added",
  "load.container-removed": "Container taken off",
  "load.ready": "Marked ready",
  "load.unready": "Back to planning",
  "load.departed": "Departed",
  "load.received": "Receipt recorded",
  "load.reconciled": "Reconciled",
  "load.corrected": "Correction",
};

function detailOf(e: TLoadView["history"][number], system: TUnitSystem): string {
  const after = (e.after ?? {}) as Record<string, unknown>;
  switch (e.action) {
    case "load.container-added":
    case "load.container-removed":
      return String(after.labelNumber ?? "");
    case "load.departed":
      return [`left ${minute(after.departedAt as string)}`, after.departureScaleKg ? `scale ${formatMass(Number(after.departureScaleKg), system)}` : ""].filter(Boolean).join(", ");
    case "load.received":
      return `${formatMass(Number(after.receivedKg), system)} on ${after.receivedAt}`;
    case "load.corrected":
      return `${after.field}: ${String((e.before as { value?: unknown })?.value ?? "—")} → ${String(after.value)} (${String(after.note ?? "")})`;
    case "load.reconciled":
      return String(after.note ?? "");
    case "load.updated":
      return Object.keys(after).join(", ");
    default:
      return "";
  }
}

export default async function LoadPage({ params }: { params: Promise<{ id: string; loadId: string }> }) {
  const { id, loadId } = await params;
  const { actor, site } = await pageSite(id, "loads.read");
  const view = await getLoad(actor, loadId).catch((error: unknown) => {
    if (error instanceof AppError && error.code === "not_found") notFound();
    throw error;
  });
  if (view.load.siteId !== site.id) notFound();
  const { load, summary, gate, reconciliation, effective } = view;
  const system: TUnitSystem = site.unitSystem === "lb" ? "lb" : "kg";
  const canWrite = can(actor, "loads.write", site.id);
  const canIssue = can(actor, "papers.issue", site.id);
  const isPlanning = load.state === "planning";
  const [free, facilities, carriers] = isPlanning && canWrite ? await Promise.all([loadableContainers(actor, site.id), listFacilities(actor), listCarriers(actor)]) : [[], [], []];
  const hasLeft = ["departed", "delivered", "reconciled"].includes(load.state);

  return (
    <Shell actor={actor} site={site} active="loads">
      <p className="small">
        <Link href={`/sites/${site.id}/loads`}>← All loads</Link>
      </p>
      <h1>Load {load.reference}</h1>
      <LoadSteps state={load.state} />
      {load.state === "reconciled" && (
        <p className="notice" role="status">
          Reconciled on {day(load.reconciledAt)}: this load is read-only. A corrected weight or date is recorded as a correction beside it.
        </p>
      )}

      <dl className={styles.facts} aria-label="Load details">
        <div>
          <dt>Receiving facility</dt>
          <dd>
            <strong>{view.facility.name}</strong>
            {"\n"}
            {view.facility.address}
            {view.facility.regulatoryIds ? `\n${view.facility.regulatoryIds}` : ""}
            {`\nWeighing tolerance ${view.facility.tolerancePct} %`}
          </dd>
        </div>
        <div>
          <dt>Carrier and vehicle</dt>
          <dd>
            {view.carrier ? (
              <>
                <strong>{view.carrier.name}</strong>
                {view.carrier.regulatoryIds ? `\n${view.carrier.regulatoryIds}` : ""}
              </>
            ) : (
              "(carrier not named)"
            )}
            {load.vehicle ? `\nVehicle: ${load.vehicle}` : ""}
          </dd>
        </div>
        <div>
          <dt>Emergency response telephone</dt>
          <dd>
            {view.emergencyPhone ?? (
              <span className="status exceeded">
                <span aria-hidden="true">✗</span> None set
              </span>
            )}
            {"\n"}
            <span className="hint">Monitored at all times while in transport (49 CFR 172.604(a)); set under Setup.</span>
          </dd>
        </div>
      </dl>

      {isPlanning && canWrite && (
        <section aria-labelledby="details-heading">
          <h2 id="details-heading">Facility, carrier and vehicle</h2>
          <LoadDetailsForm
            loadId={load.id}
            facilityId={load.facilityId}
            carrierId={load.carrierId}
            vehicle={load.vehicle}
            facilities={facilities.map((f) => ({ id: f.id, label: f.name }))}
            carriers={carriers.map((c) => ({ id: c.id, label: c.name }))}
          />
        </section>
      )}

      <section aria-labelledby="containers-heading">
        <h2 id="containers-heading">Containers on this load</h2>
        <table className="dense" aria-label="Containers on this load">
          <thead>
            <tr>
              <th>Container</th>
              <th>Kind</th>
              <th>Bay</th>
              <th>State</th>
              <th>Accumulation start</th>
              <th className="num">Units</th>
              <th className="num">Battery mass</th>
              <th className="num">Est. lead</th>
              {isPlanning && canWrite && <th>Change</th>}
            </tr>
          </thead>
          <tbody>
            {view.containers.map((c) => (
              <tr key={c.id} data-container={c.labelNumber}>
                <td>{c.labelNumber}</td>
                <td>
                  {c.kind}
                  {c.isClosed ? " (closed)" : ""}
                </td>
                <td>{c.bay?.name ?? "—"}</td>
                <td>{c.state}</td>
                <td>{day(c.accumulationStart)}</td>
                <td className="num">{c.unitCount}</td>
                <td className="num">
                  <Mass kg={c.batteryKg} system={system} />
                </td>
                <td className="num">
                  <Mass kg={c.leadKg} system={system} />
                </td>
                {isPlanning && canWrite && (
                  <td>
                    <RemoveContainer loadId={load.id} containerId={c.id} labelNumber={c.labelNumber} />
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
        {view.containers.length === 0 && <p className="muted">Nothing on this load yet.</p>}
        {isPlanning && canWrite && (
          <AddContainers
            loadId={load.id}
            system={system}
            containers={free.map((c) => ({ id: c.id, labelNumber: c.labelNumber, kind: c.kind, unitCount: c.unitCount, batteryKg: c.batteryKg, bay: c.bay?.name ?? "" }))}
          />
        )}
      </section>

      <section aria-labelledby="summary-heading" data-estimate-kg={summary.massKg} data-unit-count={summary.count}>
        <h2 id="summary-heading">What the load carries</h2>
        <table className="dense" aria-label="By kind">
          <thead>
            <tr>
              <th>Kind</th>
              <th>Transport class</th>
              <th className="num">Count</th>
              <th className="num">Mass</th>
              <th className="num">Est. lead</th>
            </tr>
          </thead>
          <tbody>
            {summary.byKind.map((k) => (
              <tr key={k.kind + k.isNonSpillable}>
                <td>{k.kind}</td>
                <td>{k.isNonSpillable ? "non-spillable (UN2800)" : "flooded (UN2794)"}</td>
                <td className="num">{k.count.toLocaleString("en-US")}</td>
                <td className="num">
                  <Mass kg={k.massKg} system={system} />
                </td>
                <td className="num">
                  <Mass kg={k.leadKg} system={system} />
                </td>
              </tr>
            ))}
          </tbody>
          <tfoot>
            <tr>
              <th>Total</th>
              <th>{summary.packagesText || "—"}</th>
              <th className="num" data-testid="load-count">
                {summary.count.toLocaleString("en-US")}
              </th>
              <th className="num" data-testid="load-mass">
                <Mass kg={summary.massKg} system={system} />
              </th>
              <th className="num">
                <Mass kg={summary.leadKg} system={system} />
              </th>
            </tr>
          </tfoot>
        </table>
        {summary.count > 0 && (
          <p>
            <strong>Estimated lead for settlement: {formatMass(summary.leadKg, system)}</strong>
            {summary.leadKgLow !== summary.leadKgHigh && (
              <span className="muted">
                {" "}
                (range {formatMass(summary.leadKgLow, system)} to {formatMass(summary.leadKgHigh, system)}), from each unit’s kind and weight.
              </span>
            )}
          </p>
        )}
        {summary.byDescription.length > 0 && (
          <table className="dense" aria-label="Hazardous materials description">
            <thead>
              <tr>
                <th>Packages</th>
                <th>Basic description (49 CFR 172.202(a))</th>
                <th className="num">Gross mass</th>
              </tr>
            </thead>
            <tbody>
              {summary.byDescription.map((d) => (
                <tr key={d.unNumber}>
                  <td>{d.packagesText}</td>
                  <td className={styles.description}>{d.description}</td>
                  <td className="num">
                    <Mass kg={d.massKg} system={system} />
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        {summary.remarks.map((r) => (
          <p key={r} className="small">
            {r}
          </p>
        ))}
        {summary.hasNonSpillable && <p className="small muted">{NON_SPILLABLE_CAUTION}</p>}
      </section>

      <section aria-labelledby="basis-heading">
        <h2 id="basis-heading">Transport basis and checklist</h2>
        <BasisChoice loadId={load.id} current={load.basis} bases={view.bases} canEdit={isPlanning && canWrite} />
        {view.basis && (
          <>
            <p>
              {view.basis.statement} <span className="hint">({view.basis.citation})</span>
            </p>
            <Checklist key={view.basis.id} loadId={load.id} items={view.basis.items} canEdit={isPlanning && canWrite} />
          </>
        )}
        <div aria-label="Ready to ship?" role="region">
          <h3>Ready to ship?</h3>
          {load.state !== "planning" ? (
            <p>
              <span className="status ok">
                <span aria-hidden="true">✓</span> Checklist complete
              </span>{" "}
              <span className="muted">The load was marked ready{hasLeft ? " and has left" : ""}.</span>
            </p>
          ) : gate.isReady ? (
            <p>
              <span className="status ok">
                <span aria-hidden="true">✓</span> Complete, nothing blocks it
              </span>
            </p>
          ) : (
            <>
              <p>
                <span className="status exceeded">
                  <span aria-hidden="true">✗</span> Not ready
                </span>{" "}
                Still to do before it can be marked ready:
              </p>
              <ul className={styles.gate} aria-label="Missing before ready">
                {gate.issues.map((i) => (
                  <li key={i.field + i.message}>{i.message}</li>
                ))}
              </ul>
            </>
          )}
          <p className="caution" role="note">
            {GENERAL_CAUTION}
          </p>
          {canWrite && load.state === "planning" && <StateButton loadId={load.id} to="ready" label="Mark ready" isPrimary disabled={!gate.isReady} />}
          {canWrite && load.state === "ready" && <StateButton loadId={load.id} to="planning" label="Back to planning" />}
        </div>
      </section>

      <section aria-labelledby="papers-heading">
        <h2 id="papers-heading">Papers</h2>
        {canIssue && summary.count > 0 && load.basis ? (
          <p className="row">
            <a className="button" href={`/api/v1/loads/${load.id}/manifest.pdf`} target="_blank" rel="noopener">
              Open the manifest (PDF)
            </a>
            <a className="button" href={`/api/v1/loads/${load.id}/receipt-form.pdf`} target="_blank" rel="noopener">
              Open the receipt form (PDF)
            </a>
            <span className="hint">Each paper is stored with the data it was made from and its sha256, and can be made again byte for byte.</span>
          </p>
        ) : (
          <p className="muted">{canIssue ? "Papers can be made once the load has containers and a transport basis." : "Your role can see papers but not issue them."}</p>
        )}
        {view.documents.length > 0 && (
          <table className="dense" aria-label="Papers of this load">
            <thead>
              <tr>
                <th>Issued</th>
                <th>Paper</th>
                <th>Rulebook</th>
                <th>sha256</th>
              </tr>
            </thead>
            <tbody>
              {view.documents.map((d) => (
                <tr key={d.id}>
                  <td>{minute(d.issuedAt)}</td>
                  <td>
                    <a href={`/api/v1/records/documents/${d.id}/regenerated.pdf`} target="_blank" rel="noopener">
                      {d.kind}
                    </a>
                  </td>
                  <td>
                    {d.rulebookId} {d.rulebookVersion}
                  </td>
                  <td className={styles.hash}>{d.sha256}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
        <p className="small">
          <Link href={`/sites/${site.id}/papers`}>All papers of this site, and the shipment records</Link>
        </p>
      </section>

      {(load.state === "ready" || hasLeft) && (
        <section aria-labelledby="departure-heading">
          <h2 id="departure-heading">Departure</h2>
          {load.state === "ready" && canWrite ? (
            <DepartForm loadId={load.id} system={system} />
          ) : (
            <p>
              Left {minute(load.departedAt)}
              {effective.departureScaleKg !== null ? `, departure scale weight ${formatMass(effective.departureScaleKg, system)}` : ", not weighed on departure"}.
            </p>
          )}
        </section>
      )}

      {hasLeft && (
        <section aria-labelledby="receipt-heading">
          <h2 id="receipt-heading">Receipt and reconciliation</h2>
          {load.state === "departed" && canWrite && <ReceiveForm loadId={load.id} system={system} />}
          {reconciliation && (
            <div role="region" aria-label="Reconciliation" data-flagged={String(reconciliation.isFlagged)}>
              <p>
                Received {effective.receivedAt} at {view.facility.name}: <strong>{formatMass(reconciliation.receivedKg, system)}</strong>.{" "}
                <WeightFlag isFlagged={reconciliation.isFlagged} />
              </p>
              <table className="dense" aria-label="Weights compared">
                <thead>
                  <tr>
                    <th>Compared with</th>
                    <th className="num">Weight</th>
                    <th className="num">Received − that</th>
                    <th className="num">Difference</th>
                    <th>Against {reconciliation.tolerancePct} % tolerance</th>
                  </tr>
                </thead>
                <tbody>
                  {[
                    { name: "Shipped estimate", d: reconciliation.fromEstimate },
                    ...(reconciliation.fromDepartureScale ? [{ name: "Departure scale weight", d: reconciliation.fromDepartureScale }] : []),
                  ].map(({ name, d }) => (
                    <tr key={name}>
                      <td>{name}</td>
                      <td className="num">
                        <Mass kg={d.referenceKg} system={system} />
                      </td>
                      <td className="num">{formatMass(d.differenceKg, system)}</td>
                      <td className="num">{pct(d.differencePct)}</td>
                      <td>
                        <WeightFlag isFlagged={d.isFlagged} />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
              {reconciliation.fromDepartureScale === null && <p className="small muted">Not weighed on departure: compared with the shipped estimate only.</p>}
              <p className="small muted">Exactly {reconciliation.tolerancePct} % is within tolerance; beyond it, either way, is flagged for review.</p>
              <p className="caution" role="note">
                {GENERAL_CAUTION}
              </p>
              {load.state === "delivered" && canWrite && <ReconcileForm loadId={load.id} isFlagged={reconciliation.isFlagged} />}
            </div>
          )}
          {view.corrections.length > 0 && (
            <>
              <h3>Corrections</h3>
              <ul>
                {view.corrections.map((c) => (
                  <li key={c.at.toString() + c.field}>
                    {minute(c.at)}, {c.actorLabel}: {c.field} {String(c.from ?? "—")} → {String(c.to)} — {c.note}
                  </li>
                ))}
              </ul>
            </>
          )}
          {canWrite && (
            <details>
              <summary>Record a correction</summary>
              <CorrectionForm
                loadId={load.id}
                system={system}
                fields={[
                  { id: "departureScaleKg", label: "Departure scale weight" },
                  ...(load.state === "departed" ? [] : [{ id: "receivedKg", label: "Received weight" }, { id: "receivedAt", label: "Date received" }]),
                ]}
              />
            </details>
          )}
        </section>
      )}

      <section aria-labelledby="history-heading">
        <h2 id="history-heading">History</h2>
        <table className={`dense ${styles.history}`} aria-label="History">
          <thead>
            <tr>
              <th>When</th>
              <th>Who</th>
              <th>What</th>
              <th>Detail</th>
            </tr>
          </thead>
          <tbody>
            {view.history.map((e) => (
              <tr key={e.id}>
                <td>{minute(e.at)}</td>
                <td>{e.actorLabel}</td>
                <td>{ACTION_WORDS[e.action] ?? e.action}</td>
                <td>{detailOf(e, system)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="small muted">State: {stateWord(load.state)}. Loads and their papers are kept; nothing here is ever deleted.</p>
      </section>
    </Shell>
  );
}
