import { PrismaBetterSqlite3 } from "@prisma/adapter-better-sqlite3";
import { PrismaPg } from "@prisma/adapter-pg";
import type { SqlDriverAdapter, SqlMigrationAwareDriverAdapterFactory, SqlQuery } from "@prisma/driver-adapter-utils";
import pg from "pg";
import { pgConfig, sqliteFilePath, type TDatabaseProvider } from "./database-url";
import { createDatabase, dropDatabase, uniqueDatabaseName } from "./postgres-server";

/** An adapter factory for the schema engine, plus a way to close whatever it opened. */
export type TMigrationAdapter = {
  factory: SqlMigrationAwareDriverAdapterFactory;
  /** Disposes every connection still open (the engine does not always dispose its adapters). */
  close(): Promise<void>;
};

/** The adapter the schema engine runs on, with the fixes of stack.md ("Prisma without its native engines"). */
export function migrationAdapter({ provider, url }: { provider: TDatabaseProvider; url: string }): TMigrationAdapter {
  const open = new Set<SqlDriverAdapter>();
  const track = (adapter: SqlDriverAdapter): SqlDriverAdapter => {
    const tracked = delegate(adapter, {
      dispose: async () => {
        if (!open.delete(tracked)) return;
        await adapter.dispose();
      },
    });
    open.add(tracked);
    return tracked;
  };
  const factory = provider === "sqlite" ? sqliteFactory(url, track) : postgresFactory(url, track);
  return {
    factory,
    close: async () => {
      for (const adapter of [...open]) await adapter.dispose();
    },
  };
}

type TTrack = (adapter: SqlDriverAdapter) => SqlDriverAdapter;

function sqliteFactory(url: string, track: TTrack): SqlMigrationAwareDriverAdapterFactory {
  const base = new PrismaBetterSqlite3({ url: `file:${sqliteFilePath(url)}` });
  return {
    provider: base.provider,
    adapterName: base.adapterName,
    connect: async () => track(withScripts(await base.connect())),
    connectToShadowDb: async () => track(withScripts(await base.connectToShadowDb())),
  };
}

/**
 * Defect 2: the engine sends whole migration scripts through `executeRaw`, and better-sqlite3
 * prepares one statement at a time (P3006). A parameterless query with a `;` before its end goes
 * to `executeScript` instead (a single statement containing `;`, such as a trigger, runs there too).
 */
function withScripts(adapter: SqlDriverAdapter): SqlDriverAdapter {
  return delegate(adapter, {
    executeRaw: async (query: SqlQuery) => {
      if (query.args.length > 0 || !/;\s*\S/.test(query.sql)) return adapter.executeRaw(query);
      await adapter.executeScript(query.sql);
      return 0;
    },
  });
}

function postgresFactory(url: string, track: TTrack): SqlMigrationAwareDriverAdapterFactory {
  const config = pgConfig(url);
  const connectTo = async (database: string | undefined) => {
    const pool = charAsText(new pg.Pool({ ...config, database, max: 2 }));
    return withWholeScripts(await new PrismaPg(pool, { disposeExternalPool: true }).connect());
  };
  return {
    provider: "postgres",
    adapterName: "@prisma/adapter-pg",
    connect: async () => track(await connectTo(config.database)),
    // Defect 5: adapter-pg drops its shadow database while its own pool is still connected, and leaks
    // the pool. Ours closes the pool first, then drops the database with FORCE.
    connectToShadowDb: async () => {
      const name = uniqueDatabaseName("leadger_shadow");
      await createDatabase({ url, name });
      const adapter = await connectTo(name);
      return track(
        delegate(adapter, {
          dispose: async () => {
            await adapter.dispose();
            await dropDatabase({ url, name });
          },
        }),
      );
    },
  };
}

const PG_CHAR_OID = 18;
const PG_TEXT_OID = 25;

/**
 * Defect 4: catalog queries of the engine return PostgreSQL's `"char"` (OID 18), which adapter-pg
 * 7.10.0 cannot map to a column type. Reported as text; used for the migration pool only.
 */
function charAsText(pool: pg.Pool): pg.Pool {
  const fix = (value: unknown) => {
    for (const result of Array.isArray(value) ? value : [value]) {
      for (const field of (result as pg.QueryResult | undefined)?.fields ?? []) {
        if (field.dataTypeID === PG_CHAR_OID) field.dataTypeID = PG_TEXT_OID;
      }
    }
  };
  // Every pooled client, whether used by pool.query (callback form) or by a transaction (promise form).
  pool.on("connect", (client) => {
    const query = client.query.bind(client) as (...args: unknown[]) => unknown;
    (client as { query: unknown }).query = (...args: unknown[]) => {
      const last = args.at(-1);
      if (typeof last === "function") {
        args[args.length - 1] = (error: unknown, result: unknown) => {
          if (!error) fix(result);
          return (last as (e: unknown, r: unknown) => unknown)(error, result);
        };
        return query(...args);
      }
      const result = query(...args);
      return result instanceof Promise ? result.then((value) => (fix(value), value)) : result;
    };
  });
  return pool;
}

/**
 * adapter-pg's `executeScript` splits the script at every `;`, which cuts a plpgsql body
 * (`$$ ... ; ... $$`) apart. A parameterless query goes over pg's simple query protocol, which runs
 * a whole multi-statement script as is, and keeps the adapter's error mapping.
 */
function withWholeScripts(adapter: SqlDriverAdapter): SqlDriverAdapter {
  return delegate(adapter, {
    executeScript: async (script: string) => {
      await adapter.executeRaw({ sql: script, args: [], argTypes: [] });
    },
  });
}

/**
 * A plain object forwarding to the adapter; a Proxy would break the adapters' private class fields.
 */
function delegate(adapter: SqlDriverAdapter, overrides: Partial<SqlDriverAdapter>): SqlDriverAdapter {
  return {
    provider: adapter.provider,
    adapterName: adapter.adapterName,
    queryRaw: (query) => adapter.queryRaw(query),
    executeRaw: (query) => adapter.executeRaw(query),
    executeScript: (script) => adapter.executeScript(script),
    startTransaction: (isolationLevel) => adapter.startTransaction(isolationLevel),
    dispose: () => adapter.dispose(),
    ...(adapter.getConnectionInfo ? { getConnectionInfo: () => adapter.getConnectionInfo!() } : {}),
    ...overrides,
  };
}
