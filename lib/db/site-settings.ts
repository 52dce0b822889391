import { z } from "zod";
import type { TActor } from "@/lib/auth/permissions";
import { RULEBOOK_IDS } from "@/lib/rules";
import { db } from "./client";
import { siteFor, visibleSites } from "./sites";
import { writeTrail } from "./trail";

/** A site's settings as Setup shows and changes them (DESIGN.md §4). Totals are never set here. */
export const SITE_KINDS = ["store", "yard"] as const;
export const UNIT_SYSTEMS = ["kg", "lb"] as const;

/** ISO 3166-1 alpha-2, optionally with an ISO 3166-2 subdivision: "US", "US-WA", "DE-BY", "GB-ENG". */
const JURISDICTION = /^[A-Z]{2}(-[A-Z0-9]{1,3})?$/;

export const ZSiteSettingsPatch = z
  .strictObject(
    {
    name: z.string({ error: "name must be text" }).trim().min(1, "name is required").max(120, "name must be at most 120 characters").optional(),
    kind: z.enum(SITE_KINDS, { error: "kind must be store or yard" }).optional(),
    address: z.string({ error: "address must be text" }).trim().max(400, "address must be at most 400 characters").optional(),
    jurisdiction: z
      .string({ error: "jurisdiction must be text" })
      .trim()
      .toUpperCase()
      .regex(JURISDICTION, "jurisdiction must be a country code, optionally with a region: US, US-WA, DE-BY")
      .optional(),
    rulebookId: z.enum(RULEBOOK_IDS, { error: `rulebook must be one of: ${RULEBOOK_IDS.join(", ")}` }).optional(),
    unitSystem: z.enum(UNIT_SYSTEMS, { error: "unit system must be kg or lb" }).optional(),
    isConsumerExempt: z.boolean({ error: "the consumer-product exemption is on (true) or off (false)" }).optional(),
    regulatoryIds: z.string({ error: "regulatory IDs must be text" }).trim().max(200, "regulatory IDs must be at most 200 characters").optional(),
    },
    { error: (issue) => (issue.code === "unrecognized_keys" ? "only name, kind, address, jurisdiction, rulebookId, unitSystem, isConsumerExempt and regulatoryIds can be changed" : undefined) },
  )
  .refine((v) => Object.values(v).some((x) => x !== undefined), { message: "send at least one setting to change", path: ["name"] });
export type TSiteSettingsPatch = z.output<typeof ZSiteSettingsPatch>;

const FIELDS = ["name", "kind", "address", "jurisdiction", "rulebookId", "unitSystem", "isConsumerExempt", "regulatoryIds"] as const;
type TField = (typeof FIELDS)[number];

export type TSiteSettings = { id: string } & { [K in TField]: K extends "isConsumerExempt" ? boolean : string };

const settingsOf = (site: { id: string } & Record<TField, unknown>): TSiteSettings =>
  ({ id: site.id, ...Object.fromEntries(FIELDS.map((f) => [f, site[f]])) }) as TSiteSettings;

export async function getSiteSettings(actor: TActor, siteId: string): Promise<TSiteSettings> {
  return settingsOf(await siteFor(actor, siteId, "setup.read"));
}

export async function listSiteSettings(actor: TActor): Promise<TSiteSettings[]> {
  return (await visibleSites(actor, "setup.read")).map(settingsOf);
}

/** Changes the settings sent; the trail event holds the changed fields only, before and after. Nothing changed, nothing written. */
export async function updateSiteSettings(actor: TActor, siteId: string, patch: TSiteSettingsPatch): Promise<TSiteSettings> {
  const site = await siteFor(actor, siteId, "setup.write");
  const changed = FIELDS.filter((f) => patch[f] !== undefined && patch[f] !== site[f]);
  if (changed.length === 0) return settingsOf(site);
  const data = Object.fromEntries(changed.map((f) => [f, patch[f]]));
  return db().$transaction(async (tx) => {
    const after = await tx.site.update({ where: { id: site.id }, data });
    await writeTrail(tx, actor, {
      siteId: site.id,
      action: "site.updated",
      entity: "site",
      entityId: site.id,
      before: Object.fromEntries(changed.map((f) => [f, site[f]])),
      after: data,
    });
    return settingsOf(after);
  });
}
