import { z } from "zod";
import { KIND_IDS } from "@/lib/chemistry/kinds";
import { checkSender, senderFields } from "@/lib/intake/sender-fields";

/** DESIGN.md §4: what a container can be. A drum or tote is usually the closed kind, but the flag decides. */
export const CONTAINER_KINDS = ["pallet", "box", "tote", "drum"] as const;
export type TContainerKind = (typeof CONTAINER_KINDS)[number];

/** DESIGN.md §3: a container's life. The Yard owns open → sealed; loads move it on. */
export const CONTAINER_STATES = ["open", "sealed", "loaded", "departed", "delivered"] as const;
export type TContainerState = (typeof CONTAINER_STATES)[number];

/** Still at the site (and so counted in its bay): the limits engine uses the same three. */
export const ON_SITE_CONTAINER_STATES = ["open", "sealed", "loaded"] as const;
/** A unit or lot in one of these is part of the site's on-hand totals. */
export const ON_SITE_ITEM_STATES = ["received", "stowed", "loaded"] as const;

export const LOT_BASES = ["count", "share"] as const;
/** The average weight of a unit in a lot must fall in this band (net ÷ count); outside it the count or a weight is wrong. */
export const LOT_UNIT_KG = { min: 1, max: 80 } as const;

const siteId = z.string({ error: "site is required" }).trim().min(1, "site is required");

/** Code 128 carries printable ASCII; 40 characters fit on a label. */
const LABEL_MESSAGE = "the label number must be 1 to 40 plain characters (letters, digits, - / .)";
export const ZLabelNumber = z
  .string({ error: LABEL_MESSAGE })
  .trim()
  .regex(/^[\x21-\x7e](?:[\x20-\x7e]{0,38}[\x21-\x7e])?$/, LABEL_MESSAGE);

export const ZBayCreate = z.object({
  site: siteId,
  name: z.string({ error: "give the bay a name" }).trim().min(1, "give the bay a name").max(60, "the bay name must be at most 60 characters"),
});
export type TBayCreate = z.output<typeof ZBayCreate>;

export const ZContainerCreate = z.object({
  site: siteId,
  kind: z.enum(CONTAINER_KINDS, { error: `kind must be one of: ${CONTAINER_KINDS.join(", ")}` }),
  /** Left out: the next free number for the kind at the site. */
  labelNumber: ZLabelNumber.optional(),
  bayId: z.string().trim().min(1).optional(),
  /** Closed, structurally sound and compatible: the only kind that may take leaking or cracked units (40 CFR 273.13(a)(1)). */
  isClosed: z.boolean({ error: "isClosed must be true or false" }).default(false),
});
export type TContainerCreate = z.output<typeof ZContainerCreate>;
export type TContainerCreateInput = z.input<typeof ZContainerCreate>;

export const ZContainerPatch = z
  .object({
    state: z.literal("sealed", { error: "a container can only be sealed here (loads move it on)" }).optional(),
    /** null takes it out of any bay. */
    bayId: z.string().trim().min(1).nullable().optional(),
  })
  .refine((v) => v.state !== undefined || v.bayId !== undefined, { message: "send state: \"sealed\" or a bayId", path: ["state"] });
export type TContainerPatch = z.output<typeof ZContainerPatch>;

export const ZContainerQuery = z.object({
  site: siteId,
  state: z.enum(CONTAINER_STATES, { error: `state must be one of: ${CONTAINER_STATES.join(", ")}` }).optional(),
  bay: z.string().min(1).optional(),
});

export const ZSiteQuery = z.object({ site: siteId });

/**
 * What to put into a container: units by id, a lot, everything in another container, or one scanned code
 * (a unit id or its first 8+ characters, a container label, or a scale ticket number) resolved at the site.
 */
export const ZStow = z
  .object({
    unitIds: z.array(z.string().trim().min(1, "a unit id is empty"), { error: "unitIds must be a list of unit ids" }).min(1, "give at least one unit id").max(500, "at most 500 units at a time").optional(),
    lotId: z.string().trim().min(1).optional(),
    fromContainerId: z.string().trim().min(1).optional(),
    scan: z.string({ error: "scan a unit, a container label or a ticket number" }).trim().min(1, "scan a unit, a container label or a ticket number").max(200).optional(),
  })
  .superRefine((v, ctx) => {
    const given = [v.unitIds, v.lotId, v.fromContainerId, v.scan].filter((x) => x !== undefined).length;
    if (given !== 1) ctx.addIssue({ code: "custom", path: ["scan"], message: "send exactly one of: scan, unitIds, lotId, fromContainerId" });
  });
export type TStow = z.output<typeof ZStow>;

