import { AppError, type TFieldIssue } from "@/lib/errors";

export type TWeightDifference = {
  /** the weight compared against: the shipped estimate or the departure scale weight */
  referenceKg: number;
  /** received − reference: negative when the receiving facility weighed less */
  differenceKg: number;
  /** differenceKg as a percentage of the reference */
  differencePct: number;
  isFlagged: boolean;
};

export type TWeightReconciliation = {
  tolerancePct: number;
  receivedKg: number;
  fromEstimate: TWeightDifference;
  /** null when the load was not weighed on departure */
  fromDepartureScale: TWeightDifference | null;
  /** flagged against either reference */
  isFlagged: boolean;
};

/**
 * The boundary rule: a difference is flagged only when it is *beyond* the tolerance —
 * |received − reference| > tolerancePct % of reference. Exactly at the tolerance (2 % of 1 000 kg is
 * 20 kg) is not flagged; 2.01 % is. The comparison allows a relative 1e-9 for binary rounding, so a
 * difference that is the tolerance in decimal terms (e.g. 24.69 kg of 1 234.5 kg) is not flagged by
 * the float error of its own representation. Both directions count: heavier or lighter.
 */
export function isBeyondTolerance({ differenceKg, referenceKg, tolerancePct }: { differenceKg: number; referenceKg: number; tolerancePct: number }): boolean {
  return Math.abs(differenceKg) * 100 - tolerancePct * referenceKg > 1e-9 * referenceKg;
}

function difference(receivedKg: number, referenceKg: number, tolerancePct: number): TWeightDifference {
  const differenceKg = receivedKg - referenceKg;
  return {
    referenceKg,
    differenceKg,
    differencePct: (differenceKg / referenceKg) * 100,
    isFlagged: isBeyondTolerance({ differenceKg, referenceKg, tolerancePct }),
  };
}

/** Shipped against received weight for a load (DESIGN.md §5.5), against the facility's tolerance. */
export function reconcileWeights({
  estimatedKg,
  departureScaleKg,
  receivedKg,
  tolerancePct = 2,
}: {
  estimatedKg: number;
  departureScaleKg?: number | null;
  receivedKg: number;
  tolerancePct?: number;
}): TWeightReconciliation {
  const issues: TFieldIssue[] = [];
  const positive = (field: string, v: number | null | undefined) => {
    if (v !== undefined && v !== null && !(Number.isFinite(v) && v > 0)) issues.push({ field, message: `${field} must be a weight above 0 kg` });
  };
  positive("estimatedKg", estimatedKg);
  positive("departureScaleKg", departureScaleKg);
  if (!(Number.isFinite(receivedKg) && receivedKg >= 0)) issues.push({ field: "receivedKg", message: "receivedKg must be 0 kg or more" });
  if (!(Number.isFinite(tolerancePct) && tolerancePct >= 0 && tolerancePct <= 100)) issues.push({ field: "tolerancePct", message: "tolerancePct must be between 0 and 100" });
  if (issues.length > 0) throw new AppError("invalid_input", "the weights cannot be compared", issues);

  const fromEstimate = difference(receivedKg, estimatedKg, tolerancePct);
  const fromDepartureScale = departureScaleKg == null ? null : difference(receivedKg, departureScaleKg, tolerancePct);
  return {
    tolerancePct,
    receivedKg,
    fromEstimate,
    fromDepartureScale,
    isFlagged: fromEstimate.isFlagged || (fromDepartureScale?.isFlagged ?? false),
  };
}
