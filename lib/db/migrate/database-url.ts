import path from "node:path";
import type { ClientConfig } from "pg";
import { parseIntoClientConfig } from "pg-connection-string";

export type TDatabaseProvider = "sqlite" | "postgresql";

/** The embedded default; relative paths are taken from the working directory (the repo root). */
export const DEFAULT_DATABASE_URL = "file:./data/leadger.db";

/** `postgres://` or `postgresql://` selects PostgreSQL; `file:` selects SQLite. Default: DATABASE_URL. */
export function databaseProvider(url: string = process.env.DATABASE_URL || DEFAULT_DATABASE_URL): TDatabaseProvider {
  if (/^postgres(ql)?:\/\//i.test(url)) return "postgresql";
  if (url.startsWith("file:")) return "sqlite";
  throw new Error(`DATABASE_URL must start with file: (SQLite) or postgresql:// (PostgreSQL), got "${redactUrl(url)}"`);
}

/** Absolute path of a `file:` URL, resolved against the working directory; query strings are dropped. */
export function sqliteFilePath(url: string): string {
  const bare = url.replace(/^file:/, "").replace(/\?.*$/, "");
  if (bare === "" || bare === ":memory:") throw new Error("an in-memory SQLite database cannot be migrated or backed up");
  return path.resolve(bare);
}

/**
 * A parsed pg config. `pg` lets `connectionString` override `database`, so a config built by
 * spreading `{ connectionString }` cannot be pointed at another database (stack.md, defect 6).
 */
export function pgConfig(url: string): ClientConfig {
  const config = parseIntoClientConfig(url);
  return { ...config, port: config.port === undefined ? undefined : Number(config.port) };
}

/** The URL with any password masked, for messages. */
export function redactUrl(url: string): string {
  return url.replace(/(\/\/[^:/@]+:)[^@]*@/, "$1***@");
}
