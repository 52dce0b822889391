import Link from "next/link";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { TotalsFigures } from "@/app/_ui/totals-figures";
import { listUnits } from "@/lib/db/units";
import { pickTotals } from "@/lib/db/totals";
import { can } from "@/lib/auth/permissions";

export const dynamic = "force-dynamic";

export default async function SitePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "units.read");
  const latest = await listUnits(actor, { siteId: site.id, limit: 25 });
  return (
    <Shell actor={actor} site={site} active="site">
      <div className="row" style={{ justifyContent: "space-between" }}>
        <div>
          <h1>{site.name}</h1>
          <p className="lede">
            {site.kind === "store" ? "Store" : "Collection yard"} · {site.address} · rulebook {site.rulebookId} · masses in {site.unitSystem}
          </p>
        </div>
        {can(actor, "units.create", site.id) && (
          <Link className="button primary" href={`/sites/${site.id}/counter`}>
            Log a unit
          </Link>
        )}
      </div>
      <h2>On hand now</h2>
      <TotalsFigures totals={pickTotals(site)} system={site.unitSystem} />
      <h2>Latest intakes</h2>
      <table className="dense" aria-label="Latest intakes">
        <thead>
          <tr>
            <th>Received</th>
            <th>Kind</th>
            <th className="num">V</th>
            <th className="num">Ah</th>
            <th>Condition</th>
            <th>Source</th>
            <th>State</th>
            <th className="num">Battery</th>
            <th className="num">Lead</th>
            <th className="num">Acid</th>
            <th>Method</th>
          </tr>
        </thead>
        <tbody>
          {latest.map((u) => (
            <tr key={u.id}>
              <td>{u.receivedAt.toISOString().slice(0, 16).replace("T", " ")}</td>
              <td>{u.kind}</td>
              <td className="num">{u.nominalVoltage}</td>
              <td className="num">{u.capacityAh ?? "—"}</td>
              <td>{u.condition}</td>
              <td>{u.source}</td>
              <td>{u.state}</td>
              <td className="num"><Mass kg={u.batteryKg} system={site.unitSystem} /></td>
              <td className="num"><Mass kg={u.leadKg} system={site.unitSystem} /></td>
              <td className="num"><Mass kg={u.acidKg} system={site.unitSystem} /></td>
              <td>{u.method}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {latest.length === 0 && <p className="muted">Nothing received yet.</p>}
    </Shell>
  );
}
