import Database from "better-sqlite3";
import pg from "pg";
import { databaseProvider, pgConfig, sqliteFilePath, DEFAULT_DATABASE_URL } from "@/lib/db/migrate/database-url";
import { pgTime, sqliteTime } from "@/lib/db/fast-intake";
import { RAW_INTAKE_ONE_STATEMENT, RAW_TOTALS_UPDATE, RAW_UNIT_INSERT, rawUnitArgs, toPg } from "./raw-intake";

type TRaw = (siteId: string) => Promise<void>;
const holder = globalThis as unknown as { leadgerRawIntake?: TRaw };

function open(): TRaw {
  const url = process.env.DATABASE_URL ?? DEFAULT_DATABASE_URL;
  if (databaseProvider(url) === "postgresql") {
    const pool = new pg.Pool({ ...pgConfig(url), max: 10 });
    const text = toPg(RAW_INTAKE_ONE_STATEMENT);
    return async (siteId) => void (await pool.query({ name: "bench-floor", text, values: [...rawUnitArgs(siteId, pgTime), siteId] }));
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
