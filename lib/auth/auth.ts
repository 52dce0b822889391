import { betterAuth } from "better-auth";
import { prismaAdapter } from "better-auth/adapters/prisma";
import { db, databaseProvider } from "@/lib/db/client";
import { DEFAULT_DATABASE_URL } from "@/lib/db/migrate/database-url";
import { authSecret } from "./secret";
import { clientIpHeader } from "./client-ip";

const port = process.env.PORT ?? "3000";
const baseURL = process.env.BETTER_AUTH_URL ?? `http://localhost:${port}`;

function createAuth() {
  return betterAuth({
    appName: "Leadger",
    baseURL,
    secret: authSecret(),
    trustedOrigins: [baseURL, `http://localhost:${port}`, `http://127.0.0.1:${port}`],
    database: prismaAdapter(db(), { provider: databaseProvider(process.env.DATABASE_URL || DEFAULT_DATABASE_URL) }),
    // People are added by an administrator (Setup) or the demo loader, never by open sign-up.
    emailAndPassword: { enabled: true, disableSignUp: true, minPasswordLength: 10 },
    session: { expiresIn: 60 * 60 * 12, updateAge: 60 * 60 },
    rateLimit: {
      enabled: true,
      storage: "database",
      window: 10,
      max: 100,
      // Sign-in has its own limit (lib/auth/sign-in-limit.ts: failed tries per account and per address, with
      // Retry-After). The library's default of 3 sign-ins per 10 s per address would also count successful
      // ones and refuse a shop's clerks signing in together, with a vaguer message and no Retry-After.
      customRules: { "/sign-in/email": false },
    },
    advanced: {
      useSecureCookies: true,
      defaultCookieAttributes: { httpOnly: true, sameSite: "lax", secure: true },
      // The only client address we trust is the one our own server puts here (see lib/auth/client-ip.ts).
      ipAddress: { ipAddressHeaders: [clientIpHeader()] },
    },
  });
}

type TAuth = ReturnType<typeof createAuth>;
const holder = globalThis as unknown as { leadgerAuth?: TAuth };

/** One better-auth instance per process, on the process's database client. */
export function auth(): TAuth {
  holder.leadgerAuth ??= createAuth();
  return holder.leadgerAuth;
}
