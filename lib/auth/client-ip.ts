import { randomBytes } from "node:crypto";

/**
 * The client address as our own HTTP server saw it: scripts/serve.ts sets it on every request, in a header
 * whose name is made once per process (and kept in the process's environment, where every bundle of the app
 * finds it), so no client can send it — not even when the app runs under another server such as `next dev`,
 * where the name is equally unknown and the address reads as "unknown". X-Forwarded-For is believed only when
 * the connecting peer is a proxy listed in LEADGER_TRUSTED_PROXIES, so a client cannot pick its own address to
 * dodge a limit.
 */
export function clientIpHeader(): string {
  return (process.env.LEADGER_CLIENT_IP_HEADER ??= `x-leadger-client-ip-${randomBytes(12).toString("hex")}`);
}

/** The stamped client address of a request, or "unknown". */
export const clientIpOf = (headers: Headers): string => headers.get(clientIpHeader()) ?? "unknown";

export function trustedProxies(): Set<string> {
  return new Set((process.env.LEADGER_TRUSTED_PROXIES ?? "").split(",").map((s) => s.trim()).filter(Boolean));
}

/** Decide the client address from the socket peer and the forwarded chain. */
export function clientAddress({ peer, forwardedFor, trusted }: { peer: string; forwardedFor?: string; trusted: Set<string> }): string {
  const normalise = (ip: string) => ip.replace(/^::ffff:/, "");
  let address = normalise(peer);
  if (!forwardedFor || !trusted.has(address)) return address;
  // Walk the chain from the nearest hop outward, skipping our own proxies.
  const hops = forwardedFor.split(",").map((h) => normalise(h.trim())).filter(Boolean);
  for (let i = hops.length - 1; i >= 0; i--) {
    address = hops[i]!;
    if (!trusted.has(address)) break;
  }
  return address;
}
