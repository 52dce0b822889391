// On SQLite, Prisma and the raw hot paths share one connection (lib/db/sqlite-connection.ts). A query sent
// outside a transaction while one is open must wait for it, not run inside it: otherwise it reads that
// transaction's uncommitted rows and is lost with it on a rollback. (On PostgreSQL each query has its own pooled
// connection, so the same checks hold there by construction; they run on both.)
import { randomUUID } from "node:crypto";
import { describe, expect, test } from "vitest";
import { testDb, testProvider } from "../helpers/db";

const db = await testDb();
const mark = (n: number) => (testProvider() === "postgresql" ? `$${n}` : "?");

/** Time for a query sent now to reach the database (Prisma takes a few turns of the event loop to send it). */
const settle = () => new Promise((resolve) => setTimeout(resolve, 300));

/** An interactive transaction that writes `inside`, then waits for `release()` and rolls back. */
function openTransaction(inside: string) {
  let release!: () => void;
  const gate = new Promise<void>((resolve) => (release = resolve));
  let started!: () => void;
  const isOpen = new Promise<void>((resolve) => (started = resolve));
  const done = db
    .$transaction(async (tx) => {
      await tx.organisation.create({ data: { name: inside } });
      started();
      await gate;
      throw new Error("rolled back on purpose");
    })
    .catch((error: Error) => error.message);
  return { isOpen, release, done };
}

describe("a query outside a transaction while one is open", () => {
  test("a write waits for the open transaction and survives its rollback", async () => {
    const tag = randomUUID().slice(0, 8);
    const open = openTransaction(`inside ${tag}`);
    await open.isOpen;
    // A single statement with no transaction of its own (a model write may open one; raw SQL never does).
    const outside = db.$executeRawUnsafe(`INSERT INTO "Organisation" ("id", "name", "createdAt") VALUES (${mark(1)}, ${mark(2)}, CURRENT_TIMESTAMP)`, randomUUID(), `outside ${tag}`).then((n) => n); // .then sends it now: Prisma's queries are lazy
    await settle();
    open.release();
    expect(await open.done).toBe("rolled back on purpose");
    await outside;
    const names = (await db.organisation.findMany({ where: { name: { endsWith: tag } } })).map((o) => o.name);
    expect(names).toEqual([`outside ${tag}`]);
  });

  test("a read never sees the open transaction's uncommitted rows", async () => {
    const tag = randomUUID().slice(0, 8);
    const open = openTransaction(`uncommitted ${tag}`);
    await open.isOpen;
    const read = db.$queryRawUnsafe<{ n: unknown }[]>(`SELECT count(*) AS "n" FROM "Organisation" WHERE "name" = ${mark(1)}`, `uncommitted ${tag}`).then((rows) => rows);
    await settle();
    open.release();
    await open.done;
    expect(Number((await read)[0]!.n)).toBe(0);
  });
});
