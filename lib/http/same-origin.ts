const SAFE = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * The CSRF rule: a state-changing request that carries cookies must come from our own origin; one with cookies
 * and no Origin header at all is refused. API-key requests carry no cookie and pass. proxy.ts applies it to every
 * route, and routes left out of the proxy (uploads, whose bodies the proxy would buffer) apply it themselves.
 */
export function isAllowedOrigin(request: Request): boolean {
  if (SAFE.has(request.method) || !request.headers.get("cookie")) return true;
  const origin = request.headers.get("origin");
  const host = request.headers.get("host");
  if (!origin || !host) return false;
  try {
    return new URL(origin).host === host;
  } catch {
    return false; // "null" (sandboxed frames, privacy redirects) or garbage
  }
}

export const FOREIGN_ORIGIN_MESSAGE = "This request did not come from a Leadger page (Origin missing or foreign).";
