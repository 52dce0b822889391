import { AppError } from "@/lib/errors";
import { monotoneInterpolant } from "./monotone-interpolant";

export type TDensityPoint = { readonly massFraction: number; readonly densityGPerCm3: number; readonly source: string };

const HANDBOOK_V2 = "handbook table of aqueous solutions (CRC-type), REFERENCES.md, V2";
const CRC_M = "CRC Handbook, concentrative properties of aqueous solutions, REFERENCES.md, M (from memory)";
const OURS_M = "CRC Handbook value not in REFERENCES.md: from memory (M)";

/**
 * Density of aqueous H2SO4 at 20 °C against mass fraction. It stops at 70 %: battery acid never comes near
 * that, and above about 90 % the density passes a maximum (near 98 %) so a reading would not fix the
 * fraction. The 0 % point (water) lets a reading of 1.000 stay inside the table.
 */
export const DENSITY_TABLE_20C: readonly TDensityPoint[] = [
  { massFraction: 0.0, densityGPerCm3: 0.9982, source: "water at 20 °C: from memory (M)" },
  { massFraction: 0.1, densityGPerCm3: 1.0661, source: HANDBOOK_V2 },
  { massFraction: 0.2, densityGPerCm3: 1.1394, source: OURS_M },
  { massFraction: 0.25, densityGPerCm3: 1.1783, source: OURS_M },
  { massFraction: 0.3, densityGPerCm3: 1.2185, source: CRC_M },
  { massFraction: 0.35, densityGPerCm3: 1.2599, source: CRC_M },
  { massFraction: 0.36, densityGPerCm3: 1.2684, source: CRC_M },
  { massFraction: 0.37, densityGPerCm3: 1.2769, source: CRC_M },
  { massFraction: 0.38, densityGPerCm3: 1.2855, source: CRC_M },
  { massFraction: 0.4, densityGPerCm3: 1.3028, source: HANDBOOK_V2 },
  { massFraction: 0.5, densityGPerCm3: 1.3952, source: HANDBOOK_V2 },
  { massFraction: 0.6, densityGPerCm3: 1.4983, source: OURS_M },
  { massFraction: 0.7, densityGPerCm3: 1.6105, source: HANDBOOK_V2 },
];

/** SG(20 °C) = measured + 0.0007 × (T − 20 °C): battery service manual, REFERENCES.md (V2). */
export const SG_PER_DEGREE_C = 0.0007;

/** The readings (as SG at 20 °C) the table covers. */
export const ACID_TABLE_RANGE = {
  min: DENSITY_TABLE_20C[0].densityGPerCm3,
  max: DENSITY_TABLE_20C[DENSITY_TABLE_20C.length - 1].densityGPerCm3,
} as const;

/**
 * A battery hydrometer's specific gravity is taken as the density in g/cm³ (water at 20 °C is 0.998, so
 * the two differ by under 0.2 %, well inside every other uncertainty here).
 */
const fractionAtDensity = monotoneInterpolant(
  DENSITY_TABLE_20C.map((p) => p.densityGPerCm3),
  DENSITY_TABLE_20C.map((p) => p.massFraction),
);

/** A reading corrected to 20 °C; a missing temperature means the reading was taken at 20 °C. */
export function specificGravityAt20C(specificGravity: number, temperatureC?: number | null): number {
  return temperatureC == null ? specificGravity : specificGravity + SG_PER_DEGREE_C * (temperatureC - 20);
}

export const acidTableRangeMessage = (sg20: number): string =>
  `specific gravity corrected to 20 °C must be between ${ACID_TABLE_RANGE.min.toFixed(4)} and ${ACID_TABLE_RANGE.max.toFixed(4)}` +
  (Number.isFinite(sg20) ? ` (this reading gives ${sg20.toFixed(4)})` : "");

/** For callers that have already checked the range (the estimate's hot path). */
export function acidFractionAt20C(sg20: number): number {
  return fractionAtDensity(sg20);
}

/** Mass fraction of H2SO4 in the electrolyte, from a specific gravity reading and its temperature. */
export function acidMassFraction({ specificGravity, temperatureC }: { specificGravity: number; temperatureC?: number | null }): number {
  const sg20 = specificGravityAt20C(specificGravity, temperatureC);
  if (!(sg20 >= ACID_TABLE_RANGE.min && sg20 <= ACID_TABLE_RANGE.max)) {
    const message = acidTableRangeMessage(sg20);
    throw new AppError("invalid_input", message, [{ field: "specificGravity", message }]);
  }
  return fractionAtDensity(sg20);
}
