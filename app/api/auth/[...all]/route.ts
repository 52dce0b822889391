import { toNextJsHandler } from "better-auth/next-js";
import { auth } from "@/lib/auth/auth";
import { clientIpOf } from "@/lib/auth/client-ip";
import { giveBackSignInTry, signInKeys, takeSignInTry } from "@/lib/auth/sign-in-limit";
import { db } from "@/lib/db/client";

const handler = () => toNextJsHandler(auth());

export const GET = (request: Request) => handler().GET(request);

/** Sign-in goes through our per-account and per-address limit before the library sees it. */
export async function POST(request: Request): Promise<Response> {
  if (!new URL(request.url).pathname.endsWith("/sign-in/email")) return handler().POST(request);
  const body = (await request.clone().json().catch(() => ({}))) as { email?: unknown };
  const email = typeof body.email === "string" ? body.email : "";
  const keys = signInKeys({ email, ip: clientIpOf(request.headers) });
  const verdict = await takeSignInTry(db(), keys);
  if (!verdict.isAllowed) {
    const minutes = Math.ceil(verdict.retryAfterS / 60);
    return Response.json(
      { code: "TOO_MANY_ATTEMPTS", message: `Too many sign-in attempts. Wait about ${minutes} minute${minutes === 1 ? "" : "s"} and try again.` },
      { status: 429, headers: { "Retry-After": String(verdict.retryAfterS) } },
    );
  }
  const response = await handler().POST(request);
  if (response.ok) await giveBackSignInTry(db(), keys);
  return response;
}
