import { randomUUID } from "node:crypto";
import { newApiKey } from "@/lib/auth/api-keys";
import type { TActor, TRole } from "@/lib/auth/permissions";
import type { TDb } from "@/lib/db/client";

/** An actor for calling data functions directly (no HTTP, no sign-in), with one role at one site. */
export const systemActor = (organisationId: string, siteId: string, role: TRole = "clerk"): TActor => ({
  kind: "system",
  id: "test",
  ref: "system:test",
  label: "Test",
  organisationId,
  roles: new Map<string, TRole>([[siteId, role]]),
});

/** Unique data per call, so tests run in parallel on one database without resets. */
export async function makeOrgWithSite(db: TDb, { kind = "store", unitSystem = "kg", rulebookId = "us-federal" } = {}) {
  const tag = randomUUID().slice(0, 8);
  const organisation = await db.organisation.create({ data: { name: `Test org ${tag}` } });
  const site = await db.site.create({
    data: { organisationId: organisation.id, name: `Test site ${tag}`, kind, address: `${tag} Test Road`, unitSystem, rulebookId },
  });
  return { organisation, site, tag };
}

export async function makeSite(db: TDb, organisationId: string, data: { kind?: string; name?: string } = {}) {
  const tag = randomUUID().slice(0, 8);
  return db.site.create({ data: { organisationId, name: data.name ?? `Test site ${tag}`, kind: data.kind ?? "store", address: `${tag} Test Road` } });
}

/** An API key for one site and role; returns the plain key to send as `Authorization: Bearer`. */
export async function makeKey(db: TDb, { organisationId, siteId, role }: { organisationId: string; siteId: string; role: TRole }) {
  const { key, prefix, hash } = newApiKey();
  const row = await db.apiKey.create({ data: { organisationId, siteId, role, name: `test ${role}`, prefix, hash, createdBy: "test" } });
  return { key, id: row.id };
}

export async function makeContainer(db: TDb, { siteId, isClosed = false, state = "open", bayId }: { siteId: string; isClosed?: boolean; state?: string; bayId?: string }) {
  return db.container.create({ data: { siteId, labelNumber: `C-${randomUUID().slice(0, 8)}`, kind: isClosed ? "drum" : "pallet", isClosed, state, bayId } });
}

/** A Request as the route handlers receive it. */
export function apiRequest(pathname: string, { method = "GET", key, body, headers = {} }: { method?: string; key?: string; body?: unknown; headers?: Record<string, string> } = {}) {
  const h = new Headers(headers);
  if (key) h.set("authorization", `Bearer ${key}`);
  if (body !== undefined) h.set("content-type", "application/json");
  return new Request(`http://localhost:3000${pathname}`, { method, headers: h, body: body === undefined ? undefined : typeof body === "string" ? body : JSON.stringify(body) });
}

export const params = <T extends Record<string, string>>(value: T) => ({ params: Promise.resolve(value) });
