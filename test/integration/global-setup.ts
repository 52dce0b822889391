// Builds one migrated template database per run from the committed migrations; each test worker
// then gets its own copy (test/helpers/db.ts). SQLite by default; a PostgreSQL TEST_DATABASE_URL
// (the `npm run test:pg` mode) makes the template a database on that server.
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import {
  applyMigrations,
  createDatabase,
  databaseProvider,
  dropDatabase,
  listDatabases,
  postgresUnreachableReason,
  uniqueDatabaseName,
} from "../../lib/db/migrate";
import type { TTestDatabaseInfo } from "../helpers/db";

export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const serverUrl = process.env.TEST_DATABASE_URL;
  if (!serverUrl || databaseProvider(serverUrl) !== "postgresql") {
    const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-test-"));
    const templatePath = path.join(dir, "template.db");
    await applyMigrations({ provider: "sqlite", url: `file:${templatePath}` });
    project.provide("testDatabase", { provider: "sqlite", dir, templatePath } satisfies TTestDatabaseInfo);
    return async () => rmSync(dir, { recursive: true, force: true });
  }

  const unreachable = await postgresUnreachableReason(serverUrl);
  if (unreachable) throw new Error(`TEST_DATABASE_URL: ${unreachable} (tsx scripts/pg-ensure.ts can start one)`);
  // Every database of this run starts with the prefix, so teardown finds the workers' copies too.
  const prefix = uniqueDatabaseName("leadger_t");
  const template = `${prefix}_template`;
  const templateUrl = await createDatabase({ url: serverUrl, name: template });
  await applyMigrations({ provider: "postgresql", url: templateUrl });
  project.provide("testDatabase", { provider: "postgresql", serverUrl, template, prefix } satisfies TTestDatabaseInfo);
  return async () => {
    for (const name of await listDatabases({ url: serverUrl, prefix })) await dropDatabase({ url: serverUrl, name });
  };
}
