import type { Metadata } from "next";
import Link from "next/link";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { TotalsFigures } from "@/app/_ui/totals-figures";
import { can } from "@/lib/auth/permissions";
import { KINDS } from "@/lib/chemistry";
import { db } from "@/lib/db/client";
import { limitsOfSite } from "@/lib/db/limits";
import { listLots } from "@/lib/db/lots";
import { listBays, listContainers, listYardUnits } from "@/lib/db/yard";
import type { TContainerLimit } from "@/lib/limits/evaluate-limits";
import { isoDateOfUtcDay, utcDay } from "@/lib/limits/utc-day";
import { ageBar } from "@/lib/yard/age-bar";
import { ON_SITE_CONTAINER_STATES } from "@/lib/yard/schema";
import styles from "../limits/limits.module.css";
import { StatusWord } from "../limits/status-word";
import { LotForm } from "./lot-form";
import { NewContainerForm } from "./new-container-form";
import { ScanBox } from "./scan-box";
import { SealButton } from "./seal-button";

export const metadata: Metadata = { title: "Yard" };
export const dynamic = "force-dynamic";

const STATE_WORD: Record<string, string> = { open: "Open", sealed: "Sealed", loaded: "Loaded" };
const day = (d: Date | null) => (d ? isoDateOfUtcDay(utcDay(d)) : "—");

