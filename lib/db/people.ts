import { randomUUID } from "node:crypto";
import { z } from "zod";
import { hashPassword, insertPerson } from "@/lib/auth/people";
import { can, canAnywhere, ROLES, sitesWhere, type TActor } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { db, type TTx } from "./client";
import { withDbErrors } from "./errors";
import { siteFor } from "./sites";
import { writeTrail } from "./trail";

/**
 * People and their memberships (a role per site). The rules a reviewer expects of a multi-user service:
 * - only a signed-in person changes people: an API key cannot (a leaked key must not be able to mint a
 *   person, and so a way back in that outlives the key's revocation);
 * - a role at a site is given, changed or removed only by someone whose own role there allows `setup.write`;
 * - nobody changes their own memberships (no raising one's own role, no locking oneself out);
 * - every site keeps at least one administrator;
 * - a person's name or password is changed only by someone who administers every site the person belongs
 *   to, so an administrator of one store cannot take over an administrator of another site;
 * - roles come from ROLES only: any other string is refused before it reaches the database.
 */

export const ZRole = z.enum(ROLES, { error: `role must be one of: ${ROLES.join(", ")}` });

const siteId = z.string({ error: "site is required" }).trim().min(1, "site is required");
const personName = z.string({ error: "name is required" }).trim().min(1, "name is required").max(120, "name must be at most 120 characters");
/** 10 is the sign-in library's configured minimum (lib/auth/auth.ts); 128 its maximum. */
const password = z
  .string({ error: "give a temporary password" })
  .min(10, "the password must be at least 10 characters")
  .max(128, "the password must be at most 128 characters");

export const ZMembership = z.object({ site: siteId, role: ZRole });
export type TMembership = z.output<typeof ZMembership>;

export const ZPersonCreate = z.object({
  email: z
    .string({ error: "email is required" })
    .trim()
    .toLowerCase()
    .max(254, "email must be at most 254 characters")
    .pipe(z.email("give a valid email address")),
  name: personName,
  password,
  memberships: z
    .array(ZMembership, { error: "give at least one site and role" })
    .min(1, "give at least one site and role")
    .max(100, "at most 100 memberships")
    .refine((list) => new Set(list.map((m) => m.site)).size === list.length, "each site at most once"),
});
export type TPersonCreate = z.output<typeof ZPersonCreate>;

export const ZPersonPatch = z
  .object({ name: personName.optional(), password: password.optional() })
  .refine((v) => v.name !== undefined || v.password !== undefined, { message: "send a new name or a new temporary password", path: ["name"] });
export type TPersonPatch = z.output<typeof ZPersonPatch>;

export const ZPeopleQuery = z.object({ site: siteId.optional() });

export type TPersonView = {
  id: string;
  name: string;
  email: string;
  createdAt: string;
  memberships: { siteId: string; siteName: string; role: string }[];
};

const PERSON_SELECT = {
  id: true,
  name: true,
  email: true,
  createdAt: true,
  organisationId: true,
  memberships: { select: { siteId: true, role: true, site: { select: { name: true } } } },
} as const;

type TPersonRow = {
  id: string;
  name: string;
  email: string;
  createdAt: Date;
  organisationId: string | null;
  memberships: { siteId: string; role: string; site: { name: string } }[];
};

/** A person as shown to this actor: memberships only at sites where the actor may read the setup. */
function viewOf(actor: TActor, row: TPersonRow): TPersonView {
  return {
    id: row.id,
    name: row.name,
    email: row.email,
    createdAt: row.createdAt.toISOString(),
    memberships: row.memberships
      .filter((m) => can(actor, "setup.read", m.siteId))
      .map((m) => ({ siteId: m.siteId, siteName: m.site.name, role: m.role }))
      .sort((a, b) => a.siteName.localeCompare(b.siteName)),
  };
}

function requirePerson(actor: TActor) {
  if (actor.kind !== "user") throw new AppError("forbidden", "People are changed only by a signed-in administrator, not with an API key.");
}

