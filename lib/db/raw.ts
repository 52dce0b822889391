import type Database from "better-sqlite3";
import pg from "pg";
import { DEFAULT_DATABASE_URL, databaseProvider, pgConfig } from "./migrate/database-url";
import { sqliteConnection, type TDb } from "./client";

/**
 * The shared plumbing of the raw SQL hot paths (lib/db/fast-intake.ts, the API-key lookup, the totals read):
 * one prepared-statement cache per SQLite connection, one pg pool per PostgreSQL URL. SQL is written once with
 * `?` placeholders; `toPg` turns them into PostgreSQL's `$n`.
 */

/** Positional `?` to PostgreSQL's `$n`. */
export const toPg = (sql: string) => {
  let n = 0;
  return sql.replace(/\?/g, () => `$${++n}`);
};

/** The process's database URL, as db() reads it. */
export const databaseUrl = () => process.env.DATABASE_URL || DEFAULT_DATABASE_URL;

const TIMESTAMP_OID = 1114; // timestamp without time zone: Prisma writes UTC there, so read it as UTC
const types = {
  getTypeParser: ((oid: number, format?: "text" | "binary") =>
    oid === TIMESTAMP_OID ? (value: string) => new Date(`${value.replace(" ", "T")}Z`) : pg.types.getTypeParser(oid, format)) as typeof pg.types.getTypeParser,
};

const pools = new Map<string, pg.Pool>();

/** The raw paths' pool on a PostgreSQL URL (10 connections), opened on first use. */
export function pgPool(url: string): pg.Pool {
  let pool = pools.get(url);
  if (!pool) {
    pool = new pg.Pool({ ...pgConfig(url), max: 10, types });
    pools.set(url, pool);
  }
  return pool;
}

const pgStatements = new Map<string, { name: string; text: string }>();

/** A named PostgreSQL statement for `sql`, so each pooled connection parses and plans it only once. */
function pgStatement(sql: string) {
  let statement = pgStatements.get(sql);
  if (!statement) pgStatements.set(sql, (statement = { name: `leadger-raw-${pgStatements.size + 1}`, text: toPg(sql) }));
  return statement;
}

const statements = new WeakMap<Database.Database, Map<string, Database.Statement>>();

/** A statement prepared once per connection and kept. */
export function prepared(database: Database.Database, sql: string): Database.Statement {
  let cache = statements.get(database);
  if (!cache) statements.set(database, (cache = new Map()));
  let statement = cache.get(sql);
  if (!statement) cache.set(sql, (statement = database.prepare(sql).safeIntegers(false)));
  return statement;
}

/**
 * One row of a read-only query, or undefined. On SQLite it runs on Prisma's own connection under the shared lock,
 * so it never reads inside a Prisma transaction that is still open; SQLite dates come back as their stored text.
 */
export async function rawRow<T>(client: TDb, sql: string, args: unknown[]): Promise<T | undefined> {
  const url = databaseUrl();
  if (databaseProvider(url) === "postgresql") {
    const { rows } = await pgPool(url).query({ ...pgStatement(sql), values: args });
    return rows[0] as T | undefined;
  }
  const connection = (await sqliteConnection(client))!;
  return connection.lock.run(() => prepared(connection.database, sql).get(...args) as T | undefined);
}
