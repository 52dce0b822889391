import Link from "next/link";
import { pageActor } from "./_ui/session";
import { Shell } from "./_ui/shell";
import { Mass } from "./_ui/mass";
import { visibleSites } from "@/lib/db/sites";
import { addTotals, pickTotals, ZERO_TOTALS } from "@/lib/db/totals";

export const dynamic = "force-dynamic";

export default async function Home() {
  const actor = await pageActor();
  const sites = await visibleSites(actor);
  const org = sites.reduce((sum, s) => addTotals(sum, pickTotals(s)), ZERO_TOTALS);
  const system = sites[0]?.unitSystem ?? "kg";
  return (
    <Shell actor={actor}>
      <h1>Your sites</h1>
      <p className="lede">What each site holds now. Open a site for its Counter and latest intakes.</p>
      <table className="dense">
        <thead>
          <tr>
            <th>Site</th>
            <th>Kind</th>
            <th>Your role</th>
            <th className="num">Units</th>
            <th className="num">Battery mass</th>
            <th className="num">Lead</th>
            <th className="num">Sulfuric acid</th>
          </tr>
        </thead>
        <tbody>
          {sites.map((s) => (
            <tr key={s.id}>
              <td>
                <Link href={`/sites/${s.id}`}>{s.name}</Link>
              </td>
              <td>{s.kind}</td>
              <td>{actor.roles.get(s.id)}</td>
              <td className="num">{s.unitCount}</td>
              <td className="num"><Mass kg={s.batteryKg} system={s.unitSystem} /></td>
              <td className="num"><Mass kg={s.leadKg} system={s.unitSystem} /></td>
              <td className="num"><Mass kg={s.acidKg} system={s.unitSystem} /></td>
            </tr>
          ))}
        </tbody>
        {sites.length > 1 && (
          <tfoot>
            <tr>
              <th colSpan={3}>All your sites</th>
              <th className="num">{org.unitCount}</th>
              <th className="num"><Mass kg={org.batteryKg} system={system} /></th>
              <th className="num"><Mass kg={org.leadKg} system={system} /></th>
              <th className="num"><Mass kg={org.acidKg} system={system} /></th>
            </tr>
          </tfoot>
        )}
      </table>
      {sites.length === 0 && <p>You are not a member of any site yet. Ask an administrator to add you.</p>}
    </Shell>
  );
}
