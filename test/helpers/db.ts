// Each test worker works on its own migrated database, so test files run in parallel with no
// resets between them; tests make unique data (test/helpers/factories.ts) and never assume an
// empty table.
import { randomUUID } from "node:crypto";
import { copyFileSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, inject } from "vitest";
import { createDb, db, type TDb } from "@/lib/db/client";
import {
  applyMigrations,
  createDatabase,
  dropDatabase,
  postgresServerUrl,
  postgresUnreachableReason,
  uniqueDatabaseName,
  type TDatabaseProvider,
} from "@/lib/db/migrate";

/** What global-setup.ts built, handed to the workers through vitest's provide/inject. */
export type TTestDatabaseInfo =
  | { provider: "sqlite"; dir: string; templatePath: string }
  | { provider: "postgresql"; serverUrl: string; template: string; prefix: string };

declare module "vitest" {
  export interface ProvidedContext {
    testDatabase: TTestDatabaseInfo;
  }
}

let workerDb: Promise<TDb> | undefined;

/**
 * This worker's own database, a copy of the migrated template: a file copy on SQLite,
 * CREATE DATABASE ... TEMPLATE on PostgreSQL. Sets DATABASE_URL for the worker, so code that
 * calls db() uses it; the client returned is that same db().
 */
export function testDb(): Promise<TDb> {
  workerDb ??= (async () => {
    const url = await copyOfTemplate(inject("testDatabase"));
    process.env.DATABASE_URL = url;
    return db();
  })();
  return workerDb;
}

/** The provider of the suite's databases (PostgreSQL in `npm run test:pg` mode). */
export function testProvider(): TDatabaseProvider {
  return inject("testDatabase").provider;
}

async function copyOfTemplate(info: TTestDatabaseInfo): Promise<string> {
  const worker = process.env.VITEST_POOL_ID ?? "0";
  const tag = randomUUID().slice(0, 8);
  if (info.provider === "sqlite") {
    const file = path.join(info.dir, `worker-${worker}-${tag}.db`);
    copyFileSync(info.templatePath, file);
    return `file:${file}`;
  }
  const name = `${info.prefix}_w${worker}_${tag}`;
  // CREATE DATABASE refuses a template that another session is reading at that moment (55006).
  for (let attempt = 1; ; attempt++) {
    try {
      return await createDatabase({ url: info.serverUrl, name, template: info.template });
    } catch (error) {
      if ((error as { code?: string }).code !== "55006" || attempt >= 10) throw error;
      await new Promise((resolve) => setTimeout(resolve, 100 * attempt));
    }
  }
}

/** A PostgreSQL server for tests that run on PostgreSQL whatever the suite's mode, or why there is none. */
export async function postgresForTests(): Promise<{ url: string; reason?: undefined } | { url?: undefined; reason: string }> {
  const url = postgresServerUrl();
  const reason = await postgresUnreachableReason(url);
  return reason ? { reason } : { url };
}

export type TScratchDatabase = { provider: TDatabaseProvider; url: string; drop(): Promise<void> };

/**
 * A new, empty database (nothing migrated, not even created yet for SQLite), for tests of the
 * migrations themselves. PostgreSQL needs `serverUrl` (from postgresForTests).
 */
export async function scratchDatabase({ provider, serverUrl }: { provider: TDatabaseProvider; serverUrl?: string }): Promise<TScratchDatabase> {
  if (provider === "sqlite") {
    const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-scratch-"));
    return { provider, url: `file:${path.join(dir, "scratch.db")}`, drop: async () => rmSync(dir, { recursive: true, force: true }) };
  }
  if (!serverUrl) throw new Error("scratchDatabase: PostgreSQL needs a serverUrl");
  const name = uniqueDatabaseName("leadger_test");
  const url = await createDatabase({ url: serverUrl, name });
  return { provider, url, drop: () => dropDatabase({ url: serverUrl, name }) };
}

/** A scratch database with the committed migrations applied, and its own client. */
export async function migratedScratchDatabase(args: { provider: TDatabaseProvider; serverUrl?: string }): Promise<TScratchDatabase & { db: TDb }> {
  const scratch = await scratchDatabase(args);
  await applyMigrations({ provider: scratch.provider, url: scratch.url });
  const client = createDb(scratch.url);
  return {
    ...scratch,
    db: client,
    drop: async () => {
      await client.$disconnect();
      await scratch.drop();
    },
  };
}

/**
 * Both databases for a test file that checks something of each, whatever the suite's mode: SQLite always, and
 * PostgreSQL when a server answers (skipped with a warning naming `file` otherwise). Use with `describe.each`,
 * and `clientFor(target)` inside: the worker's own database when the suite runs on that provider, else a migrated
 * scratch database, dropped after the block.
 */
export async function bothDatabases(file: string): Promise<{ provider: TDatabaseProvider; skip: boolean; serverUrl?: string }[]> {
  const postgres = await postgresForTests();
  if (postgres.reason) console.warn(`[${file}] PostgreSQL tests SKIPPED: ${postgres.reason}`);
  return [
    { provider: "sqlite", skip: false },
    { provider: "postgresql", skip: !postgres.url, serverUrl: postgres.url },
  ];
}

/** Registers the hooks that open (and drop) a block's database; returns a getter for its client. */
export function clientFor({ provider, skip, serverUrl }: { provider: TDatabaseProvider; skip: boolean; serverUrl?: string }): () => TDb {
  let client: TDb | undefined;
  let drop: (() => Promise<void>) | undefined;
  beforeAll(async () => {
    if (skip) return;
    if (testProvider() === provider) client = await testDb();
    else ({ db: client, drop } = await migratedScratchDatabase({ provider, serverUrl }));
  });
  afterAll(async () => {
    await drop?.();
  });
  return () => client!;
}
