/**
 * The client address as our own HTTP server saw it (scripts/serve.ts sets this header on every request
 * and drops any copy the client sent). X-Forwarded-For is believed only when the connecting peer is a
 * proxy listed in LEADGER_TRUSTED_PROXIES, so a client cannot pick its own address to dodge a limit.
 */
export const CLIENT_IP_HEADER = "x-leadger-client-ip";

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
