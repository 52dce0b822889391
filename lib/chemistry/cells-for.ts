import { AppError } from "@/lib/errors";

/** Nominal volts per lead-acid cell (common practice; standard cell potential 2.04 V). */
export const VOLTS_PER_CELL = 2;

/** Cells in series for a nominal voltage: 12 V → 6, 6 V → 3, 2 V → 1, 24/36/48 V → V / 2. */
export function cellsFor({ nominalVoltage }: { nominalVoltage: number }): number {
  const cells = nominalVoltage / VOLTS_PER_CELL;
  if (!Number.isInteger(cells) || cells < 1) {
    const message = "voltage must be a whole multiple of 2 V (cells of about 2 V each), e.g. 2, 6, 12 or 24 V";
    throw new AppError("invalid_input", message, [{ field: "nominalVoltage", message }]);
  }
  return cells;
}
