import { NextResponse, type NextRequest } from "next/server";
import { FOREIGN_ORIGIN_MESSAGE, isAllowedOrigin } from "./lib/http/same-origin";

/**
 * CSRF guard in front of every route (lib/http/same-origin.ts). Together with SameSite=Lax cookies this closes
 * cross-site form posts.
 */
export function proxy(request: NextRequest) {
  if (isAllowedOrigin(request)) return NextResponse.next();
  return NextResponse.json({ error: { code: "forbidden", message: FOREIGN_ORIGIN_MESSAGE, issues: [] } }, { status: 403 });
}

// Only requests that carry a cookie are run through the proxy: the rule lets every cookieless request pass, and
// skipping the proxy spares each API-key request a second Request object and a buffered copy of its body.
// Uploads are left out: Next buffers (and past 10 MB cuts) the body of every request the proxy sees, so the
// import route streams its body and applies the same rule itself.
export const config = {
  matcher: [{ source: "/((?!_next/static|_next/image|favicon.ico|api/v1/imports/).*)", has: [{ type: "header", key: "cookie" }] }],
};