const MIX_MESSAGE = "each row of the mix needs a battery kind";
export const ZLotMixRow = z.object({
  kind: z.enum(KIND_IDS, { error: `${MIX_MESSAGE}: one of ${KIND_IDS.join(", ")}` }),
  nominalVoltage: z
    .number({ error: "voltage must be a number of volts" })
    .int("voltage must be a whole number of volts")
    .min(2, "voltage must be between 2 and 96 V")
    .max(96, "voltage must be between 2 and 96 V")
    .refine((v) => v % 2 === 0, "voltage must be a multiple of 2 V")
    .default(12),
  /** basis "count": how many units of this kind. */
  count: z.number({ error: "the count must be a whole number" }).int("the count must be a whole number").min(0, "the count cannot be negative").optional(),
  /** basis "share": the estimated share of the lot's units, in percent. */
  sharePct: z.number({ error: "the share must be a number of percent" }).min(0, "a share must be 0 to 100 %").max(100, "a share must be 0 to 100 %").optional(),
});
export type TLotMixRow = z.output<typeof ZLotMixRow>;

const round3 = (v: number) => Math.round(v * 1000) / 1000;
/** Net = gross − tare, to the gram: a scale never reads finer, and it keeps float noise (5000.99 − 1 = 4999.990000000001) out of the records. */
export const netKgOf = (grossKg: number, tareKg: number): number => round3(grossKg - tareKg);

/** A weighed batch from a scale ticket: counted, not itemised. */
export const ZLotCreate = z
  .object({
    site: siteId,
    ticketNumber: z.string({ error: "the scale ticket number is required" }).trim().min(1, "the scale ticket number is required").max(60, "the ticket number must be at most 60 characters"),
    grossKg: z.number({ error: "gross weight must be a number of kg" }).positive("gross weight must be more than 0 kg").max(100_000, "gross weight must be at most 100 000 kg"),
    tareKg: z.number({ error: "tare must be a number of kg" }).min(0, "tare cannot be negative").max(100_000, "tare must be at most 100 000 kg"),
    unitCount: z.number({ error: "the unit count must be a whole number" }).int("the unit count must be a whole number").min(1, "the lot needs at least 1 unit").max(10_000, "at most 10 000 units in one lot"),
    mixBasis: z.enum(LOT_BASES, { error: "the mix is given by count or by share" }).default("count"),
    mix: z.array(ZLotMixRow, { error: "give the mix of kinds: at least one row" }).min(1, "give the mix of kinds: at least one row").max(20, "at most 20 rows in the mix"),
    /** Stow the whole lot into this open container as it is received. */
    containerId: z.string().trim().min(1).optional(),
    note: z.string({ error: "the note must be text" }).trim().max(500, "note must be at most 500 characters").transform((v) => v || undefined).optional(),
    /** The handler who sent the lot, as the scale ticket names it. */
    ...senderFields,
  })
  .superRefine((v, ctx) => {
    checkSender(v, ctx);
    if (v.tareKg > v.grossKg) {
      ctx.addIssue({ code: "custom", path: ["tareKg"], message: `tare (${v.tareKg} kg) is more than gross (${v.grossKg} kg): check the ticket` });
      return;
    }
    const perUnit = netKgOf(v.grossKg, v.tareKg) / v.unitCount;
    if (!(perUnit >= LOT_UNIT_KG.min && perUnit <= LOT_UNIT_KG.max)) {
      ctx.addIssue({
        code: "custom",
        path: ["unitCount"],
        message: `net ÷ count is ${perUnit.toFixed(1)} kg a unit; it must be between ${LOT_UNIT_KG.min} and ${LOT_UNIT_KG.max} kg: check the count and the weights`,
      });
    }
    v.mix.forEach((row, i) => {
      const field = v.mixBasis === "count" ? "count" : "sharePct";
      if (row[field] === undefined) ctx.addIssue({ code: "custom", path: ["mix", i, field], message: v.mixBasis === "count" ? "give how many units of this kind" : "give the share of this kind in %" });
    });
    if (v.mixBasis === "count") {
      const sum = v.mix.reduce((s, r) => s + (r.count ?? 0), 0);
      if (sum !== v.unitCount) ctx.addIssue({ code: "custom", path: ["mix"], message: `the counts of the mix add up to ${sum}, not the ${v.unitCount} units of the lot` });
    } else {
      const sum = v.mix.reduce((s, r) => s + (r.sharePct ?? 0), 0);
      // Shares are estimates; rounding each row to a whole percent can leave the total half a percent off.
      if (Math.abs(sum - 100) > 0.5) ctx.addIssue({ code: "custom", path: ["mix"], message: `the shares of the mix add up to ${Number(sum.toFixed(1))} %, not 100 %` });
    }
  });
export type TLotCreate = z.output<typeof ZLotCreate>;
export type TLotCreateInput = z.input<typeof ZLotCreate>;

export const ZAnnualQuery = z.object({
  year: z.coerce
    .number({ error: "year must be a whole year, e.g. 2025" })
    .int("year must be a whole year, e.g. 2025")
    .min(1970, "year must be from 1970 to 9998")
    .max(9998, "year must be from 1970 to 9998"),
  format: z.enum(["json", "csv", "pdf"], { error: "format must be json, csv or pdf" }).default("json"),
});

export const ZYardUnitQuery = z.object({
  container: z.string().min(1).optional(),
  /** "on-hand" (default): received, stowed or loaded; "loose": received and not in a container. */
  scope: z.enum(["on-hand", "loose", "damaged"]).default("on-hand"),
});