export default async function YardPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "yard.read");
  const canWrite = can(actor, "yard.write", site.id);
  const [bays, containers, limits, loose, lots] = await Promise.all([
    listBays(actor, site.id),
    listContainers(actor, { siteId: site.id }),
    limitsOfSite(db(), site),
    listYardUnits(actor, site.id, { scope: "loose", limit: 12 }),
    listLots(actor, site.id, { limit: 10 }),
  ]);
  const onSite = containers.filter((c) => (ON_SITE_CONTAINER_STATES as readonly string[]).includes(c.state));
  const ageOf = new Map<string, TContainerLimit>(limits.report.containers.map((c) => [c.containerId, c]));
  const limitDays = new Map(limits.report.rules.filter((r) => r.metric === "container-age-days").map((r) => [r.ruleId, r.threshold]));
  const groups = [...bays.map((b) => ({ key: b.id, name: b.name, bay: b })), { key: "none", name: "Not in a bay", bay: null }]
    .map((g) => ({ ...g, containers: onSite.filter((c) => (c.bayId ?? "none") === g.key) }))
    .filter((g) => g.bay || g.containers.length > 0);
  const open = onSite.filter((c) => c.state === "open");
  const system = site.unitSystem;

  return (
    <Shell actor={actor} site={site} active="yard">
      <h1>Yard</h1>
      <p className="lede">
        Bays and containers at {site.name}. Each container’s age counts from its accumulation start date; masses in {system}.
      </p>
      <TotalsFigures totals={site} system={system} />

      {canWrite && (
        <section aria-labelledby="scan-heading">
          <h2 id="scan-heading">Scan into a container</h2>
          <ScanBox targets={open.map((c) => ({ id: c.id, labelNumber: c.labelNumber, kind: c.kind, isClosed: c.isClosed, unitCount: c.unitCount }))} />
        </section>
      )}

      {groups.map((g) => (
        <section key={g.key} aria-labelledby={`bay-${g.key}`}>
          <h2 id={`bay-${g.key}`}>
            {g.name}
            {g.bay && (
              <span className="hint">
                {" "}
                · {g.bay.unitCount} units · <Mass kg={g.bay.batteryKg} system={system} />
              </span>
            )}
          </h2>
          <table className="dense" aria-label={`Containers in ${g.name}`}>
            <thead>
              <tr>
                <th>Container</th>
                <th>Kind</th>
                <th>State</th>
                <th>Start date</th>
                <th>Age</th>
                <th className="num">Units</th>
                <th className="num">Battery</th>
                <th className="num">Lead</th>
                <th className="num">Acid</th>
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {g.containers.map((c) => {
                const age = ageOf.get(c.id);
                const bar = ageBar({ ageDays: age?.ageDays ?? null, limitDays: age?.ruleId ? (limitDays.get(age.ruleId) ?? null) : null, status: age?.status ?? "ok" });
                return (
                  <tr key={c.id} data-container={c.labelNumber}>
                    <td>
                      <Link href={`/sites/${site.id}/yard/units?container=${c.id}`}>{c.labelNumber}</Link>
                    </td>
                    <td>
                      {c.kind}
                      {c.isClosed ? " · closed" : ""}
                    </td>
                    <td>{STATE_WORD[c.state] ?? c.state}</td>
                    <td>{day(c.accumulationStart)}</td>
                    <td>
                      <span className={styles.agecell}>
                        <span className={styles.agebar} role="img" aria-label={`${bar.label}, ${bar.status}`}>
                          <span className={`${styles.agefill} ${styles[bar.status] ?? ""}`} style={{ width: `${bar.percent.toFixed(1)}%` }} />
                        </span>
                        <span className="small">{bar.label}</span>
                        {age?.ageDays != null && <StatusWord status={bar.status} />}
                        {age?.needsClosing && <StatusWord status="exceeded" prefix="Not closed:" />}
                      </span>
                    </td>
                    <td className="num">{c.unitCount}</td>
                    <td className="num">
                      <Mass kg={c.batteryKg} system={system} />
                    </td>
                    <td className="num">
                      <Mass kg={c.leadKg} system={system} />
                    </td>
                    <td className="num">
                      <Mass kg={c.acidKg} system={system} />
                    </td>
                    <td style={{ whiteSpace: "nowrap" }}>
                      {canWrite && c.state === "open" && c.unitCount > 0 && <SealButton containerId={c.id} labelNumber={c.labelNumber} />}{" "}
                      <a href={`/api/v1/containers/${c.id}/label.pdf`} aria-label={`Label for ${c.labelNumber} (PDF)`}>
                        Label
                      </a>
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          {g.containers.length === 0 && <p className="small muted">No container in this bay.</p>}
        </section>
      ))}

      <h2>Loose units</h2>
      <p className="small muted">
        Received and not yet in a container: {loose.count}.{" "}
        {loose.count > loose.units.length && <Link href={`/sites/${site.id}/yard/units?scope=loose`}>See all</Link>}
      </p>
      {loose.units.length > 0 && (
        <table className="dense" aria-label="Loose units">
          <thead>
            <tr>
              <th>Unit id</th>
              <th>Received</th>
              <th>Kind</th>
              <th className="num">V</th>
              <th>Condition</th>
              <th className="num">Battery</th>
            </tr>
          </thead>
          <tbody>
            {loose.units.map((u) => (
              <tr key={u.id}>
                <td>
                  <code data-unit-id={u.id}>{u.id}</code>
                </td>
                <td>{day(u.receivedAt)}</td>
                <td>{u.kind}</td>
                <td className="num">{u.nominalVoltage}</td>
                <td>{u.condition}</td>
                <td className="num">
                  <Mass kg={u.batteryKg} system={system} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}

      {canWrite && (
        <>
          <h2>Receive a lot from a scale ticket</h2>
          <LotForm siteId={site.id} unitSystem={system} kinds={KINDS.map((k) => ({ id: k.id, label: k.label }))} containers={open.map((c) => ({ id: c.id, labelNumber: c.labelNumber }))} />
        </>
      )}

      <h2>Lots received</h2>
      <table className="dense" aria-label="Lots received">
        <thead>
          <tr>
            <th>Ticket</th>
            <th>Sent by</th>
            <th>Received</th>
            <th className="num">Units</th>
            <th className="num">Gross</th>
            <th className="num">Tare</th>
            <th className="num">Net</th>
            <th className="num">Lead (range)</th>
            <th>Where</th>
            <th>Note</th>
          </tr>
        </thead>
        <tbody>
          {lots.map((l) => (
            <tr key={l.id} data-lot={l.ticketNumber}>
              <td>{l.ticketNumber}</td>
              <td>
                {l.senderName ?? "—"}
                {l.senderAddress && <div className="small muted">{l.senderAddress}</div>}
              </td>
              <td>{day(l.receivedAt)}</td>
              <td className="num">{l.unitCount}</td>
              <td className="num">
                <Mass kg={l.grossKg} system={system} />
              </td>
              <td className="num">
                <Mass kg={l.tareKg} system={system} />
              </td>
              <td className="num">
                <Mass kg={l.netKg} system={system} />
              </td>
              <td className="num">
                <Mass kg={l.leadKg} system={system} /> (<Mass kg={l.leadKgLow} system={system} decimals={0} />–<Mass kg={l.leadKgHigh} system={system} decimals={0} />)
              </td>
              <td>{l.container ? l.container.labelNumber : l.state}</td>
              <td className="small">{l.note ?? ""}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {lots.length === 0 && <p className="muted">No lot received yet.</p>}

      {canWrite && (
        <>
          <h2>Add a container</h2>
          <NewContainerForm siteId={site.id} bays={bays.map((b) => ({ id: b.id, name: b.name }))} />
        </>
      )}
      <p className="caution" role="note" style={{ marginTop: "1rem" }}>
        <strong>Caution</strong>
        {limits.report.caution} Leaking or cracked units go only into a closed, compatible container (40 CFR 273.13(a)(1), 273.33(a)(1)).
      </p>
    </Shell>
  );
}
