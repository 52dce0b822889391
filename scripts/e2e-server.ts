/** The server the browser tests drive: a fresh database (E2E_DATABASE_URL or data/e2e.db), the demo loaded, the built app. */
import { rmSync, mkdirSync } from "node:fs";
import path from "node:path";
import { databaseProvider, sqliteFilePath } from "../lib/db/migrate/database-url";
import { applyMigrations, resetDatabase } from "../lib/db/migrate/migrations";

const root = path.resolve(import.meta.dirname, "..");
const url = process.env.E2E_DATABASE_URL ?? `file:${path.join(root, "data", "e2e.db")}`;
process.env.DATABASE_URL = url;
process.env.PORT = process.env.E2E_PORT ?? "3100";
process.env.LEADGER_DATA_DIR ??= path.join(root, "data", "e2e");
mkdirSync(process.env.LEADGER_DATA_DIR, { recursive: true });

const provider = databaseProvider(url);
if (provider === "sqlite") {
  for (const suffix of ["", "-wal", "-shm", "-journal"]) rmSync(sqliteFilePath(url) + suffix, { force: true });
  await applyMigrations({ provider, url });
} else {
  await resetDatabase({ provider, url });
}
const { seedDemo } = await import("../lib/db/seed");
await seedDemo();
const { serve } = await import("./serve");
await serve({ port: Number(process.env.PORT), hostname: "127.0.0.1" });
console.log(`e2e server on http://localhost:${process.env.PORT}`);
