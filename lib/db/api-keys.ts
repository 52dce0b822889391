import { randomUUID } from "node:crypto";
import { z } from "zod";
import { newApiKey } from "@/lib/auth/api-keys";
import { can, sitesWhere, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { db } from "./client";
import { ZRole } from "./people";
import { siteFor } from "./sites";
import { writeTrail } from "./trail";

/**
 * API keys: each for one site and one role, made by an administrator of that site. The key itself is shown
 * once, when it is made; only its SHA-256 and its first characters (to recognise it in a list) are stored.
 * Requests made with a key are written to the trail as `key:<id>` (lib/auth/actor.ts).
 * Only a signed-in person makes or revokes keys: a key that could make keys would survive its own revocation.
 */

const siteId = z.string({ error: "site is required" }).trim().min(1, "site is required");

export const ZApiKeyCreate = z.object({
  site: siteId,
  role: ZRole,
  name: z
    .string({ error: "give the key a name that says where it is used" })
    .trim()
    .min(1, "give the key a name that says where it is used")
    .max(80, "the name must be at most 80 characters"),
});
export type TApiKeyCreate = z.output<typeof ZApiKeyCreate>;

export const ZApiKeyQuery = z.object({ site: siteId.optional() });

export type TApiKeyView = {
  id: string;
  name: string;
  siteId: string;
  siteName: string;
  role: string;
  prefix: string;
  createdBy: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
};

type TKeyRow = {
  id: string;
  name: string;
  siteId: string;
  role: string;
  prefix: string;
  createdBy: string;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
  site: { name: string };
};

const KEY_SELECT = { id: true, name: true, siteId: true, role: true, prefix: true, createdBy: true, createdAt: true, lastUsedAt: true, revokedAt: true, site: { select: { name: true } } } as const;

/** "user:<id>" becomes the person's name where known; other refs are shown as they are. */
async function creatorNames(refs: string[]): Promise<Map<string, string>> {
  const ids = [...new Set(refs.filter((r) => r.startsWith("user:")).map((r) => r.slice(5)))];
  const users = ids.length ? await db().user.findMany({ where: { id: { in: ids } }, select: { id: true, name: true, email: true } }) : [];
  return new Map(users.map((u) => [`user:${u.id}`, u.name || u.email]));
}

function viewOf(row: TKeyRow, names: Map<string, string>): TApiKeyView {
  return {
    id: row.id,
    name: row.name,
    siteId: row.siteId,
    siteName: row.site.name,
    role: row.role,
    prefix: row.prefix,
    createdBy: names.get(row.createdBy) ?? row.createdBy,
    createdAt: row.createdAt.toISOString(),
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
    revokedAt: row.revokedAt?.toISOString() ?? null,
  };
}

function requirePerson(actor: TActor) {
  if (actor.kind !== "user") throw new AppError("forbidden", "API keys are made and revoked only by a signed-in administrator.");
}

export async function listApiKeys(actor: TActor, { siteId }: { siteId?: string } = {}): Promise<TApiKeyView[]> {
  if (siteId) await siteFor(actor, siteId, "setup.read");
  const sites = siteId ? [siteId] : sitesWhere(actor, "setup.read");
  if (sites.length === 0) throw new AppError("forbidden", "Your role does not open Setup.");
  const rows = await db().apiKey.findMany({
    where: { organisationId: actor.organisationId, siteId: { in: sites } },
    select: KEY_SELECT,
    orderBy: [{ revokedAt: { sort: "desc", nulls: "first" } }, { createdAt: "desc" }],
  });
  const names = await creatorNames(rows.map((r) => r.createdBy));
  return rows.map((r) => viewOf(r, names));
}

/** Makes a key; the returned `key` is the only time the secret is seen. */
export async function createApiKey(actor: TActor, input: TApiKeyCreate): Promise<{ apiKey: TApiKeyView; key: string }> {
  const site = await siteFor(actor, input.site, "setup.write");
  requirePerson(actor);
  const { key, prefix, hash } = newApiKey();
  const row = await db().$transaction(async (tx) => {
    const created = await tx.apiKey.create({
      data: { id: randomUUID(), organisationId: actor.organisationId, siteId: site.id, role: input.role, name: input.name, prefix, hash, createdBy: actor.ref },
      select: KEY_SELECT,
    });
    await writeTrail(tx, actor, { siteId: site.id, action: "api-key.created", entity: "api-key", entityId: created.id, after: { name: created.name, role: created.role, prefix } });
    return created;
  });
  return { apiKey: viewOf(row, await creatorNames([row.createdBy])), key };
}

/** Revokes a key at once: the next request with it is refused (401). A key is never deleted, so the trail keeps its name. */
export async function revokeApiKey(actor: TActor, keyId: string): Promise<TApiKeyView> {
  const existing = await db().apiKey.findUnique({ where: { id: keyId }, select: { organisationId: true, siteId: true } });
  if (!existing || existing.organisationId !== actor.organisationId) throw new AppError("not_found", "No such API key.");
  if (!can(actor, "setup.write", existing.siteId)) throw new AppError("forbidden", "Your role at this key's site does not allow revoking it.");
  requirePerson(actor);
  const row = await db().$transaction(async (tx) => {
    const now = new Date();
    // Conditional on "not yet revoked", so two revocations at once write one event.
    const changed = await tx.apiKey.updateMany({ where: { id: keyId, revokedAt: null }, data: { revokedAt: now } });
    if (changed.count === 0) throw new AppError("conflict", "This key was already revoked.");
    const revoked = await tx.apiKey.findUniqueOrThrow({ where: { id: keyId }, select: KEY_SELECT });
    await writeTrail(tx, actor, { siteId: revoked.siteId, action: "api-key.revoked", entity: "api-key", entityId: keyId, before: { revokedAt: null }, after: { name: revoked.name, revokedAt: now.toISOString() } });
    return revoked;
  });
  return viewOf(row, await creatorNames([row.createdBy]));
}
