import { z } from "zod";
import { lbToKg } from "@/lib/units";
import { checkSender, senderFields } from "./sender-fields";

export const KIND_IDS = ["flooded", "efb", "agm", "gel", "powersport", "deep-cycle", "traction", "stationary"] as const;

export const CONDITIONS = [
  { id: "intact", label: "Intact" },
  { id: "leaking", label: "Leaking" },
  { id: "cracked", label: "Cracked case" },
  { id: "bulged", label: "Bulged or frozen" },
] as const;
export type TCondition = (typeof CONDITIONS)[number]["id"];

export const SOURCES = [
  { id: "core-return", label: "Core return" },
  { id: "drop-off", label: "Drop-off" },
  { id: "fleet", label: "Fleet" },
  { id: "purchased-scrap", label: "Purchased scrap" },
] as const;

/** Conditions whose casing may not hold the acid: these go straight into a closed, compatible container. */
export const needsClosedContainer = (condition: string): boolean => condition === "leaking" || condition === "cracked";

const ids = <T extends readonly { id: string }[]>(list: T) => list.map((x) => x.id) as [T[number]["id"], ...T[number]["id"][]];

const optionalNumber = <T extends z.ZodType>(schema: T) => schema.optional();

/** One spent battery logged at the Counter or sent by an integration. Weight may be given in kg or lb. */
export const ZUnitIntake = z
  .object({
    site: z.string({ error: "site is required" }).min(1, "site is required"),
    kind: z.enum(KIND_IDS, { error: `kind must be one of: ${KIND_IDS.join(", ")}` }),
    nominalVoltage: z.coerce
      .number({ error: "voltage must be a number of volts" })
      .int("voltage must be a whole number of volts")
      .min(2, "voltage must be between 2 and 96 V")
      .max(96, "voltage must be between 2 and 96 V")
      .refine((v) => v % 2 === 0, "voltage must be a multiple of 2 V (cells of about 2 V each)"),
    capacityAh: optionalNumber(z.coerce.number({ error: "capacity must be a number" }).min(1, "capacity must be between 1 and 5 000 Ah").max(5000, "capacity must be between 1 and 5 000 Ah")),
    cca: optionalNumber(z.coerce.number().int("CCA must be a whole number").min(1, "CCA must be between 1 and 5 000 A").max(5000, "CCA must be between 1 and 5 000 A")),
    groupSize: z.string().trim().max(60, "group size or label text must be at most 60 characters").optional().transform((v) => v || undefined),
    weightKg: optionalNumber(z.coerce.number({ error: "weight must be a number" }).min(0.5, "weight must be between 0.5 and 3 000 kg").max(3000, "weight must be between 0.5 and 3 000 kg")),
    weightLb: optionalNumber(z.coerce.number({ error: "weight must be a number" }).min(1.1, "weight must be between 1.1 and 6 614 lb").max(6614, "weight must be between 1.1 and 6 614 lb")),
    specificGravity: optionalNumber(z.coerce.number().min(1, "specific gravity must be between 1.000 and 1.400").max(1.4, "specific gravity must be between 1.000 and 1.400")),
    condition: z.enum(ids(CONDITIONS), { error: "condition must be intact, leaking, cracked or bulged" }),
    source: z.enum(ids(SOURCES), { error: "source must be core-return, drop-off, fleet or purchased-scrap" }),
    containerId: z.string().min(1).optional(),
    saleRef: z.string().trim().max(60).optional().transform((v) => v || undefined),
    note: z.string().trim().max(500, "note must be at most 500 characters").optional().transform((v) => v || undefined),
    /** Who sent it (a fleet, a business, a scrap seller); left out for a member of the public. */
    ...senderFields,
  })
  .superRefine((v, ctx) => {
    checkSender(v, ctx);
    if (v.weightKg !== undefined && v.weightLb !== undefined) {
      ctx.addIssue({ code: "custom", path: ["weightLb"], message: "give the weight in kg or in lb, not both" });
    }
    if (needsClosedContainer(v.condition) && !v.containerId) {
      ctx.addIssue({ code: "custom", path: ["containerId"], message: "a leaking or cracked unit must go into a closed container: choose one" });
    }
  })
  .transform(({ weightLb, ...rest }) => ({ ...rest, weightKg: rest.weightKg ?? (weightLb === undefined ? undefined : lbToKg(weightLb)) }));

export type TUnitIntake = z.output<typeof ZUnitIntake>;
export type TUnitIntakeInput = z.input<typeof ZUnitIntake>;

export const ZIdempotencyKey = z
  .string()
  .min(8, "Idempotency-Key must be 8 to 200 characters")
  .max(200, "Idempotency-Key must be 8 to 200 characters");

export const ZUnitQuery = z.object({
  site: z.string().min(1).optional(),
  from: z.coerce.date({ error: "from must be a date (YYYY-MM-DD or ISO 8601)" }).optional(),
  to: z.coerce.date({ error: "to must be a date (YYYY-MM-DD or ISO 8601)" }).optional(),
  limit: z.coerce.number().int().min(1, "limit must be 1 to 500").max(500, "limit must be 1 to 500").optional(),
});
