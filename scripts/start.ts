/**
 * `npm start`: build if needed, migrate the database, load the demo into an empty one, serve on :3000,
 * and print how to sign in. Everything is local; nothing is downloaded.
 */
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";
import { DEFAULT_DATABASE_URL, databaseProvider, redactUrl } from "../lib/db/migrate/database-url";
import { applyMigrations } from "../lib/db/migrate/migrations";
import { buildIfNeeded } from "./build-if-needed";

const root = path.resolve(import.meta.dirname, "..");
process.env.NEXT_TELEMETRY_DISABLED = "1";
process.env.DATABASE_URL ??= DEFAULT_DATABASE_URL;
const url = process.env.DATABASE_URL;

function run(command: string, args: string[]) {
  const result = spawnSync(command, args, { cwd: root, stdio: "inherit", env: process.env });
  if (result.status !== 0) process.exit(result.status ?? 1);
}

buildIfNeeded();

const applied = await applyMigrations({ provider: databaseProvider(url), url });
console.log(applied.length ? `Applied ${applied.length} migration(s) to ${redactUrl(url)}.` : `Database ${redactUrl(url)} is up to date.`);

run(process.execPath, ["--import", "tsx", "scripts/seed.ts", "--if-empty"]);

const { serve } = await import("./serve");
const port = Number(process.env.PORT ?? 3000);
const server = await serve({ port });
const keyFile = path.join(root, "data", "demo-api-key");
const { DEMO_PEOPLE } = await import("../lib/demo/scenario");
console.log(`
Leadger is running at http://localhost:${port}

Demo sign-ins (demo data only):
${DEMO_PEOPLE.map((p) => `  ${p.role.padEnd(11)} ${p.email.padEnd(32)} password: ${p.password}`).join("\n")}
${existsSync(keyFile) ? `\nDemo API key for the demo store (clerk role): ${readFileSync(keyFile, "utf8").trim()}\n  curl -H "Authorization: Bearer <key>" http://localhost:${port}/api/v1/units` : ""}

Press Ctrl+C to stop.`);
for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => server.close(() => process.exit(0)));
