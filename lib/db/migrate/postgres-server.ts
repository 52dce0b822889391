import { randomUUID } from "node:crypto";
import pg from "pg";
import { databaseProvider, pgConfig, redactUrl } from "./database-url";

/** The server tests and `db:new` use for PostgreSQL when TEST_DATABASE_URL names none. */
export const DEFAULT_TEST_DATABASE_URL = "postgresql://postgres@127.0.0.1:5432/test";

/** TEST_DATABASE_URL when it is a PostgreSQL URL, else the default. */
export function postgresServerUrl(): string {
  const url = process.env.TEST_DATABASE_URL;
  return url && databaseProvider(url) === "postgresql" ? url : DEFAULT_TEST_DATABASE_URL;
}

/** null when a connection succeeds, else why not. */
export async function postgresUnreachableReason(url: string, timeoutMs = 3000): Promise<string | null> {
  const client = new pg.Client({ ...pgConfig(url), connectionTimeoutMillis: timeoutMs });
  client.on("error", () => {});
  try {
    await client.connect();
    await client.query("SELECT 1");
    return null;
  } catch (error) {
    return `no PostgreSQL at ${redactUrl(url)}: ${error instanceof Error ? error.message || error.name : String(error)}`;
  } finally {
    await client.end().catch(() => {});
  }
}

/** The same server and credentials, another database. */
export function withDatabase(url: string, database: string): string {
  const parsed = new URL(url);
  parsed.pathname = `/${encodeURIComponent(database)}`;
  return parsed.toString();
}

/** A new, unique database name with a prefix (letters, digits and _ only). */
export function uniqueDatabaseName(prefix: string): string {
  return `${prefix}_${randomUUID().replaceAll("-", "").slice(0, 16)}`;
}

/** Runs SQL on a short-lived connection to the URL's database. */
export async function runOnServer(url: string, sql: string, params: unknown[] = []): Promise<pg.QueryResult> {
  const client = new pg.Client(pgConfig(url));
  client.on("error", () => {});
  await client.connect();
  try {
    return await client.query(sql, params);
  } finally {
    await client.end();
  }
}

/** CREATE DATABASE (optionally from a template) on the server of `url`; returns the new database's URL. */
export async function createDatabase({ url, name, template }: { url: string; name: string; template?: string }): Promise<string> {
  await runOnServer(url, `CREATE DATABASE ${quoteIdent(name)}${template ? ` TEMPLATE ${quoteIdent(template)}` : ""}`);
  return withDatabase(url, name);
}

/** DROP DATABASE ... WITH (FORCE): closes other sessions first (PostgreSQL 13+). */
export async function dropDatabase({ url, name }: { url: string; name: string }): Promise<void> {
  await runOnServer(url, `DROP DATABASE IF EXISTS ${quoteIdent(name)} WITH (FORCE)`);
}

/** Names of the server's databases that start with `prefix`. */
export async function listDatabases({ url, prefix }: { url: string; prefix: string }): Promise<string[]> {
  const result = await runOnServer(url, "SELECT datname FROM pg_database WHERE starts_with(datname, $1) ORDER BY datname", [prefix]);
  return result.rows.map((row: { datname: string }) => row.datname);
}

export function quoteIdent(name: string): string {
  return `"${name.replaceAll('"', '""')}"`;
}
