import type { Metadata } from "next";
import Link from "next/link";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { can } from "@/lib/auth/permissions";
import { GENERAL_CAUTION } from "@/lib/cautions";
import { listCarriers, listFacilities } from "@/lib/db/facilities";
import { basesForRulebook, listLoads, loadableContainers } from "@/lib/db/loads";
import { PlanLoadForm } from "./plan-load-form";
import { WeightFlag, stateWord } from "./load-state";

export const metadata: Metadata = { title: "Loads" };
export const dynamic = "force-dynamic";

const day = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "—");

export default async function LoadsPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "loads.read");
  const canWrite = can(actor, "loads.write", site.id);
  const [loads, free, facilities, carriers] = await Promise.all([listLoads(actor, { siteId: site.id }), loadableContainers(actor, site.id), listFacilities(actor), listCarriers(actor)]);
  return (
    <Shell actor={actor} site={site} active="loads">
      <h1>Loads</h1>
      <p className="lede">
        Shipments from {site.name} to a receiving facility: plan, check the transport basis, ship, and compare what the facility weighed. {free.length} sealed{" "}
        {free.length === 1 ? "container is" : "containers are"} waiting for a load.
      </p>
      {canWrite && (
        <section aria-labelledby="plan-heading">
          <h2 id="plan-heading">Plan a load</h2>
          <PlanLoadForm
            siteId={site.id}
            facilities={facilities.map((f) => ({ id: f.id, label: f.name }))}
            carriers={carriers.map((c) => ({ id: c.id, label: c.name }))}
            bases={basesForRulebook(site.rulebookId).map((b) => ({ id: b.id, label: b.title }))}
          />
          <p className="small muted">
            Receiving facilities, carriers and the emergency response telephone number are kept under <Link href="/setup/facilities">Setup → Receiving facilities and carriers</Link>.
          </p>
        </section>
      )}
      <h2>All loads</h2>
      <table className="dense" aria-label="Loads">
        <thead>
          <tr>
            <th>Reference</th>
            <th>State</th>
            <th>Receiving facility</th>
            <th className="num">Containers</th>
            <th className="num">Units</th>
            <th className="num">Shipped (est.)</th>
            <th className="num">Est. lead</th>
            <th>Left</th>
            <th className="num">Received</th>
            <th>Weights</th>
          </tr>
        </thead>
        <tbody>
          {loads.map((l) => (
            <tr key={l.id} data-load={l.reference}>
              <td>
                <Link href={`/sites/${site.id}/loads/${l.id}`}>{l.reference}</Link>
              </td>
              <td>{stateWord(l.state)}</td>
              <td>{l.facility.name}</td>
              <td className="num">{l.containerCount}</td>
              <td className="num">{l.unitCount.toLocaleString("en-US")}</td>
              <td className="num">
                <Mass kg={l.batteryKg} system={site.unitSystem} />
              </td>
              <td className="num">
                <Mass kg={l.leadKg} system={site.unitSystem} />
              </td>
              <td>{day(l.departedAt)}</td>
              <td className="num">{l.receivedKg === null ? "—" : <Mass kg={l.receivedKg} system={site.unitSystem} />}</td>
              <td>
                <WeightFlag isFlagged={l.isFlagged} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {loads.length === 0 && <p className="muted">No loads yet.</p>}
      <p className="caution" role="note">
        {GENERAL_CAUTION}
      </p>
    </Shell>
  );
}
