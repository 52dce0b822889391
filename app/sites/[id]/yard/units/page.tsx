import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { Mass } from "@/app/_ui/mass";
import { getContainer, listYardUnits } from "@/lib/db/yard";
import { AppError } from "@/lib/errors";
import { ZYardUnitQuery } from "@/lib/yard/schema";

export const metadata: Metadata = { title: "Units on hand" };
export const dynamic = "force-dynamic";

const SCOPE_TITLE = { "on-hand": "Units on hand", loose: "Loose units", damaged: "Leaking or cracked units" } as const;

/** The drill-down behind a figure: the units (and lots) that make it up, filtered by container or kind of list. */
export default async function YardUnitsPage({ params, searchParams }: { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "yard.read");
  const raw = await searchParams;
  const parsed = ZYardUnitQuery.safeParse({ container: typeof raw.container === "string" ? raw.container : undefined, scope: typeof raw.scope === "string" ? raw.scope : undefined });
  if (!parsed.success) notFound();
  const { container: containerId, scope } = parsed.data;
  let containerLabel: string | null = null;
  if (containerId) {
    try {
      const { container } = await getContainer(actor, containerId);
      if (container.siteId !== site.id) notFound();
      containerLabel = container.labelNumber;
    } catch (error) {
      if (error instanceof AppError) notFound();
      throw error;
    }
  }
  const { units, count, lots } = await listYardUnits(actor, site.id, { containerId, scope });
  const title = containerLabel ? `In container ${containerLabel}` : SCOPE_TITLE[scope];
  const system = site.unitSystem;
  return (
    <Shell actor={actor} site={site} active="yard">
      <p className="small">
        <Link href={`/sites/${site.id}/yard`}>Yard</Link> · <Link href={`/sites/${site.id}/limits`}>Limits</Link>
      </p>
      <h1>{title}</h1>
      <p className="lede">
        {count.toLocaleString("en-US")} {count === 1 ? "unit" : "units"}
        {lots.length > 0 ? ` and ${lots.length} ${lots.length === 1 ? "lot" : "lots"}` : ""} at {site.name}, oldest first
        {units.length < count ? `; the first ${units.length} are listed` : ""}.
      </p>
      <nav className="row small" aria-label="Lists">
        <Link href={`/sites/${site.id}/yard/units`}>All on hand</Link>
        <Link href={`/sites/${site.id}/yard/units?scope=loose`}>Loose</Link>
        <Link href={`/sites/${site.id}/yard/units?scope=damaged`}>Leaking or cracked</Link>
      </nav>
      <table className="dense" aria-label={title} style={{ marginTop: "0.6rem" }}>
        <thead>
          <tr>
            <th>Unit id</th>
            <th>Received</th>
            <th>Kind</th>
            <th className="num">V</th>
            <th>Condition</th>
            <th>State</th>
            <th>Container</th>
            <th className="num">Battery</th>
            <th className="num">Lead</th>
            <th className="num">Acid</th>
          </tr>
        </thead>
        <tbody>
          {units.map((u) => (
            <tr key={u.id}>
              <td>
                <code>{u.id}</code>
              </td>
              <td>{u.receivedAt.toISOString().slice(0, 10)}</td>
              <td>{u.kind}</td>
              <td className="num">{u.nominalVoltage}</td>
              <td>{u.condition}</td>
              <td>{u.state}</td>
              <td>{u.container ? <Link href={`/sites/${site.id}/yard/units?container=${u.container.id}`}>{u.container.labelNumber}</Link> : "loose"}</td>
              <td className="num">
                <Mass kg={u.batteryKg} system={system} />
              </td>
              <td className="num">
                <Mass kg={u.leadKg} system={system} />
              </td>
              <td className="num">
                <Mass kg={u.acidKg} system={system} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {units.length === 0 && <p className="muted">No unit here.</p>}
      {lots.length > 0 && (
        <>
          <h2>Lots</h2>
          <table className="dense" aria-label="Lots">
            <thead>
              <tr>
                <th>Ticket</th>
                <th>Received</th>
                <th className="num">Units</th>
                <th>Container</th>
                <th className="num">Net</th>
                <th className="num">Lead</th>
                <th className="num">Acid</th>
                <th>Note</th>
              </tr>
            </thead>
            <tbody>
              {lots.map((l) => (
                <tr key={l.id}>
                  <td>{l.ticketNumber}</td>
                  <td>{l.receivedAt.toISOString().slice(0, 10)}</td>
                  <td className="num">{l.unitCount}</td>
                  <td>{l.container ? l.container.labelNumber : "loose"}</td>
                  <td className="num">
                    <Mass kg={l.netKg} system={system} />
                  </td>
                  <td className="num">
                    <Mass kg={l.leadKg} system={system} />
                  </td>
                  <td className="num">
                    <Mass kg={l.acidKg} system={system} />
                  </td>
                  <td className="small">{l.note ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      )}
    </Shell>
  );
}
