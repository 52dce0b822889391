import type Database from "better-sqlite3";
import type { SqlDriverAdapter, SqlDriverAdapterFactory, Transaction } from "@prisma/driver-adapter-utils";

/**
 * Prisma's better-sqlite3 adapter runs everything on one connection and lets one transaction in at a time. The
 * intake hot path writes through that same connection with prepared statements (lib/db/fast-intake.ts); this
 * lock keeps it out while a Prisma transaction is open, and keeps Prisma out while it runs. Prisma's queries
 * outside a transaction take it as well, so nothing ever runs inside someone else's open transaction. The raw
 * intake is synchronous, so holding the lock there never spans an await.
 */
export class ConnectionLock {
  #tail: Promise<void> = Promise.resolve();

  acquire(): Promise<() => void> {
    let release!: () => void;
    const next = new Promise<void>((resolve) => (release = resolve));
    const ready = this.#tail.then(() => release);
    this.#tail = this.#tail.then(() => next);
    return ready;
  }

  /** Runs `fn` holding the lock, and releases it however `fn` ends. */
  async run<T>(fn: () => T | Promise<T>): Promise<T> {
    const release = await this.acquire();
    try {
      return await fn();
    } finally {
      release();
    }
  }
}

export type TSqliteConnection = { database: Database.Database; lock: ConnectionLock };

type TBetterSqliteAdapter = SqlDriverAdapter & { client: Database.Database };

/** Wraps the adapter factory so the connection it opens is known and its transactions take our lock first. */
export function sharedSqliteConnection(
  factory: SqlDriverAdapterFactory,
  onConnect: (adapter: SqlDriverAdapter) => Promise<void>,
): { factory: SqlDriverAdapterFactory; connection: () => Promise<TSqliteConnection> } {
  const lock = new ConnectionLock();
  let opened: Promise<TSqliteConnection> | undefined;
  let resolveOpened!: (c: TSqliteConnection) => void;
  const waiting = new Promise<TSqliteConnection>((resolve) => (resolveOpened = resolve));
  const wrapped: SqlDriverAdapterFactory = {
    provider: factory.provider,
    adapterName: factory.adapterName,
    connect: async () => {
      const inner = (await factory.connect()) as TBetterSqliteAdapter;
      await onConnect(inner);
      resolveOpened({ database: inner.client, lock });
      const adapter: SqlDriverAdapter = {
        provider: inner.provider,
        adapterName: inner.adapterName,
        // A query outside a transaction waits for the lock too: on the one connection it would otherwise run inside
        // whichever transaction is open (an import, an interactive Prisma transaction between two of its awaits),
        // read its uncommitted rows, and vanish with it on a rollback.
        queryRaw: (q) => lock.run(() => inner.queryRaw(q)),
        executeRaw: (q) => lock.run(() => inner.executeRaw(q)),
        executeScript: (s) => inner.executeScript(s),
        dispose: () => inner.dispose(),
        ...(inner.getConnectionInfo ? { getConnectionInfo: () => inner.getConnectionInfo!() } : {}),
        startTransaction: async (isolationLevel) => {
          const release = await lock.acquire();
          let tx: Transaction;
          try {
            tx = await inner.startTransaction(isolationLevel);
          } catch (error) {
            release();
            throw error;
          }
          const end = (fn: () => Promise<void>) => async () => {
            try {
              await fn();
            } finally {
              release();
            }
          };
          return Object.assign(Object.create(tx) as Transaction, { commit: end(() => tx.commit()), rollback: end(() => tx.rollback()) });
        },
      };
      return adapter;
    },
  };
  return { factory: wrapped, connection: () => (opened ??= waiting) };
}
