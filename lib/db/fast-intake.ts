import { randomUUID } from "node:crypto";
import type Database from "better-sqlite3";
import pg from "pg";
import { DEFAULT_DATABASE_URL, databaseProvider, pgConfig } from "./migrate/database-url";
import { sqliteConnection, type TDb } from "./client";
import type { TTotals } from "./totals";

/**
 * The intake hot path in plain SQL: insert the unit, move the site's totals, append the level change, the trail
 * event and the idempotency record — one transaction, a handful of prepared statements. Prisma's query layer
 * costs a few tenths of a millisecond per statement, which at five writes per intake was most of the request
 * (measured: test/bench/intake.bench.ts); everything else still goes through Prisma. SQLite and PostgreSQL
 * twins of each statement are kept side by side, and the integration suite runs on both.
 */

export type TUnitRow = {
  id: string;
  siteId: string;
  containerId: null;
  kind: string;
  nominalVoltage: number;
  capacityAh: number | null;
  cca: number | null;
  groupSize: string | null;
  weightKg: number | null;
  condition: string;
  source: string;
  state: string;
  saleRef: string | null;
  note: string | null;
  receivedAt: Date;
  receivedBy: string;
  method: string;
  batteryKg: number;
  batteryKgLow: number;
  batteryKgHigh: number;
  leadKg: number;
  leadKgLow: number;
  leadKgHigh: number;
  electrolyteKg: number;
  electrolyteKgLow: number;
  electrolyteKgHigh: number;
  acidKg: number;
  acidKgLow: number;
  acidKgHigh: number;
  polymerKg: number;
  otherKg: number;
};

const UNIT_COLUMNS = [
  "id", "siteId", "containerId", "kind", "nominalVoltage", "capacityAh", "cca", "groupSize", "weightKg", "condition", "source", "state",
  "saleRef", "note", "receivedAt", "receivedBy", "method", "batteryKg", "batteryKgLow", "batteryKgHigh", "leadKg", "leadKgLow", "leadKgHigh",
  "electrolyteKg", "electrolyteKgLow", "electrolyteKgHigh", "acidKg", "acidKgLow", "acidKgHigh", "polymerKg", "otherKg",
] as const satisfies readonly (keyof TUnitRow)[];

const quoted = (columns: readonly string[]) => columns.map((c) => `"${c}"`).join(", ");
const marks = (n: number) => Array.from({ length: n }, () => "?").join(", ");

const SQL = {
  unit: `INSERT INTO "Unit" (${quoted(UNIT_COLUMNS)}) VALUES (${marks(UNIT_COLUMNS.length)})`,
  site: `UPDATE "Site" SET "unitCount" = "unitCount" + ?, "batteryKg" = "batteryKg" + ?, "leadKg" = "leadKg" + ?, "electrolyteKg" = "electrolyteKg" + ?, "acidKg" = "acidKg" + ? WHERE "id" = ? RETURNING "unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg"`,
  level: `INSERT INTO "LevelChange" ("id", "siteId", "at", "reason", "refId", "unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg") VALUES (${marks(10)})`,
  trail: `INSERT INTO "TrailEvent" ("id", "organisationId", "siteId", "at", "actor", "actorLabel", "action", "entity", "entityId", "before", "after") VALUES (${marks(11)})`,
  idempotency: `INSERT INTO "IdempotencyKey" ("id", "scope", "key", "status", "body", "createdAt") VALUES (${marks(6)})`,
};

/** Positional `?` to PostgreSQL's `$n`. */
export const toPg = (sql: string) => {
  let n = 0;
  return sql.replace(/\?/g, () => `$${++n}`);
};

/** Timestamps exactly as Prisma writes them, so Prisma's range filters see raw rows the same way. */
export const sqliteTime = (d: Date) => d.toISOString().replace("Z", "+00:00");
export const pgTime = (d: Date) => d.toISOString().replace("Z", ""); // timestamp(3) without time zone, in UTC

export type TFastIntake = {
  unit: TUnitRow;
  delta: TTotals;
  trail: { organisationId: string; actor: string; actorLabel: string };
  idempotency?: { scope: string; key: string };
  /** The response body, given the site's totals after this unit; stored with the idempotency key. */
  bodyOf: (siteTotals: TTotals) => object;
};

/** A used idempotency key, reported the way Prisma reports a unique violation. */
const duplicateKey = () => Object.assign(new Error("idempotency key already used"), { code: "P2002" });