function refuseSelf(actor: TActor, userId: string, what: string) {
  if (actor.kind === "user" && actor.id === userId) throw new AppError("forbidden", `You cannot ${what} yourself; ask another administrator.`);
}

/** A person of the actor's organisation, or "not found": another organisation's people are never confirmed. */
async function personRow(actor: TActor, userId: string): Promise<TPersonRow> {
  const row = await db().user.findUnique({ where: { id: userId }, select: PERSON_SELECT });
  if (!row || row.organisationId !== actor.organisationId) throw new AppError("not_found", "No such person.");
  return row;
}

/** Whether the actor may see this person: a shared readable site, or (administrators) a person with no site left. */
function canSee(actor: TActor, row: TPersonRow): boolean {
  if (row.memberships.length === 0) return canAnywhere(actor, "setup.write");
  return row.memberships.some((m) => can(actor, "setup.read", m.siteId));
}

/** Name and password belong to the whole person: the actor must administer every site the person is at. */
function canManageWhole(actor: TActor, row: TPersonRow): boolean {
  if (row.memberships.length === 0) return canAnywhere(actor, "setup.write");
  return row.memberships.every((m) => can(actor, "setup.write", m.siteId));
}

export async function listPeople(actor: TActor, { siteId }: { siteId?: string } = {}): Promise<TPersonView[]> {
  if (siteId) await siteFor(actor, siteId, "setup.read");
  else if (!canAnywhere(actor, "setup.read")) throw new AppError("forbidden", "Your role does not open Setup.");
  const readable = siteId ? [siteId] : sitesWhere(actor, "setup.read");
  const orphans = !siteId && canAnywhere(actor, "setup.write") ? [{ memberships: { none: {} } }] : [];
  const rows = await db().user.findMany({
    where: { organisationId: actor.organisationId, OR: [{ memberships: { some: { siteId: { in: readable } } } }, ...orphans] },
    select: PERSON_SELECT,
    orderBy: { name: "asc" },
  });
  return rows.map((row) => viewOf(actor, row));
}

export async function getPerson(actor: TActor, userId: string): Promise<TPersonView> {
  const row = await personRow(actor, userId);
  if (!canSee(actor, row)) throw new AppError("forbidden", "This person is not at a site whose setup you may read.");
  return viewOf(actor, row);
}

/** Adds a person with a temporary password and their roles: the person, the credential, the memberships and the trail, in one transaction. */
export async function addPerson(actor: TActor, input: TPersonCreate): Promise<TPersonView> {
  for (const m of input.memberships) await siteFor(actor, m.site, "setup.write");
  requirePerson(actor);
  const passwordHash = await hashPassword(input.password);
  const userId = await withDbErrors(
    () =>
      db().$transaction(async (tx) => {
        const user = await insertPerson(tx, { email: input.email, name: input.name, organisationId: actor.organisationId, passwordHash });
        await tx.membership.createMany({ data: input.memberships.map((m) => ({ userId: user.id, siteId: m.site, role: m.role })) });
        const memberships = input.memberships.map((m) => ({ siteId: m.site, role: m.role }));
        // The password, even hashed, never goes to the trail.
        await writeTrail(tx, actor, { siteId: null, action: "person.added", entity: "person", entityId: user.id, after: { email: user.email, name: user.name, memberships } });
        for (const m of memberships) {
          await writeTrail(tx, actor, { siteId: m.siteId, action: "membership.added", entity: "person", entityId: user.id, after: { email: user.email, role: m.role } });
        }
        return user.id;
      }),
    { conflict: "This email is already in use." },
  );
  return getPerson(actor, userId);
}

