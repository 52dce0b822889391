/** kg per international avoirdupois pound: exact by the 1959 international yard and pound agreement. */
export const KG_PER_LB = 0.45359237;

export const kgToLb = (kg: number): number => kg / KG_PER_LB;
export const lbToKg = (lb: number): number => lb * KG_PER_LB;

export type TUnitSystem = "kg" | "lb";

/** A mass stored in kg, shown in the site's unit with a fixed number of decimals. */
export function formatMass(kg: number, system: TUnitSystem, decimals = 1): string {
  const value = system === "lb" ? kgToLb(kg) : kg;
  return `${value.toLocaleString("en-US", { minimumFractionDigits: decimals, maximumFractionDigits: decimals })} ${system}`;
}
