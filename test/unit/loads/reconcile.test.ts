import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { reconcileWeights } from "@/lib/loads/reconcile";

// The tolerance rule is the project's own (lib/loads/reconcile.ts): flagged only when the difference is
// beyond the tolerance, in either direction; exactly at the tolerance is not flagged.
describe("reconcileWeights: shipped against received", () => {
  test.each([
    // [name, estimatedKg, receivedKg, tolerancePct, differencePct, isFlagged]
    ["exactly 2 % lighter is not flagged (project rule)", 1_000, 980, 2, -2, false],
    ["exactly 2 % heavier is not flagged (project rule)", 1_000, 1_020, 2, 2, false],
    ["2.01 % lighter is flagged (project rule)", 1_000, 979.9, 2, -2.01, true],
    ["2.01 % heavier is flagged (project rule)", 1_000, 1_020.1, 2, 2.01, true],
    ["a receipt 3 % lighter is flagged (project rule)", 1_000, 970, 2, -3, true],
    ["no difference is not flagged", 31_055.9, 31_055.9, 2, 0, false],
    ["exactly 2 % of an awkward weight, as the float product, is not flagged", 1_234.5, 1_234.5 * 0.98, 2, -2, false],
    ["exactly 2 % of a truck load is not flagged", 31_055.9, 31_055.9 - 621.118, 2, -2, false],
    ["just beyond 2 % of a truck load is flagged", 31_055.9, 31_055.9 - 621.2, 2, -2.000264, true],
    ["a tighter facility tolerance of 0.5 % (input)", 1_000, 994, 0.5, -0.6, true],
    ["zero tolerance: any difference is flagged", 1_000, 999.9, 0, -0.01, true],
  ] as const)("%s", (_name, estimatedKg, receivedKg, tolerancePct, differencePct, isFlagged) => {
    const r = reconcileWeights({ estimatedKg, receivedKg, tolerancePct });
    expect(r.fromEstimate.differenceKg).toBeCloseTo(receivedKg - estimatedKg, 9);
    expect(r.fromEstimate.differencePct).toBeCloseTo(differencePct, 5);
    expect(r.fromEstimate.isFlagged).toBe(isFlagged);
    expect(r.isFlagged).toBe(isFlagged);
    expect(r.fromDepartureScale).toBeNull();
  });

  test("the default tolerance is 2 %", () => {
    expect(reconcileWeights({ estimatedKg: 1_000, receivedKg: 980 }).tolerancePct).toBe(2);
    expect(reconcileWeights({ estimatedKg: 1_000, receivedKg: 980 }).isFlagged).toBe(false);
    expect(reconcileWeights({ estimatedKg: 1_000, receivedKg: 979 }).isFlagged).toBe(true);
  });

  test.each([
    // [name, estimatedKg, departureScaleKg, receivedKg, fromEstimate flagged, fromScale flagged]
    ["within both", 1_000, 1_010, 990, false, false],
    ["exactly 2 % below the scale weight, 1 % below the estimate", 1_000, 1_010, 989.8, false, false],
    ["beyond 2 % of the scale weight only", 1_000, 1_010, 989, false, true],
    ["beyond 2 % of the estimate only", 1_000, 970, 975, true, false],
  ] as const)("against the departure scale: %s", (_name, estimatedKg, departureScaleKg, receivedKg, fromEstimate, fromScale) => {
    const r = reconcileWeights({ estimatedKg, departureScaleKg, receivedKg });
    expect(r.fromEstimate.isFlagged).toBe(fromEstimate);
    expect(r.fromDepartureScale?.isFlagged).toBe(fromScale);
    expect(r.fromDepartureScale?.differenceKg).toBeCloseTo(receivedKg - departureScaleKg, 9);
    expect(r.fromDepartureScale?.differencePct).toBeCloseTo(((receivedKg - departureScaleKg) / departureScaleKg) * 100, 9);
    expect(r.isFlagged).toBe(fromEstimate || fromScale);
  });

  test.each([
    ["estimatedKg", { estimatedKg: 0, receivedKg: 10 }],
    ["estimatedKg", { estimatedKg: Number.NaN, receivedKg: 10 }],
    ["receivedKg", { estimatedKg: 10, receivedKg: -1 }],
    ["departureScaleKg", { estimatedKg: 10, departureScaleKg: -5, receivedKg: 10 }],
    ["tolerancePct", { estimatedKg: 10, receivedKg: 10, tolerancePct: -1 }],
  ] as const)("refuses a bad %s with a field issue", (field, args) => {
    try {
      reconcileWeights(args);
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(AppError);
      expect((e as AppError).issues.map((i) => i.field)).toContain(field);
    }
  });
});
