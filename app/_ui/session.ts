import "server-only";
import { headers } from "next/headers";
import { redirect, notFound, forbidden } from "next/navigation";
import { resolveActor } from "@/lib/auth/actor";
import { can, type TAction, type TActor } from "@/lib/auth/permissions";
import { db } from "@/lib/db/client";

/** The signed-in person for a page, or a redirect to sign in. */
export async function pageActor(): Promise<TActor> {
  const actor = await resolveActor(await headers());
  if (!actor) redirect("/sign-in");
  return actor;
}

/** A site page: 404 for a site outside the organisation, 403 without the role for the action. */
export async function pageSite(siteId: string, action: TAction) {
  const actor = await pageActor();
  const site = await db().site.findUnique({ where: { id: siteId } });
  if (!site || site.organisationId !== actor.organisationId) notFound();
  if (!can(actor, action, site.id)) forbidden();
  return { actor, site };
}
