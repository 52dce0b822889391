// Backups of DATABASE_URL (default file:./data/leadger.db) into data/backups/.
//   tsx scripts/db-backup.ts [backup]         SQLite: online backup to leadger-<ISO time>.db
//                                             PostgreSQL: pg_dump -Fc to leadger-<ISO time>.dump
//   tsx scripts/db-backup.ts restore <file>   puts a backup back into DATABASE_URL (replaces its data)
import { execFileSync } from "node:child_process";
import { existsSync, mkdirSync, readdirSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import Database from "better-sqlite3";
import { databaseProvider, DEFAULT_DATABASE_URL, redactUrl, sqliteFilePath } from "../lib/db/migrate";

const defaultUrl = () => process.env.DATABASE_URL || DEFAULT_DATABASE_URL;

/** Writes a backup into `dir` and returns its path. The database stays in use meanwhile. */
export async function backupDatabase({ url = defaultUrl(), dir = "data/backups", now = new Date() }: { url?: string; dir?: string; now?: Date } = {}): Promise<string> {
  mkdirSync(dir, { recursive: true });
  // Colons are not allowed in file names everywhere.
  const stamp = now.toISOString().replaceAll(":", "-");
  if (databaseProvider(url) === "sqlite") {
    const file = path.resolve(dir, `leadger-${stamp}.db`);
    const source = new Database(sqliteFilePath(url), { fileMustExist: true });
    try {
      // SQLite's online backup API: a consistent copy while other connections keep writing.
      await source.backup(file);
    } finally {
      source.close();
    }
    return file;
  }
  const file = path.resolve(dir, `leadger-${stamp}.dump`);
  pgTool("pg_dump", ["--format=custom", "--no-owner", `--file=${file}`], url);
  return file;
}

/**
 * Replaces the data of the database at `url` with the backup's. SQLite: the backup API writes the
 * whole file over the live database. PostgreSQL: pg_restore --clean in a single transaction.
 * Stop the app first; its open connections would otherwise see the data change under them.
 */
export async function restoreDatabase({ url = defaultUrl(), file }: { url?: string; file: string }): Promise<void> {
  if (!existsSync(file)) throw new Error(`no backup at ${file}`);
  if (databaseProvider(url) === "sqlite") {
    const backup = new Database(file, { readonly: true, fileMustExist: true });
    try {
      const check = backup.pragma("quick_check", { simple: true });
      if (check !== "ok") throw new Error(`${file} fails SQLite's quick_check: ${String(check)}`);
      const hasMigrations = backup.prepare("SELECT 1 FROM sqlite_master WHERE type = 'table' AND name = '_prisma_migrations'").get();
      if (!hasMigrations) throw new Error(`${file} is not a Leadger database (no _prisma_migrations table)`);
      const target = sqliteFilePath(url);
      mkdirSync(path.dirname(target), { recursive: true });
      await backup.backup(target);
    } finally {
      backup.close();
    }
    return;
  }
  pgTool("pg_restore", ["--clean", "--if-exists", "--no-owner", "--single-transaction", "--exit-on-error", file], url);
}

/** Runs pg_dump / pg_restore on the URL, with the password in the environment rather than in argv. */
function pgTool(tool: "pg_dump" | "pg_restore", args: string[], url: string): void {
  const parsed = new URL(url);
  const password = decodeURIComponent(parsed.password);
  parsed.password = "";
  try {
    execFileSync(pgBinary(tool), [...args, `--dbname=${parsed.toString()}`], {
      stdio: ["ignore", "inherit", "pipe"],
      env: { ...process.env, ...(password ? { PGPASSWORD: password } : {}) },
    });
  } catch (error) {
    const stderr = (error as { stderr?: Buffer }).stderr?.toString().trim();
    throw new Error(`${tool} failed on ${redactUrl(url)}: ${stderr || (error as Error).message}`);
  }
}

/** The newest Debian-installed client (pg_dump must not be older than the server), else PATH's. */
function pgBinary(tool: string): string {
  const base = "/usr/lib/postgresql";
  const versions = existsSync(base) ? readdirSync(base).filter((v) => existsSync(path.join(base, v, "bin", tool))) : [];
  versions.sort((a, b) => Number(b) - Number(a));
  return versions[0] ? path.join(base, versions[0], "bin", tool) : tool;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  const [command = "backup", file] = process.argv.slice(2);
  const url = defaultUrl();
  const run = async () => {
    if (command === "backup") return console.log(`backed up ${redactUrl(url)} to ${await backupDatabase({ url })}`);
    if (command === "restore" && file) {
      await restoreDatabase({ url, file });
      return console.log(`restored ${file} into ${redactUrl(url)}`);
    }
    throw new Error("usage: tsx scripts/db-backup.ts [backup] | restore <file>");
  };
  run().catch((error: unknown) => {
    console.error(`db-backup ${command} failed: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  });
}
