// Migrations without Prisma's native engines: the WASM schema engine on driver adapters.
// Used by scripts/db.ts and the test harness; not by the app at run time.
export { databaseProvider, DEFAULT_DATABASE_URL, pgConfig, redactUrl, sqliteFilePath, type TDatabaseProvider } from "./database-url";
export {
  applyMigrations,
  createMigration,
  diffSchemaAgainstMigrations,
  migrationPaths,
  migrationStatus,
  resetDatabase,
  schemaText,
  type TCreatedMigration,
  type TMigrateTarget,
  type TMigrationStatus,
} from "./migrations";
export {
  createDatabase,
  DEFAULT_TEST_DATABASE_URL,
  dropDatabase,
  listDatabases,
  postgresServerUrl,
  postgresUnreachableReason,
  uniqueDatabaseName,
  withDatabase,
} from "./postgres-server";
export { postgresSchema } from "./postgres-schema";
