import { NextResponse, type NextRequest } from "next/server";

const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * CSRF guard in front of every route: a state-changing request that carries cookies must come from our own
 * origin, and one with cookies but no Origin header at all is refused. API-key requests carry no cookie
 * and pass. Together with SameSite=Lax cookies this closes cross-site form posts.
 */
export function proxy(request: NextRequest) {
  if (SAFE.has(request.method) || !request.headers.get("cookie")) return NextResponse.next();
  const origin = request.headers.get("origin");
  const host = request.headers.get("host");
  if (origin && host && new URL(origin).host === host) return NextResponse.next();
  return NextResponse.json(
    { error: { code: "forbidden", message: "This request did not come from a Leadger page (Origin missing or foreign).", issues: [] } },
    { status: 403 },
  );
}

export const config = { matcher: ["/((?!_next/static|_next/image|favicon.ico).*)"] };
