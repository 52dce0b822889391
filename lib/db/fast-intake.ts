import { randomUUID } from "node:crypto";
import { databaseProvider } from "./migrate/database-url";
import { sqliteConnection, type TDb } from "./client";
import type { TSqliteConnection } from "./sqlite-connection";
import { databaseUrl, pgPool, prepared, toPg } from "./raw";
import { pickTotals, type TTotals } from "./totals";

/**
 * The intake hot path in plain SQL: insert the unit, append the level change and the trail event, move the
 * site's totals, store the idempotency record — one transaction (on SQLite, one savepoint in a group commit), a
 * handful of prepared statements. Prisma's query layer
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
  senderName: string | null;
  senderAddress: string | null;
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
  "saleRef", "note", "senderName", "senderAddress", "receivedAt", "receivedBy", "method", "batteryKg", "batteryKgLow", "batteryKgHigh", "leadKg", "leadKgLow", "leadKgHigh",
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

/** Timestamps exactly as Prisma writes them, so Prisma's range filters see raw rows the same way. */
export const sqliteTime = (d: Date) => d.toISOString().replace("Z", "+00:00");
export const pgTime = (d: Date) => d.toISOString().replace("Z", ""); // timestamp(3) without time zone, in UTC

export type TFastIntake = {
  unit: TUnitRow;
  delta: TTotals;
  trail: { organisationId: string; actor: string; actorLabel: string };
  idempotency?: { scope: string; key: string };
  /**
   * The response body without its last field, `siteTotals` (the site's totals after this unit), which is added
   * here; the whole body is stored with the idempotency key.
   */
  body: Record<string, unknown>;
};

const withTotals = (body: Record<string, unknown>, siteTotals: TTotals) => ({ ...body, siteTotals: pickTotals(siteTotals) });

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
    /** PostgreSQL builds the stored body itself: this text, then the totals as JSON, then the closing brace. */
    idempotencyHead: () => [randomUUID(), input.idempotency!.scope, input.idempotency!.key, `${JSON.stringify(input.body).slice(0, -1)},"siteTotals":`, time(unit.receivedAt)],
  };
}

type TIntakeDone = { siteTotals: TTotals; body: object };
type TQueued = { input: TFastIntake; resolve: (done: TIntakeDone) => void; reject: (error: unknown) => void };

/** Intakes waiting for the next group commit, per connection. */
const waiting = new WeakMap<TSqliteConnection, TQueued[]>();

/**
 * On SQLite the intakes that arrive within one turn of the event loop share one commit (a group commit). Each
 * intake runs in its own savepoint inside the shared transaction, so it still stands or falls on its own: a
 * failing one (a used idempotency key) is rolled back alone and the rest commit. Nobody gets an answer before
 * the commit that holds their unit. The commit — writing the log frames — costs more than the five statements
 * together, and intakes that arrive together mostly touch the same pages (measured: test/bench/intake.bench.ts).
 */
async function sqliteIntake(client: TDb, input: TFastIntake): Promise<TIntakeDone> {
  const connection = (await sqliteConnection(client))!;
  return new Promise((resolve, reject) => {
    let queue = waiting.get(connection);
    if (!queue) {
      const group: TQueued[] = (queue = []);
      waiting.set(connection, group);
      setImmediate(() => {
        waiting.delete(connection); // whoever comes while this group waits for the lock starts the next one
        // commitGroup settles every intake itself; this only catches what it could not foresee.
        commitGroup(connection, group).catch((error: unknown) => group.forEach((queued) => queued.reject(error)));
      });
    }
    queue.push({ input, resolve, reject });
  });
}

