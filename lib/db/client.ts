// The Prisma client factory. No "server-only" here: scripts and tests (tsx, vitest) import this file,
// and "server-only" throws outside a React server bundle. App code gets its client through db().
import { mkdirSync } from "node:fs";
import path from "node:path";
import { PrismaBetterSqlite3 } from "@prisma/adapter-better-sqlite3";
import { PrismaPg } from "@prisma/adapter-pg";
import { PrismaClient as PostgresPrismaClient } from "./generated/postgres/client";
import { type Prisma, PrismaClient as SqlitePrismaClient } from "./generated/sqlite/client";
import { databaseProvider, DEFAULT_DATABASE_URL, pgConfig, sqliteFilePath } from "./migrate/database-url";
import { sharedSqliteConnection, type TSqliteConnection } from "./sqlite-connection";
import { startWalCheckpointer, type TWalCheckpointer } from "./wal-checkpointer";

export { databaseProvider, type TDatabaseProvider } from "./migrate/database-url";

/**
 * The client type the code is written against: the SQLite client's. Both generated clients share
 * the model API; PostgreSQL-only extras (such as `mode: "insensitive"`) are deliberately not typed,
 * so code that type-checks runs on both.
 */
export type TDb = SqlitePrismaClient;

/** The client inside `db().$transaction(async (tx) => ...)`. */
export type TTx = Prisma.TransactionClient;

// busy_timeout first, so that switching to WAL waits for a lock instead of failing. A 16 MiB page cache (SQLite's
// default is 2 MiB) holds the indexes every intake writes into — random ids land on random pages — so that they
// are not read back from the file on each insert. bench:intake, paired runs: intake 463–503 → 544–634 req/s with
// 32 MiB; 16 MiB gave 538 req/s and keeps bench:limits' peak RSS at 377 MB (32 MiB: 389 MB, target 400 MB).
const SQLITE_PRAGMAS = ["busy_timeout = 5000", "journal_mode = WAL", "synchronous = NORMAL", "foreign_keys = ON", "cache_size = -16384"]
  .map((pragma) => `PRAGMA ${pragma};`)
  .join("\n");

/** A new client on `url` (default DATABASE_URL, else file:./data/leadger.db). Prefer db() in app code. */
export function createDb(url: string = process.env.DATABASE_URL || DEFAULT_DATABASE_URL): TDb {
  if (databaseProvider(url) === "postgresql") {
    // The one cast between the two generated clients (same models, same API).
    return new PostgresPrismaClient({ adapter: new PrismaPg(pgConfig(url)) }) as unknown as TDb;
  }
  const file = sqliteFilePath(url);
  mkdirSync(path.dirname(file), { recursive: true });
  // The adapter opens the better-sqlite3 connection itself; the PRAGMAs are set on the one it opens, and the
  // connection is shared (under a lock) with the raw hot paths in lib/db/fast-intake.ts.
  const shared = sharedSqliteConnection(new PrismaBetterSqlite3({ url: `file:${file}` }), (adapter) => adapter.executeScript(SQLITE_PRAGMAS));
  const client = new SqlitePrismaClient({ adapter: shared.factory });
  // Kept on the client itself, not in a module-level map: Next bundles this module into several chunks, and
  // the cached client (globalThis) must find its connection from any of them.
  Object.defineProperty(client, SQLITE_CONNECTION, { value: shared.connection });
  return client;
}

const SQLITE_CONNECTION = Symbol.for("leadger.sqliteConnection");

/** The SQLite connection under a client, opened if need be; undefined for PostgreSQL. */
export async function sqliteConnection(client: TDb): Promise<TSqliteConnection | undefined> {
  const connection = (client as unknown as Record<symbol, (() => Promise<TSqliteConnection>) | undefined>)[SQLITE_CONNECTION];
  if (!connection) return undefined;
  await client.$connect();
  return connection();
}

type TDbCache = { url: string; client: TDb; checkpointer?: TWalCheckpointer };
const cache = globalThis as typeof globalThis & { __leadgerDb?: TDbCache };

/**
 * The process's one client on DATABASE_URL, kept on globalThis so that Next's dev reloads reuse it.
 * A changed DATABASE_URL (a test worker's own database) gets a new client. On SQLite it comes with the
 * background WAL checkpointer (lib/db/wal-checkpointer.ts).
 */
export function db(): TDb {
  const url = process.env.DATABASE_URL || DEFAULT_DATABASE_URL;
  if (cache.__leadgerDb?.url !== url) {
    const old = cache.__leadgerDb;
    void old?.checkpointer?.stop();
    void old?.client.$disconnect();
    const client = createDb(url);
    cache.__leadgerDb = { url, client };
    // LEADGER_WAL_CHECKPOINTER=0 leaves checkpoints to SQLite's own (on the commit that fills the log).
    if (databaseProvider(url) === "sqlite" && process.env.LEADGER_WAL_CHECKPOINTER !== "0") {
      cache.__leadgerDb.checkpointer = startWalCheckpointer({
        file: sqliteFilePath(url),
        setAutocheckpoint: (pages) => void sqliteConnection(client).then((c) => c?.database.pragma(`wal_autocheckpoint = ${pages}`)),
      });
    }
  }
  return cache.__leadgerDb.client;
}
