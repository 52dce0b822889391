import { AppError } from "@/lib/errors";
import { G_PER_AH_PER_CELL } from "./molar-masses";

export type TFaradayFloor = {
  /** Pb of both plates, as Pb: sponge lead at the negative, the lead of PbO2 at the positive. */
  leadKg: number;
  /** PbO2 at the positive plates (its lead is also counted in `leadKg`). */
  leadDioxideKg: number;
  /** H2SO4 the discharge takes from the electrolyte. */
  sulfuricAcidKg: number;
};

/** kg per A·h per cell, for the hot path (estimate-composition) and for the function below. */
export const FLOOR_KG_PER_AH_CELL = {
  lead: (2 * G_PER_AH_PER_CELL.PbNegative) / 1000,
  leadDioxide: G_PER_AH_PER_CELL.PbO2Positive / 1000,
  sulfuricAcid: G_PER_AH_PER_CELL.H2SO4 / 1000,
  /** The reactants themselves, Pb + PbO2 + H2SO4: no battery of that capacity can weigh less. */
  reactants: (G_PER_AH_PER_CELL.PbNegative + G_PER_AH_PER_CELL.PbO2Positive + G_PER_AH_PER_CELL.H2SO4) / 1000,
} as const;

/**
 * The least masses a rated capacity needs by Faraday's law (Pb + PbO2 + 2 H2SO4 → 2 PbSO4 + 2 H2O,
 * F = 96 485.332 12 C/mol): every cell in series passes the full capacity.
 */
export function faradayFloor({ capacityAh, cells }: { capacityAh: number; cells: number }): TFaradayFloor {
  if (!Number.isFinite(capacityAh) || capacityAh < 0) {
    const message = "capacity must be a number of ampere-hours, zero or more";
    throw new AppError("invalid_input", message, [{ field: "capacityAh", message }]);
  }
  if (!Number.isInteger(cells) || cells < 1) {
    const message = "cells must be a whole number, 1 or more";
    throw new AppError("invalid_input", message, [{ field: "cells", message }]);
  }
  const ahCells = capacityAh * cells;
  return {
    leadKg: ahCells * FLOOR_KG_PER_AH_CELL.lead,
    leadDioxideKg: ahCells * FLOOR_KG_PER_AH_CELL.leadDioxide,
    sulfuricAcidKg: ahCells * FLOOR_KG_PER_AH_CELL.sulfuricAcid,
  };
}
