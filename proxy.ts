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

// Uploads are left out: Next buffers (and past 10 MB cuts) the body of every request the proxy sees, so the
// import route streams its body and applies the same rule itself.
export const config = { matcher: ["/((?!_next/static|_next/image|favicon.ico|api/v1/imports/).*)"] };
