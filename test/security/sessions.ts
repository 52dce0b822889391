// Signed-in people for tests that call route handlers directly: a real person (the library's own password
// hash), signed in through our sign-in route, so the cookie is the one a browser would get.
import { randomUUID } from "node:crypto";
import { hashPassword, insertPerson } from "@/lib/auth/people";
import type { TRole } from "@/lib/auth/permissions";
import { clientIpHeader } from "@/lib/auth/client-ip";
import type { TDb } from "@/lib/db/client";

export const TEST_PASSWORD = "correct horse battery 42";

/** A random address from the documentation ranges (RFC 5737), so tests never share a sign-in limit. */
export const randomAddress = () => `198.51.${Math.floor(Math.random() * 256)}.${1 + Math.floor(Math.random() * 254)}`;

// One scrypt hash per test file instead of one per person: each costs about 0.2 s of CPU.
let passwordHash: Promise<string> | undefined;

export async function makePerson(
  db: TDb,
  { organisationId, memberships = [], name }: { organisationId: string; memberships?: { siteId: string; role: TRole }[]; name?: string },
) {
  const tag = randomUUID().slice(0, 8);
  const email = `person-${tag}@test.example`;
  passwordHash ??= hashPassword(TEST_PASSWORD);
  const hash = await passwordHash;
  const user = await db.$transaction((tx) => insertPerson(tx, { email, name: name ?? `Person ${tag}`, organisationId, passwordHash: hash }));
  for (const m of memberships) await db.membership.create({ data: { userId: user.id, siteId: m.siteId, role: m.role } });
  return { id: user.id, email, password: TEST_PASSWORD };
}

type TAuthRoute = typeof import("@/app/api/auth/[...all]/route");
let route: Promise<TAuthRoute> | undefined;
const authRoute = () => (route ??= import("@/app/api/auth/[...all]/route"));

/** POST /api/auth/sign-in/email through our route (limit included), from `ip` as the server would stamp it. */
export async function signInRequest({ email, password, ip = randomAddress() }: { email: string; password: string; ip?: string }): Promise<Response> {
  const { POST } = await authRoute();
  return POST(
    new Request("http://localhost:3000/api/auth/sign-in/email", {
      method: "POST",
      headers: { "content-type": "application/json", [clientIpHeader()]: ip },
      body: JSON.stringify({ email, password }),
    }),
  );
}

/** The Cookie header to send after a sign-in response: name=value of each cookie it set. */
export function cookieOf(response: Response): string {
  return response.headers
    .getSetCookie()
    .map((c) => c.split(";")[0]!)
    .filter((c) => !c.endsWith("="))
    .join("; ");
}

export async function signIn(person: { email: string; password: string }): Promise<string> {
  const response = await signInRequest(person);
  if (!response.ok) throw new Error(`sign-in failed: ${response.status} ${await response.text()}`);
  return cookieOf(response);
}

export async function signOut(cookie: string): Promise<Response> {
  const { POST } = await authRoute();
  return POST(new Request("http://localhost:3000/api/auth/sign-out", { method: "POST", headers: { cookie, "content-type": "application/json" }, body: "{}" }));
}

/** A Request carrying a session cookie, as the route handlers receive it. */
export function sessionRequest(pathname: string, { cookie, method = "GET", body }: { cookie: string; method?: string; body?: unknown }) {
  const headers = new Headers({ cookie });
  if (body !== undefined) headers.set("content-type", "application/json");
  return new Request(`http://localhost:3000${pathname}`, { method, headers, body: body === undefined ? undefined : JSON.stringify(body) });
}
