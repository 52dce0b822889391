import { db } from "@/lib/db/client";
import { rawRow } from "@/lib/db/raw";
import { AppError } from "@/lib/errors";
import { auth } from "./auth";
import { hashApiKey } from "./api-keys";
import { isRole, type TActor, type TRole } from "./permissions";

const KEY_TOUCH_MS = 60_000;

/** Who sent the request: an API key (`Authorization: Bearer`) or a signed-in session; null when neither. */
export async function resolveActor(headers: Headers): Promise<TActor | null> {
  const authorization = headers.get("authorization");
  if (authorization?.toLowerCase().startsWith("bearer ")) return actorFromKey(authorization.slice(7).trim());
  const session = await auth().api.getSession({ headers });
  if (!session) return null;
  const user = await db().user.findUnique({
    where: { id: session.user.id },
    select: { id: true, name: true, email: true, organisationId: true, memberships: { select: { siteId: true, role: true } } },
  });
  if (!user?.organisationId) return null;
  const roles = new Map<string, TRole>();
  for (const m of user.memberships) if (isRole(m.role)) roles.set(m.siteId, m.role);
  return { kind: "user", id: user.id, ref: `user:${user.id}`, label: user.name || user.email, organisationId: user.organisationId, roles };
}

type TKeyRow = { id: string; organisationId: string; siteId: string; role: string; name: string; lastUsedAt: Date | string | null; revoked: unknown };

// Every API request looks its key up, so this one read is plain SQL (lib/db/raw.ts) rather than a Prisma query.
const KEY_LOOKUP = `SELECT "id", "organisationId", "siteId", "role", "name", "lastUsedAt", "revokedAt" IS NOT NULL AS "revoked" FROM "ApiKey" WHERE "hash" = ?`;

async function actorFromKey(key: string): Promise<TActor | null> {
  const row = await rawRow<TKeyRow>(db(), KEY_LOOKUP, [hashApiKey(key)]);
  if (!row || row.revoked === true || row.revoked === 1 || !isRole(row.role)) return null;
  const now = new Date();
  const lastUsed = row.lastUsedAt === null ? null : new Date(row.lastUsedAt); // SQLite gives the stored text
  // Recording every use would add a write to each request; once a minute is enough to show "last used".
  if (!lastUsed || now.getTime() - lastUsed.getTime() > KEY_TOUCH_MS) {
    await db().apiKey.update({ where: { id: row.id }, data: { lastUsedAt: now } });
  }
  return {
    kind: "key",
    id: row.id,
    ref: `key:${row.id}`,
    label: `API key “${row.name}”`,
    organisationId: row.organisationId,
    roles: new Map([[row.siteId, row.role]]),
  };
}

export async function requireActor(headers: Headers): Promise<TActor> {
  const actor = await resolveActor(headers);
  if (!actor) throw new AppError("unauthenticated", "Sign in first, or send a valid API key.");
  return actor;
}
