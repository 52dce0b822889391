import { can, sitesWhere, type TAction, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { db } from "./client";
import { rawRow } from "./raw";
import { pickTotals, type TTotals } from "./totals";

/**
 * Loads a site for an action, or refuses: a site of another organisation (or none) is "not found", so its
 * existence is never confirmed; a site of the same organisation without the right role is "forbidden".
 */
export async function siteFor(actor: TActor, siteId: string, action: TAction) {
  return allowed(actor, await db().site.findUnique({ where: { id: siteId } }), action);
}

function allowed<T extends { id: string; organisationId: string }>(actor: TActor, site: T | null | undefined, action: TAction): T {
  if (!site || site.organisationId !== actor.organisationId) throw new AppError("not_found", "No such site.");
  if (!can(actor, action, site.id)) throw new AppError("forbidden", "Your role at this site does not allow that.");
  return site;
}

/**
 * The same check without loading the row: a role at a site proves the site exists in the actor's organisation
 * (memberships and keys only ever point at their own organisation's sites), so only a refusal costs a query.
 */
export async function requireSite(actor: TActor, siteId: string, action: TAction): Promise<string> {
  if (can(actor, action, siteId)) return siteId;
  await siteFor(actor, siteId, action);
  return siteId;
}

/** The sites an actor may see for an action, in name order: the scope of lists and roll-ups. */
export async function visibleSites(actor: TActor, action: TAction = "units.read") {
  return db().site.findMany({
    where: { id: { in: sitesWhere(actor, action) }, organisationId: actor.organisationId },
    orderBy: { name: "asc" },
  });
}

type TTotalsRow = TTotals & { id: string; name: string; unitSystem: string; organisationId: string };

// Dashboards and point-of-sale systems poll this, so it is one plain-SQL read of the stored totals (lib/db/raw.ts):
// its cost does not depend on the size of the history.
const TOTALS_READ = `SELECT "id", "name", "unitSystem", "organisationId", "unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg" FROM "Site" WHERE "id" = ?`;

/** A site's stored totals, with the same refusals as siteFor. */
export async function siteTotals(actor: TActor, siteId: string) {
  const site = allowed(actor, await rawRow<TTotalsRow>(db(), TOTALS_READ, [siteId]), "units.read");
  return { site: { id: site.id, name: site.name, unitSystem: site.unitSystem }, totals: pickTotals(site) };
}
