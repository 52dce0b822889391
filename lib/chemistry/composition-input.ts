import { z } from "zod";
import type { TFieldIssue } from "@/lib/errors";
import { ACID_TABLE_RANGE, acidTableRangeMessage, specificGravityAt20C } from "./acid-mass-fraction";
import { KIND_IDS, isBatteryKind } from "./kinds";

/** The limits of a valid input; the schema and the estimate's own quick check both use them. */
export const INPUT_LIMITS = {
  nominalVoltage: { min: 2, max: 96, step: 2 },
  capacityAh: { min: 1, max: 5000 },
  cca: { min: 1, max: 5000 },
  groupSizeMaxChars: 60,
  weightKg: { min: 0.5, max: 3000 },
  specificGravity: { min: 1.0, max: 1.4 },
  electrolyteTempC: { min: -30, max: 60 },
} as const;

export const INPUT_MESSAGES = {
  kind: `battery kind must be one of: ${KIND_IDS.join(", ")}`,
  nominalVoltage: "voltage must be between 2 and 96 V, in steps of 2 V (for example 6, 12 or 24 V)",
  capacityAh: "capacity must be between 1 and 5 000 Ah",
  cca: "CCA must be a whole number between 1 and 5 000 A",
  groupSize: "group size must be at most 60 characters",
  weightKg: "weight must be between 0.5 and 3 000 kg",
  specificGravity: "specific gravity must be between 1.000 and 1.400",
  electrolyteTempC: "electrolyte temperature must be between -30 and 60 °C",
} as const;

const L = INPUT_LIMITS;
const MSG = INPUT_MESSAGES;

const inRange = (schema: z.ZodNumber, limits: { min: number; max: number }, message: string) =>
  schema.min(limits.min, message).max(limits.max, message);

/** The battery details the composition is estimated from. Optional numbers may be left out or null. */
export const ZCompositionInput = z
  .object({
    kind: z.enum(KIND_IDS, { error: MSG.kind }),
    nominalVoltage: inRange(z.number({ error: MSG.nominalVoltage }), L.nominalVoltage, MSG.nominalVoltage).refine(
      (v) => v % L.nominalVoltage.step === 0,
      MSG.nominalVoltage,
    ),
    capacityAh: inRange(z.number({ error: MSG.capacityAh }), L.capacityAh, MSG.capacityAh).nullish(),
    cca: inRange(z.number({ error: MSG.cca }).int(MSG.cca), L.cca, MSG.cca).nullish(),
    groupSize: z.string({ error: MSG.groupSize }).trim().max(L.groupSizeMaxChars, MSG.groupSize).nullish(),
    weightKg: inRange(z.number({ error: MSG.weightKg }), L.weightKg, MSG.weightKg).nullish(),
    specificGravity: inRange(z.number({ error: MSG.specificGravity }), L.specificGravity, MSG.specificGravity).nullish(),
    electrolyteTempC: inRange(z.number({ error: MSG.electrolyteTempC }), L.electrolyteTempC, MSG.electrolyteTempC).nullish(),
  })
  .superRefine((v, ctx) => {
    const issue = correctedSgIssue(v.specificGravity, v.electrolyteTempC);
    if (issue) ctx.addIssue({ code: "custom", path: [issue.field], message: issue.message });
  });

export type TCompositionInput = z.infer<typeof ZCompositionInput>;

/** A cold reading near 1.000 can correct to below water, outside the density table. */
function correctedSgIssue(sg: number | null | undefined, tempC: number | null | undefined): TFieldIssue | null {
  if (typeof sg !== "number" || (tempC != null && typeof tempC !== "number")) return null;
  const sg20 = specificGravityAt20C(sg, tempC);
  return sg20 >= ACID_TABLE_RANGE.min && sg20 <= ACID_TABLE_RANGE.max
    ? null
    : { field: "specificGravity", message: acidTableRangeMessage(sg20) };
}

const isNumberIn = (v: unknown, limits: { min: number; max: number }): boolean =>
  typeof v === "number" && v >= limits.min && v <= limits.max; // NaN fails both comparisons

function issue(list: TFieldIssue[] | null, field: string, message: string): TFieldIssue[] {
  const out = list ?? [];
  out.push({ field, message });
  return out;
}

const isGroupSizeOk = (g: unknown): boolean =>
  typeof g === "string" && (g.length <= L.groupSizeMaxChars || g.trim().length <= L.groupSizeMaxChars);

/**
 * The schema's checks without zod, for the estimate's hot path (a million calls a second): the same limits
 * and messages. Returns null when the input is valid. No closures are made per call.
 */
export function compositionInputIssues(input: TCompositionInput): TFieldIssue[] | null {
  if (typeof input !== "object" || input === null) return [{ field: "(body)", message: "the battery details are missing" }];
  let issues: TFieldIssue[] | null = null;
  if (!isBatteryKind(input.kind)) issues = issue(issues, "kind", MSG.kind);
  const v = input.nominalVoltage;
  if (!isNumberIn(v, L.nominalVoltage) || v % L.nominalVoltage.step !== 0) issues = issue(issues, "nominalVoltage", MSG.nominalVoltage);
  if (input.capacityAh != null && !isNumberIn(input.capacityAh, L.capacityAh)) issues = issue(issues, "capacityAh", MSG.capacityAh);
  if (input.cca != null && !(isNumberIn(input.cca, L.cca) && Number.isInteger(input.cca))) issues = issue(issues, "cca", MSG.cca);
  if (input.groupSize != null && !isGroupSizeOk(input.groupSize)) issues = issue(issues, "groupSize", MSG.groupSize);
  if (input.weightKg != null && !isNumberIn(input.weightKg, L.weightKg)) issues = issue(issues, "weightKg", MSG.weightKg);
  const sgOk = input.specificGravity == null || isNumberIn(input.specificGravity, L.specificGravity);
  if (!sgOk) issues = issue(issues, "specificGravity", MSG.specificGravity);
  const tempOk = input.electrolyteTempC == null || isNumberIn(input.electrolyteTempC, L.electrolyteTempC);
  if (!tempOk) issues = issue(issues, "electrolyteTempC", MSG.electrolyteTempC);
  if (sgOk && tempOk && input.specificGravity != null) {
    const sgIssue = correctedSgIssue(input.specificGravity, input.electrolyteTempC);
    if (sgIssue) issues = issue(issues, sgIssue.field, sgIssue.message);
  }
  return issues;
}