async function commitGroup(connection: TSqliteConnection, group: TQueued[]): Promise<void> {
  const database = connection.database;
  const statement = (name: keyof typeof SQL) => prepared(database, SQL[name]);
  // A transaction function called inside a transaction runs as a savepoint (better-sqlite3).
  const one = database.transaction((input: TFastIntake): TIntakeDone => {
    const args = sideArgs(input, sqliteTime);
    statement("unit").run(...unitArgs(input.unit, sqliteTime));
    statement("level").run(...args.level);
    statement("trail").run(...args.trail);
    const siteTotals = statement("site").get(...args.site) as TTotals | undefined;
    if (!siteTotals) throw new Error(`site ${input.unit.siteId} vanished during intake`);
    const body = withTotals(input.body, siteTotals);
    if (input.idempotency) statement("idempotency").run(...args.idempotency(body));
    return { siteTotals, body };
  });
  let outcomes: ({ done: TIntakeDone } | { error: unknown })[];
  try {
    outcomes = await connection.lock.run(
      database.transaction(() =>
        group.map(({ input }) => {
          try {
            return { done: one(input) };
          } catch (error) {
            // Some errors (a full disk, an I/O error) make SQLite roll back the whole transaction: then none of
            // the group may go on outside it.
            if (!database.inTransaction) throw error;
            return { error };
          }
        }),
      ),
    );
  } catch (error) {
    for (const queued of group) queued.reject(error); // the commit itself failed: nothing of the group is stored
    return;
  }
  group.forEach((queued, i) => {
    const outcome = outcomes[i]!;
    if ("done" in outcome) queued.resolve(outcome.done);
    else queued.reject((outcome.error as { code?: string }).code === "SQLITE_CONSTRAINT_UNIQUE" ? duplicateKey() : outcome.error);
  });
}

/**
 * On PostgreSQL the whole intake is one statement — every round trip to the server costs more than the SQL it
 * carries. Data-modifying WITH clauses all run, exactly once, in the statement's own transaction, so the five
 * writes still commit or fail together; the site's row is locked only from its update to the commit. The stored
 * idempotency body is completed in SQL with the totals the update returns.
 */
const PG_TOTALS_JSON = `(SELECT json_build_object('unitCount', "unitCount", 'batteryKg', "batteryKg", 'leadKg', "leadKg", 'electrolyteKg', "electrolyteKg", 'acidKg', "acidKg")::text FROM "s")`;
const pgIntakeSql = (withKey: boolean) =>
  toPg(`WITH "u" AS (${SQL.unit}), "l" AS (${SQL.level}), "t" AS (${SQL.trail}), "s" AS (${SQL.site})${
    withKey
      ? `, "k" AS (INSERT INTO "IdempotencyKey" ("id", "scope", "key", "status", "body", "createdAt") VALUES (?, ?, ?, 201, ? || ${PG_TOTALS_JSON} || '}', ?))`
      : ""
  } SELECT "unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg" FROM "s"`);
const PG_INTAKE = { withKey: pgIntakeSql(true), withoutKey: pgIntakeSql(false) };

async function postgresIntake(url: string, input: TFastIntake): Promise<TIntakeDone> {
  const args = sideArgs(input, pgTime);
  const values = [...unitArgs(input.unit, pgTime), ...args.level, ...args.trail, ...args.site, ...(input.idempotency ? args.idempotencyHead() : [])];
  // Named, so each pooled connection parses and plans it once.
  const query = input.idempotency ? { name: "leadger-intake-key", text: PG_INTAKE.withKey } : { name: "leadger-intake", text: PG_INTAKE.withoutKey };
  try {
    const { rows } = await pgPool(url).query<TTotals>({ ...query, values });
    if (!rows[0]) throw new Error(`site ${input.unit.siteId} vanished during intake`);
    return { siteTotals: rows[0], body: withTotals(input.body, rows[0]) };
  } catch (error) {
    if ((error as { code?: string }).code === "23505") throw duplicateKey();
    throw error;
  }
}

/** Runs one intake on the process's database (db()'s URL). */
export function fastIntake(client: TDb, input: TFastIntake): Promise<TIntakeDone> {
  const url = databaseUrl();
  return databaseProvider(url) === "postgresql" ? postgresIntake(url, input) : sqliteIntake(client, input);
}
