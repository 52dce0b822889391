// The background WAL checkpointer (lib/db/wal-checkpointer.ts) on a real SQLite file: once its worker is up the
// app's connection stops checkpointing itself, the worker copies the whole log into the database file, and when it
// stops the connection's own checkpoints come back. (SQLite's WAL and checkpoint semantics: sqlite.org/wal.html,
// common practice — not a REFERENCES.md value.)
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import { afterAll, expect, test, vi } from "vitest";
import { startWalCheckpointer, type TCheckpoint } from "@/lib/db/wal-checkpointer";

const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-wal-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

test("checkpoints the log from its own thread, and hands checkpointing back when it stops", async () => {
  const file = path.join(dir, "app.db");
  const app = new Database(file);
  app.pragma("journal_mode = WAL");
  const settings: number[] = [];
  const results: TCheckpoint[] = [];
  const checkpointer = startWalCheckpointer({
    file,
    intervalMs: 20,
    setAutocheckpoint: (pages) => {
      settings.push(pages);
      app.pragma(`wal_autocheckpoint = ${pages}`);
    },
    onCheckpoint: (r) => results.push(r),
  });
  await expect.poll(() => settings, { timeout: 5000 }).toEqual([0]);
  expect(app.pragma("wal_autocheckpoint", { simple: true })).toBe(0);

  app.exec(`CREATE TABLE "t" ("id" INTEGER PRIMARY KEY, "text" TEXT)`);
  const insert = app.prepare(`INSERT INTO "t" ("text") VALUES (?)`);
  app.transaction(() => {
    for (let i = 0; i < 5000; i++) insert.run(`row ${i} `.repeat(150)); // about 1.5 kB a row, 7 MB in all
  })();
  // The log now holds far more than SQLite's 1 000-page default; nothing on this thread has copied it back.
  await expect.poll(() => results.some((r) => r.log > 1000 && r.checkpointed === r.log), { timeout: 5000 }).toBe(true);

  await checkpointer.stop();
  expect(settings.at(-1)).toBe(1000);
  expect(app.pragma("wal_autocheckpoint", { simple: true })).toBe(1000);
  // What the worker copied is in the database file: a fresh connection reads every row.
  app.close();
  const reader = new Database(file, { readonly: true });
  expect(reader.prepare(`SELECT count(*) AS "n" FROM "t"`).get()).toEqual({ n: 5000 });
  reader.close();
});

test("a checkpoint that fails hands checkpointing back to the app's connection and stops the worker", async () => {
  // Not a database at all: SQLite refuses every checkpoint on it ("file is not a database").
  const file = path.join(dir, "not-a-database.db");
  writeFileSync(file, "this is not an SQLite file ".repeat(200));
  const settings: number[] = [];
  const errors = vi.spyOn(console, "error").mockImplementation(() => {});
  try {
    const checkpointer = startWalCheckpointer({ file, intervalMs: 20, setAutocheckpoint: (pages) => void settings.push(pages) });
    await expect.poll(() => settings.at(-1), { timeout: 5000 }).toBe(1000);
    expect(String(errors.mock.calls[0]?.[0])).toMatch(/WAL checkpointer stopped.*not a database/);
    await new Promise((resolve) => setTimeout(resolve, 200));
    expect(settings.filter((p) => p === 1000)).toHaveLength(1); // handed back once, and the worker is gone
    await checkpointer.stop();
  } finally {
    errors.mockRestore();
  }
});
