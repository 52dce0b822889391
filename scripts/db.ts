// The project's migration command (WASM schema engine, offline). Works on DATABASE_URL
// (default file:./data/leadger.db; a postgres:// or postgresql:// URL selects PostgreSQL).
//   tsx scripts/db.ts new <name>   create the next migration for SQLite and PostgreSQL (not applied)
//   tsx scripts/db.ts migrate      apply pending migrations
//   tsx scripts/db.ts status       pending / applied (exit 1 unless up to date)
//   tsx scripts/db.ts reset        drop everything and migrate again (refused in production without --force)
//   tsx scripts/db.ts check        drift check of both migration sets against the schema (exit 1 on drift;
//                                  PostgreSQL's needs a server: TEST_DATABASE_URL's, else a throwaway one)
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import {
  applyMigrations,
  createDatabase,
  createMigration,
  databaseProvider,
  DEFAULT_DATABASE_URL,
  diffSchemaAgainstMigrations,
  dropDatabase,
  migrationStatus,
  postgresServerUrl,
  postgresUnreachableReason,
  redactUrl,
  resetDatabase,
  uniqueDatabaseName,
  type TDatabaseProvider,
  type TMigrationStatus,
} from "../lib/db/migrate";
import { ensurePostgres, type TPostgres } from "./pg-ensure";
import { isPostgresSchemaCurrent, writePostgresSchema } from "./prisma-generate";

const LABEL: Record<TDatabaseProvider, string> = { sqlite: "SQLite", postgresql: "PostgreSQL" };

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const url = process.env.DATABASE_URL || DEFAULT_DATABASE_URL;
  const provider = command && ["migrate", "status", "reset"].includes(command) ? databaseProvider(url) : undefined;
  const where = `${provider ? LABEL[provider] : ""} ${redactUrl(url)}`.trim();
  switch (command) {
    case "new":
      return newMigration(rest[0]);
    case "migrate": {
      const applied = await applyMigrations({ provider: provider!, url });
      console.log(applied.length ? `${where}: applied ${applied.join(", ")}` : `${where}: already up to date`);
      return 0;
    }
    case "status": {
      const status = await migrationStatus({ provider: provider!, url });
      printStatus(where, status);
      return status.isUpToDate ? 0 : 1;
    }
    case "reset": {
      if (process.env.NODE_ENV === "production" && !rest.includes("--force")) {
        console.error(`refusing to reset ${where} with NODE_ENV=production (add --force if you mean it)`);
        return 1;
      }
      const applied = await resetDatabase({ provider: provider!, url });
      console.log(`${where}: emptied, then applied ${applied.join(", ") || "no migrations"}`);
      return 0;
    }
    case "check":
      return check();
    default:
      console.error("usage: tsx scripts/db.ts new <name> | migrate | status | reset | check");
      return 1;
  }
}

/** New migrations are computed on scratch databases, so the state of DATABASE_URL never matters. */
async function newMigration(name: string | undefined): Promise<number> {
  if (!name) {
    console.error("usage: npm run db:new -- <name>   (letters, digits and _)");
    return 1;
  }
  writePostgresSchema();
  const created = await withScratchSqlite((url) => createMigration({ provider: "sqlite", url, name }));
  reportCreated("sqlite", created.migrationName);

  const serverUrl = postgresServerUrl();
  const unreachable = await postgresUnreachableReason(serverUrl);
  if (unreachable) {
    console.warn(
      [
        "",
        "!!! PostgreSQL migration NOT created:",
        `!!! ${unreachable}`,
        "!!! Start one (tsx scripts/pg-ensure.ts prints a URL), set TEST_DATABASE_URL to it and run",
        `!!! npm run db:new -- ${name} again: SQLite will report no change, PostgreSQL will get its migration.`,
      ].join("\n"),
    );
    return 0;
  }
  const pgCreated = await withScratchPostgres(serverUrl, (url) => createMigration({ provider: "postgresql", url, name }));
  reportCreated("postgresql", pgCreated.migrationName);
  if (created.migrationName || pgCreated.migrationName) {
    console.log("Review the SQL (hand-written additions go at the end of a migration), then: npm run db:migrate");
  }
  return 0;
}

function reportCreated(provider: TDatabaseProvider, migrationName: string | null): void {
  const dir = provider === "sqlite" ? "prisma/migrations" : "prisma/postgres/migrations";
  console.log(migrationName ? `${LABEL[provider]}: created ${dir}/${migrationName}/migration.sql` : `${LABEL[provider]}: no change, no migration`);
}

/** Drift check: each committed migration set, run on a shadow database, must equal the schema. */
async function check(): Promise<number> {
  let code = 0;
  if (!isPostgresSchemaCurrent()) {
    console.error("prisma/postgres/schema.prisma is stale: run npm run db:generate");
    code = 1;
  }
  const report = (provider: TDatabaseProvider, sql: string) => {
    if (sql === "") return console.log(`${LABEL[provider]}: migrations match the schema`);
    console.error(`${LABEL[provider]}: DRIFT, the migrations lack:\n${sql}\n(make a migration: npm run db:new -- <name>)`);
    code = 1;
  };
  report("sqlite", await withScratchSqlite((url) => diffSchemaAgainstMigrations({ provider: "sqlite", url })));
  // The PostgreSQL diff needs a server for its shadow database: TEST_DATABASE_URL's, or a throwaway one.
  let postgres: TPostgres;
  try {
    postgres = await ensurePostgres({ url: postgresServerUrl() });
  } catch (error) {
    console.error(`PostgreSQL: NOT CHECKED, ${error instanceof Error ? error.message : String(error)}`);
    return code || 2;
  }
  try {
    report("postgresql", await diffSchemaAgainstMigrations({ provider: "postgresql", url: postgres.url }));
  } finally {
    await postgres.stop();
  }
  return code;
}

async function withScratchSqlite<T>(work: (url: string) => Promise<T>): Promise<T> {
  const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-db-"));
  try {
    return await work(`file:${path.join(dir, "scratch.db")}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

async function withScratchPostgres<T>(serverUrl: string, work: (url: string) => Promise<T>): Promise<T> {
  const name = uniqueDatabaseName("leadger_scratch");
  const url = await createDatabase({ url: serverUrl, name });
  try {
    return await work(url);
  } finally {
    await dropDatabase({ url: serverUrl, name });
  }
}

function printStatus(where: string, s: TMigrationStatus): void {
  const lines = [`${where}: ${s.migrationNames.length} migration(s) committed`];
  if (!s.hasMigrationsTable) lines.push("  no migrations applied yet (no _prisma_migrations table)");
  for (const n of s.pendingMigrationNames) lines.push(`  pending   ${n}`);
  for (const n of s.failedMigrationNames) lines.push(`  FAILED    ${n}`);
  for (const n of s.editedMigrationNames) lines.push(`  EDITED    ${n} (changed after it was applied)`);
  for (const n of s.unknownMigrationNames) lines.push(`  UNKNOWN   ${n} (applied here, missing on disk)`);
  lines.push(s.isUpToDate ? "  up to date" : s.pendingMigrationNames.length ? "  run: npm run db:migrate" : "  needs attention");
  console.log(lines.join("\n"));
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(`db ${process.argv[2] ?? ""} failed: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  },
);
