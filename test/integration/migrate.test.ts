import { cpSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createDb } from "@/lib/db/client";
import {
  applyMigrations,
  createMigration,
  diffSchemaAgainstMigrations,
  migrationPaths,
  migrationStatus,
  resetDatabase,
  type TDatabaseProvider,
} from "@/lib/db/migrate";
import { postgresForTests, scratchDatabase, type TScratchDatabase } from "../helpers/db";

const postgres = await postgresForTests();
if (postgres.reason) console.warn(`[migrate.test] PostgreSQL tests SKIPPED: ${postgres.reason}`);

const targets: { provider: TDatabaseProvider; serverUrl?: string; skip: boolean }[] = [
  { provider: "sqlite", skip: false },
  { provider: "postgresql", serverUrl: postgres.url, skip: !postgres.url },
];

/** The migration folders committed for a provider, oldest first. */
function committedNames(provider: TDatabaseProvider): string[] {
  const dir = migrationPaths({ provider }).migrationsDir;
  return existsSync(dir)
    ? readdirSync(dir, { withFileTypes: true })
        .filter((entry) => entry.isDirectory())
        .map((entry) => entry.name)
        .sort()
    : [];
}

describe.each(targets)("migrations on $provider", ({ provider, serverUrl, skip }) => {
  let scratch: TScratchDatabase;
  const target = () => ({ provider, url: scratch.url });

  beforeAll(async () => {
    if (!skip) scratch = await scratchDatabase({ provider, serverUrl });
  });
  afterAll(async () => {
    await scratch?.drop();
  });

  test.skipIf(skip)("on a fresh database every committed migration is pending", async () => {
    const names = committedNames(provider);
    expect(names.length).toBeGreaterThan(0);
    const status = await migrationStatus(target());
    expect(status.migrationNames).toEqual(names);
    expect(status.pendingMigrationNames).toEqual(names);
    expect(status.isUpToDate).toBe(false);
  });

  test.skipIf(skip)("migrate applies them all once; then the status is up to date", async () => {
    const names = committedNames(provider);
    expect(await applyMigrations(target())).toEqual(names);
    expect(await applyMigrations(target())).toEqual([]);
    const status = await migrationStatus(target());
    expect(status).toMatchObject({ hasMigrationsTable: true, pendingMigrationNames: [], isUpToDate: true });
  });

  test.skipIf(skip)("the committed migrations match the schema (drift check empty)", async () => {
    expect(await diffSchemaAgainstMigrations(target())).toBe("");
  });

  test.skipIf(skip)("reset empties the data and leaves the database migrated", async () => {
    const before = createDb(scratch.url);
    await before.organisation.create({ data: { name: "Reset probe" } });
    expect(await before.organisation.count()).toBe(1);
    await before.$disconnect();

    await resetDatabase(target());

    const after = createDb(scratch.url);
    try {
      expect(await after.organisation.count()).toBe(0);
      expect((await migrationStatus(target())).isUpToDate).toBe(true);
    } finally {
      await after.$disconnect();
    }
  });

  // The drift check and createMigration must see a change: a copy of prisma/ with one model more.
  test.skipIf(skip)("a model missing from the migrations shows as drift, and createMigration writes it", async () => {
    const rootDir = mkdtempSync(path.join(os.tmpdir(), "leadger-drift-"));
    const work = await scratchDatabase({ provider, serverUrl });
    try {
      cpSync(path.resolve("prisma"), path.join(rootDir, "prisma"), { recursive: true });
      const schemaPath = path.join(rootDir, "prisma", "schema.prisma");
      writeFileSync(schemaPath, `${readFileSync(schemaPath, "utf8")}\nmodel DriftProbe {\n  id String @id\n}\n`);

      const drift = await diffSchemaAgainstMigrations({ provider, url: work.url, rootDir });
      expect(drift).toContain('CREATE TABLE "DriftProbe"');

      const created = await createMigration({ provider, url: work.url, rootDir, name: "drift_probe" });
      expect(created.migrationName).toMatch(/^\d{14}_drift_probe$/);
      const sql = readFileSync(path.join(migrationPaths({ provider, rootDir }).migrationsDir, created.migrationName!, "migration.sql"), "utf8");
      expect(sql).toContain('CREATE TABLE "DriftProbe"');
      expect(await diffSchemaAgainstMigrations({ provider, url: work.url, rootDir })).toBe("");
    } finally {
      rmSync(rootDir, { recursive: true, force: true });
      await work.drop();
    }
  });
});

describe("createDb on SQLite", () => {
  test("sets WAL, synchronous NORMAL, a 5 s busy timeout and foreign keys on its connection", async () => {
    const scratch = await scratchDatabase({ provider: "sqlite" });
    await applyMigrations({ provider: "sqlite", url: scratch.url });
    const client = createDb(scratch.url);
    try {
      const [row] = await client.$queryRawUnsafe<Record<string, unknown>[]>(
        "SELECT * FROM pragma_journal_mode(), pragma_synchronous(), pragma_busy_timeout(), pragma_foreign_keys()",
      );
      // synchronous: 1 = NORMAL (sqlite.org/pragma.html#pragma_synchronous)
      expect(Object.values(row!).map(String)).toEqual(["wal", "1", "5000", "1"]);
      await expect(client.bay.create({ data: { siteId: "no-such-site", name: "B" } })).rejects.toMatchObject({ code: "P2003" });
    } finally {
      await client.$disconnect();
      await scratch.drop();
    }
  });
});
