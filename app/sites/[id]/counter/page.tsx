import type { Metadata } from "next";
import { pageSite } from "@/app/_ui/session";
import { Shell } from "@/app/_ui/shell";
import { db } from "@/lib/db/client";
import { pickTotals } from "@/lib/db/totals";
import { listUnits } from "@/lib/db/units";
import { KINDS } from "@/lib/chemistry";
import { CONDITIONS, SOURCES } from "@/lib/intake/schema";
import { HANDLING_CAUTION } from "@/lib/cautions";
import { can } from "@/lib/auth/permissions";
import { CounterForm } from "./counter-form";

export const metadata: Metadata = { title: "Counter" };
export const dynamic = "force-dynamic";

export default async function CounterPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const { actor, site } = await pageSite(id, "units.create");
  const [closedContainers, latest] = await Promise.all([
    db().container.findMany({
      where: { siteId: site.id, state: "open", isClosed: true },
      select: { id: true, labelNumber: true, kind: true, unitCount: true },
      orderBy: { labelNumber: "asc" },
    }),
    listUnits(actor, { siteId: site.id, limit: 8 }),
  ]);
  return (
    <Shell actor={actor} site={site} active="counter">
      <h1>Counter</h1>
      <p className="lede">
        Log one spent battery at a time. <span className="kbd">Enter</span> saves; the next unit keeps the kind and voltage.
      </p>
      <CounterForm
        site={{ id: site.id, name: site.name, unitSystem: site.unitSystem }}
        kinds={KINDS.map((k) => ({ id: k.id, label: k.label }))}
        conditions={CONDITIONS.map((c) => ({ id: c.id, label: c.label }))}
        sources={SOURCES.map((s) => ({ id: s.id, label: s.label }))}
        closedContainers={closedContainers}
        handling={HANDLING_CAUTION}
        canBookDeposits={can(actor, "deposits.write", site.id)}
        initialTotals={pickTotals(site)}
        initialLatest={latest.map((u) => ({
          id: u.id,
          receivedAt: u.receivedAt.toISOString(),
          kind: u.kind,
          nominalVoltage: u.nominalVoltage,
          condition: u.condition,
          batteryKg: u.batteryKg,
          leadKg: u.leadKg,
        }))}
      />
    </Shell>
  );
}
