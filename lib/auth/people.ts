import { randomUUID } from "node:crypto";
import { db, type TTx } from "@/lib/db/client";
import { auth } from "./auth";

export type TNewPerson = { email: string; name: string; organisationId: string };

/** The library's own password hash (scrypt). About 0.2 s of CPU: call it before a transaction, never inside one. */
export async function hashPassword(password: string): Promise<string> {
  return (await auth().$context).password.hash(password);
}

/**
 * Writes a person and their email+password credential inside the caller's transaction, in the rows the
 * library reads at sign-in (a "credential" account whose accountId is the user id, as its own sign-up writes).
 */
export async function insertPerson(tx: TTx, { email, name, organisationId, passwordHash }: TNewPerson & { passwordHash: string }) {
  const ctx = await auth().$context;
  const id = ctx.generateId({ model: "user" }) || randomUUID();
  const user = await tx.user.create({ data: { id, email: email.trim().toLowerCase(), name, emailVerified: true, organisationId } });
  await tx.account.create({
    data: { id: ctx.generateId({ model: "account" }) || randomUUID(), userId: user.id, providerId: "credential", accountId: user.id, password: passwordHash },
  });
  return user;
}

/**
 * Adds a person who can sign in with email and password. Open sign-up is off; people come from an
 * administrator (Setup, through lib/db/people.ts, which also writes the memberships and the trail event in
 * the same transaction) or the demo loader.
 */
export async function createPerson({ email, name, password, organisationId }: TNewPerson & { password: string }) {
  const passwordHash = await hashPassword(password);
  return db().$transaction((tx) => insertPerson(tx, { email, name, organisationId, passwordHash }));
}
