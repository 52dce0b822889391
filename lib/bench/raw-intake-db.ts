import Database from "better-sqlite3";
import pg from "pg";
import { databaseProvider, pgConfig, sqliteFilePath, DEFAULT_DATABASE_URL } from "@/lib/db/migrate/database-url";
import { pgTime, sqliteTime } from "@/lib/db/fast-intake";
import { RAW_TOTALS_UPDATE, RAW_UNIT_INSERT, rawUnitArgs, toPg } from "./raw-intake";

type TRaw = (siteId: string) => Promise<void>;
const holder = globalThis as unknown as { leadgerRawIntake?: TRaw };

function open(): TRaw {
  const url = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
  if (databaseProvider(url) === "postgresql") {
    const pool = new pg.Pool({ ...pgConfig(url), max: 10 });
    const insert = toPg(RAW_UNIT_INSERT);
    const update = toPg(RAW_TOTALS_UPDATE);
    return async (siteId) => {
      const client = await pool.connect();
      try {
        await client.query("BEGIN");
        await client.query(insert, rawUnitArgs(siteId, pgTime));
        await client.query(update, [siteId]);
        await client.query("COMMIT");
      } catch (error) {
        await client.query("ROLLBACK");
        throw error;
      } finally {
        client.release();
      }
    };
  }
  const sqlite = new Database(sqliteFilePath(url));
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  sqlite.pragma("busy_timeout = 5000");
  const insert = sqlite.prepare(RAW_UNIT_INSERT);
  const update = sqlite.prepare(RAW_TOTALS_UPDATE);
  const tx = sqlite.transaction((siteId: string) => {
    insert.run(...rawUnitArgs(siteId, sqliteTime));
    update.run(siteId);
  });
  return async (siteId) => void tx(siteId);
}

/** One raw intake on the process's database (benchmark floor only). */
export const rawIntake: TRaw = (siteId) => (holder.leadgerRawIntake ??= open())(siteId);
