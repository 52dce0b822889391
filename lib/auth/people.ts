import { db } from "@/lib/db/client";
import { auth } from "./auth";

/**
 * Adds a person who can sign in with email and password. Open sign-up is off; people come from an
 * administrator (Setup) or the demo loader. Hashing is the library's own (scrypt).
 */
export async function createPerson({ email, name, password, organisationId }: { email: string; name: string; password: string; organisationId: string }) {
  const ctx = await auth().$context;
  const user = await ctx.internalAdapter.createUser({ email: email.toLowerCase(), name, emailVerified: true }, { method: "admin" });
  await ctx.internalAdapter.linkAccount({ userId: user.id, providerId: "credential", accountId: user.id, password: await ctx.password.hash(password) });
  return db().user.update({ where: { id: user.id }, data: { organisationId } });
}
