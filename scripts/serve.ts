/**
 * The production HTTP server: Next.js behind a plain Node server, so that the client address the app sees
 * is the socket's (or, from a configured proxy only, X-Forwarded-For's) and never a header a client made up.
 * Run as `node --import tsx scripts/serve.ts` so the PID you hold is the server's.
 */
import { createServer } from "node:http";
import path from "node:path";
import next from "next";
import { clientAddress, clientIpHeader, trustedProxies } from "../lib/auth/client-ip";

// tsx turns Node's source-map support on for the whole process; left on, Node would read and keep the source map
// of every server chunk Next loads (43 MB of maps for 13 MB of code) and map every stack trace it builds.
// `next start` does not do that either.
process.setSourceMapsEnabled(false);

export async function serve({ port = Number(process.env.PORT ?? 3000), hostname = process.env.HOST ?? "127.0.0.1" } = {}) {
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  const stamp = clientIpHeader(); // named before Next loads the app, which reads the same name
  const app = next({ dev: false, dir: path.resolve(import.meta.dirname, ".."), hostname, port });
  const handle = app.getRequestHandler();
  await app.prepare();
  const trusted = trustedProxies();
  const server = createServer((req, res) => {
    const forwarded = req.headers["x-forwarded-for"];
    req.headers[stamp] = clientAddress({
      peer: req.socket.remoteAddress ?? "unknown",
      forwardedFor: Array.isArray(forwarded) ? forwarded.join(",") : forwarded,
      trusted,
    });
    void handle(req, res);
  });
  server.keepAliveTimeout = 65_000;
  await new Promise<void>((resolve) => server.listen(port, hostname, resolve));
  return server;
}

if (import.meta.url === `file://${process.argv[1]}`) {
  const server = await serve();
  const address = server.address();
  console.log(`Leadger is listening on http://${typeof address === "object" && address ? `${address.address}:${address.port}` : address}`);
  for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => server.close(() => process.exit(0)));
}
