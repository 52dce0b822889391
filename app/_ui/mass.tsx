import { formatMass, type TUnitSystem } from "@/lib/units";

/** A mass stored in kg, shown in the site's unit; the other unit in the tooltip. */
export function Mass({ kg, system, decimals = 1 }: { kg: number; system: string; decimals?: number }) {
  const unit: TUnitSystem = system === "lb" ? "lb" : "kg";
  const other: TUnitSystem = unit === "lb" ? "kg" : "lb";
  return <span title={formatMass(kg, other, decimals)}>{formatMass(kg, unit, decimals)}</span>;
}
