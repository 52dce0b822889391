import { formatMass, type TUnitSystem } from "@/lib/units";

export type TTotalsView = { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };

/** The five on-hand figures of a site, in its unit system. Safe to render on server and client. */
export function TotalsFigures({ totals, system }: { totals: TTotalsView; system: string }) {
  const unit: TUnitSystem = system === "lb" ? "lb" : "kg";
  const rows: [string, string, string][] = [
    ["units", "Units", totals.unitCount.toLocaleString("en-US")],
    ["battery", "Battery mass", formatMass(totals.batteryKg, unit)],
    ["lead", "Lead (as Pb)", formatMass(totals.leadKg, unit)],
    ["electrolyte", "Electrolyte", formatMass(totals.electrolyteKg, unit)],
    ["acid", "Sulfuric acid", formatMass(totals.acidKg, unit)],
  ];
  return (
    <dl className="figures" aria-label="On-hand totals">
      {rows.map(([id, label, value]) => (
        <div key={id} data-figure={id}>
          <dt>{label}</dt>
          <dd>{value}</dd>
        </div>
      ))}
    </dl>
  );
}