/** Renames a person or gives them a new temporary password; a new password ends all their sessions. */
export async function updatePerson(actor: TActor, userId: string, patch: TPersonPatch): Promise<TPersonView> {
  const row = await personRow(actor, userId);
  if (!canSee(actor, row)) throw new AppError("forbidden", "This person is not at a site whose setup you may read.");
  requirePerson(actor);
  refuseSelf(actor, userId, "change the name or password of");
  if (!canManageWhole(actor, row)) throw new AppError("forbidden", "This person also works at a site you do not administer; ask an administrator of all their sites.");
  const passwordHash = patch.password === undefined ? undefined : await hashPassword(patch.password);
  await db().$transaction(async (tx) => {
    if (patch.name !== undefined && patch.name !== row.name) {
      await tx.user.update({ where: { id: userId }, data: { name: patch.name } });
      await writeTrail(tx, actor, { siteId: null, action: "person.renamed", entity: "person", entityId: userId, before: { name: row.name }, after: { name: patch.name } });
    }
    if (passwordHash !== undefined) {
      const changed = await tx.account.updateMany({ where: { userId, providerId: "credential" }, data: { password: passwordHash } });
      if (changed.count === 0) {
        await tx.account.create({ data: { id: randomUUID(), userId, providerId: "credential", accountId: userId, password: passwordHash } });
      }
      const ended = await tx.session.deleteMany({ where: { userId } });
      await writeTrail(tx, actor, { siteId: null, action: "person.password-reset", entity: "person", entityId: userId, after: { sessionsEnded: ended.count } });
    }
  });
  return getPerson(actor, userId);
}

/**
 * Takes the site row's write lock first, so that two administrators changing the site's memberships at the
 * same time are serialised (PostgreSQL row lock; SQLite's single writer) and the last-administrator check
 * below cannot be raced past.
 */
async function lockSite(tx: TTx, siteId: string) {
  const site = await tx.site.findUniqueOrThrow({ where: { id: siteId }, select: { organisationId: true } });
  await tx.site.update({ where: { id: siteId }, data: { organisationId: site.organisationId } });
}

async function keepAnAdmin(tx: TTx, siteId: string) {
  const admins = await tx.membership.count({ where: { siteId, role: "admin" } });
  if (admins === 0) throw new AppError("conflict", "A site needs at least one administrator: make someone else an administrator here first.");
}

async function membershipTarget(actor: TActor, userId: string, site: string) {
  const target = await personRow(actor, userId);
  await siteFor(actor, site, "setup.write");
  requirePerson(actor);
  refuseSelf(actor, userId, "change the role of");
  return target;
}

/** Gives a person a role at a site, or changes it. The same role again changes nothing and writes nothing. */
export async function setMembership(actor: TActor, userId: string, { site, role }: TMembership): Promise<TPersonView> {
  const target = await membershipTarget(actor, userId, site);
  await db().$transaction(async (tx) => {
    await lockSite(tx, site);
    const existing = await tx.membership.findUnique({ where: { userId_siteId: { userId, siteId: site } } });
    if (existing?.role === role) return;
    await tx.membership.upsert({ where: { userId_siteId: { userId, siteId: site } }, create: { userId, siteId: site, role }, update: { role } });
    if (existing?.role === "admin") await keepAnAdmin(tx, site);
    await writeTrail(tx, actor, {
      siteId: site,
      action: existing ? "membership.changed" : "membership.added",
      entity: "person",
      entityId: userId,
      before: existing ? { email: target.email, role: existing.role } : undefined,
      after: { email: target.email, role },
    });
  });
  return getPerson(actor, userId);
}

export async function removeMembership(actor: TActor, userId: string, site: string): Promise<TPersonView | null> {
  const target = await membershipTarget(actor, userId, site);
  await db().$transaction(async (tx) => {
    await lockSite(tx, site);
    const existing = await tx.membership.findUnique({ where: { userId_siteId: { userId, siteId: site } } });
    if (!existing) throw new AppError("not_found", "This person has no role at this site.");
    await tx.membership.delete({ where: { id: existing.id } });
    if (existing.role === "admin") await keepAnAdmin(tx, site);
    await writeTrail(tx, actor, { siteId: site, action: "membership.removed", entity: "person", entityId: userId, before: { email: target.email, role: existing.role } });
  });
  const after = await personRow(actor, userId);
  return canSee(actor, after) ? viewOf(actor, after) : null;
}