function unitArgs(unit: TUnitRow, time: (d: Date) => string) {
  return UNIT_COLUMNS.map((c) => (c === "receivedAt" ? time(unit.receivedAt) : unit[c]));
}

function sideArgs(input: TFastIntake, time: (d: Date) => string) {
  const { unit, delta, trail } = input;
  return {
    site: [delta.unitCount, delta.batteryKg, delta.leadKg, delta.electrolyteKg, delta.acidKg, unit.siteId],
    level: [randomUUID(), unit.siteId, time(unit.receivedAt), "intake", unit.id, delta.unitCount, delta.batteryKg, delta.leadKg, delta.electrolyteKg, delta.acidKg],
    trail: [randomUUID(), trail.organisationId, unit.siteId, time(unit.receivedAt), trail.actor, trail.actorLabel, "unit.received", "unit", unit.id, null, JSON.stringify(unit)],
    idempotency: (body: object) => [randomUUID(), input.idempotency!.scope, input.idempotency!.key, 201, JSON.stringify(body), time(unit.receivedAt)],
  };
}

type TStatements = Record<keyof typeof SQL, Database.Statement>;
const prepared = new WeakMap<Database.Database, TStatements>();

function statementsFor(database: Database.Database): TStatements {
  let s = prepared.get(database);
  if (!s) {
    s = Object.fromEntries(Object.entries(SQL).map(([k, sql]) => [k, database.prepare(sql).safeIntegers(false)])) as TStatements;
    prepared.set(database, s);
  }
  return s;
}

async function sqliteIntake(client: TDb, input: TFastIntake): Promise<{ siteTotals: TTotals; body: object }> {
  const connection = (await sqliteConnection(client))!;
  const s = statementsFor(connection.database);
  const args = sideArgs(input, sqliteTime);
  const release = await connection.lock.acquire();
  try {
    return connection.database.transaction(() => {
      s.unit.run(...unitArgs(input.unit, sqliteTime));
      const siteTotals = s.site.get(...args.site) as TTotals | undefined;
      if (!siteTotals) throw new Error(`site ${input.unit.siteId} vanished during intake`);
      s.level.run(...args.level);
      s.trail.run(...args.trail);
      const body = input.bodyOf(siteTotals);
      if (input.idempotency) s.idempotency.run(...args.idempotency(body));
      return { siteTotals, body };
    })();
  } catch (error) {
    if ((error as { code?: string }).code === "SQLITE_CONSTRAINT_UNIQUE") throw duplicateKey();
    throw error;
  } finally {
    release();
  }
}

const pools = new Map<string, pg.Pool>();
const PG_SQL = Object.fromEntries(Object.entries(SQL).map(([k, sql]) => [k, toPg(sql)])) as Record<keyof typeof SQL, string>;

async function postgresIntake(url: string, input: TFastIntake): Promise<{ siteTotals: TTotals; body: object }> {
  let pool = pools.get(url);
  if (!pool) {
    pool = new pg.Pool({ ...pgConfig(url), max: 10 });
    pools.set(url, pool);
  }
  const args = sideArgs(input, pgTime);
  const connection = await pool.connect();
  try {
    await connection.query("BEGIN");
    await connection.query(PG_SQL.unit, unitArgs(input.unit, pgTime));
    const { rows } = await connection.query<TTotals>(PG_SQL.site, args.site);
    if (!rows[0]) throw new Error(`site ${input.unit.siteId} vanished during intake`);
    await connection.query(PG_SQL.level, args.level);
    await connection.query(PG_SQL.trail, args.trail);
    const body = input.bodyOf(rows[0]);
    if (input.idempotency) await connection.query(PG_SQL.idempotency, args.idempotency(body));
    await connection.query("COMMIT");
    return { siteTotals: rows[0], body };
  } catch (error) {
    await connection.query("ROLLBACK").catch(() => undefined);
    if ((error as { code?: string }).code === "23505") throw duplicateKey();
    throw error;
  } finally {
    connection.release();
  }
}

/** Runs one intake on the process's database (db()'s URL). */
export function fastIntake(client: TDb, input: TFastIntake): Promise<{ siteTotals: TTotals; body: object }> {
  const url = process.env.DATABASE_URL || DEFAULT_DATABASE_URL;
  return databaseProvider(url) === "postgresql" ? postgresIntake(url, input) : sqliteIntake(client, input);
}
