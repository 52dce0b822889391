/**
 * `npm run bench:deposits`: the deposits ledger at scale, each figure beside a floor measured in the same run.
 *
 * 1. Import of a generated 100 000-line sales file through the real import function (`importSales`: the
 *    upload to a temporary file, every line checked, all-or-nothing transaction, skip of held sale ids,
 *    charge entries, balance, trail) against the floor: the same file streamed through papaparse and
 *    inserted with raw better-sqlite3 prepared statements in one transaction (no checks, no skip).
 *    Targets: ≤ 5 s and peak RSS < 300 MiB. Each
 *    round runs in a fresh child process on a fresh copy of the migrated database, so its time and peak
 *    RSS are its own.
 * 2. The balance of a store with 1 000 000 ledger entries through the real data function
 *    (`depositBalance`: permission check and the site row) against a full SUM over the store's entries
 *    (raw, and through Prisma's aggregate). Target: ≤ 10 ms (the median; the p99 is printed beside it).
 *   npx tsx test/bench/deposits.bench.ts
 */
import { spawnSync } from "node:child_process";
import { randomUUID } from "node:crypto";
import { copyFileSync, createReadStream, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import Database from "better-sqlite3";
import Papa from "papaparse";
import { writeSalesFile } from "../unit/deposits/generate-sales";

const ROWS = 100_000;
const ROUNDS = 3;
const ENTRIES = 1_000_000;
const IMPORT_TARGET_MS = 5_000;
const RSS_TARGET_MIB = 300;
const BALANCE_TARGET_MS = 10;
const MIB = 1024 * 1024;

type TRun = { ms: number; rows: number; peakRssMiB: number };

const dbTime = (at: Date) => at.toISOString().replace("Z", "+00:00");

/** An organisation and a store, written raw so the child loads nothing it does not measure. */
function seedStore(file: string): { organisationId: string; siteId: string } {
  const sqlite = new Database(file);
  const organisationId = randomUUID();
  const siteId = randomUUID();
  const now = dbTime(new Date());
  sqlite.prepare(`INSERT INTO "Organisation" ("id","name","createdAt") VALUES (?,?,?)`).run(organisationId, "Bench org", now);
  sqlite
    .prepare(`INSERT INTO "Site" ("id","organisationId","name","kind","jurisdiction","depositRuleId","createdAt") VALUES (?,?,?,?,?,?,?)`)
    .run(siteId, organisationId, "Bench store", "store", "US-WA", "us-wa", now);
  sqlite.close();
  return { organisationId, siteId };
}

const actorFor = (organisationId: string, siteId: string) => ({
  kind: "system" as const,
  id: "bench",
  ref: "system:bench",
  label: "Benchmark",
  organisationId,
  roles: new Map([[siteId, "clerk" as const]]),
});

/** The real import function, in this (child) process. */
async function runImport(dbFile: string, csv: string): Promise<TRun> {
  const { organisationId, siteId } = seedStore(dbFile);
  process.env.DATABASE_URL = `file:${dbFile}`;
  const { importSales } = await import("@/lib/db/sales-import");
  const { db } = await import("@/lib/db/client");
  await db().site.findUniqueOrThrow({ where: { id: siteId } }); // connect before the clock starts
  const start = process.hrtime.bigint();
  const result = await importSales(actorFor(organisationId, siteId), { siteId, stream: createReadStream(csv) });
  const ms = Number(process.hrtime.bigint() - start) / 1e6;
  if (!result.isImported || result.newSales !== ROWS) throw new Error(`import did not store every line: ${JSON.stringify(result).slice(0, 300)}`);
  await db().$disconnect();
  return { ms, rows: result.newSales, peakRssMiB: process.resourceUsage().maxRSS / 1024 };
}

/** The floor: papaparse streaming the file, raw prepared inserts of the sale and its charge, one transaction. */
async function runFloor(dbFile: string, csv: string): Promise<TRun> {
  const { siteId } = seedStore(dbFile);
  const sqlite = new Database(dbFile);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  const insertSale = sqlite.prepare(
    `INSERT INTO "Sale" ("id","siteId","saleRef","soldAt","product","groupSize","quantity","depositCents","importId","createdAt") VALUES (?,?,?,?,?,?,?,?,?,?)`,
  );
  const insertEntry = sqlite.prepare(`INSERT INTO "DepositEntry" ("id","siteId","kind","amountCents","saleRef","at","createdBy") VALUES (?,?,?,?,?,?,?)`);
  const now = dbTime(new Date());
  const start = process.hrtime.bigint();
  let rows = 0;
  let cents = 0;
  sqlite.exec("BEGIN");
  await new Promise<void>((resolve, reject) =>
    Papa.parse<string[]>(createReadStream(csv) as unknown as File, {
      chunk: (results) => {
        for (const row of results.data) {
          if (row.length < 6 || row[0] === "date") continue;
          const id = `floor:${rows++}`;
          const at = `${row[0]}T12:00:00.000+00:00`;
          const depositCents = Math.round(Number(row[5]) * 100);
          insertSale.run(id, siteId, row[1], at, row[2], row[3], Number(row[4]), depositCents, "floor", now);
          insertEntry.run(`${id}:1`, siteId, "charge", depositCents, row[1], at, "bench");
          cents += depositCents;
        }
      },
      complete: () => resolve(),
      error: reject,
    }),
  );
  sqlite.prepare(`UPDATE "Site" SET "depositBalanceCents" = "depositBalanceCents" + ? WHERE "id" = ?`).run(cents, siteId);
  sqlite.exec("COMMIT");
  const ms = Number(process.hrtime.bigint() - start) / 1e6;
  sqlite.close();
  return { ms, rows, peakRssMiB: process.resourceUsage().maxRSS / 1024 };
}

type TBalance = { fnMedianMs: number; fnP99Ms: number; rawSumMs: number; prismaSumMs: number; balanceCents: number; sumCents: number };

/** 1 000 000 entries at one store, then its balance from the data function against full sums. */
async function runBalance(dbFile: string): Promise<TBalance> {
  const { organisationId, siteId } = seedStore(dbFile);
  const other = seedStore(dbFile); // a second store's rows, so the sum has to pick the store's own
  const sqlite = new Database(dbFile);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("synchronous = NORMAL");
  const insert = sqlite.prepare(`INSERT INTO "DepositEntry" ("id","siteId","kind","amountCents","saleRef","at","createdBy") VALUES (?,?,?,?,?,?,?)`);
  const at0 = Date.UTC(2024, 0, 1);
  let balance = 0;
  sqlite.transaction(() => {
    for (let i = 0; i < ENTRIES; i++) {
      const isRefund = i % 3 === 2;
      const cents = isRefund ? -1_500 : 1_500;
      const entrySite = i % 10 === 9 ? other.siteId : siteId;
      if (entrySite === siteId) balance += cents;
      insert.run(`b${i}`, entrySite, isRefund ? "refund" : "charge", cents, `S-${i >> 1}`, dbTime(new Date(at0 + i * 30_000)), "bench");
    }
  })();
  sqlite.prepare(`UPDATE "Site" SET "depositBalanceCents" = ? WHERE "id" = ?`).run(balance, siteId);

  process.env.DATABASE_URL = `file:${dbFile}`;
  const { depositBalance } = await import("@/lib/db/deposits");
  const { db } = await import("@/lib/db/client");
  const actor = actorFor(organisationId, siteId);
  for (let i = 0; i < 50; i++) await depositBalance(actor, siteId); // warm up
  const times: number[] = [];
  let balanceCents = 0;
  for (let i = 0; i < 500; i++) {
    const t0 = performance.now();
    balanceCents = await depositBalance(actor, siteId);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);

  const sum = sqlite.prepare(`SELECT SUM("amountCents") AS s FROM "DepositEntry" WHERE "siteId" = ?`);
  const rawTimes: number[] = [];
  let sumCents = 0;
  for (let i = 0; i < 5; i++) {
    const t0 = performance.now();
    sumCents = (sum.get(siteId) as { s: number }).s;
    rawTimes.push(performance.now() - t0);
  }
  const prismaTimes: number[] = [];
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    await db().depositEntry.aggregate({ where: { siteId }, _sum: { amountCents: true } });
    prismaTimes.push(performance.now() - t0);
  }
  sqlite.close();
  await db().$disconnect();
  const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
  return { fnMedianMs: median(times), fnP99Ms: times[Math.floor(times.length * 0.99)]!, rawSumMs: median(rawTimes), prismaSumMs: median(prismaTimes), balanceCents, sumCents };
}

const caseArg = process.argv.indexOf("--case");
if (caseArg !== -1) {
  const [kind, dbFile, csv] = process.argv.slice(caseArg + 1);
  const run = kind === "import" ? await runImport(dbFile!, csv!) : kind === "floor" ? await runFloor(dbFile!, csv!) : await runBalance(dbFile!);
  process.stdout.write(JSON.stringify(run));
  process.exit(0);
} else {
  const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-bench-deposits-"));
  try {
    const started = Date.now();
    const csv = path.join(dir, "sales.csv");
    const bytes = await writeSalesFile(csv, ROWS);
    const template = path.join(dir, "template.db");
    const { applyMigrations } = await import("@/lib/db/migrate");
    await applyMigrations({ provider: "sqlite", url: `file:${template}` });
    const self = fileURLToPath(import.meta.url);
    let copies = 0;
    const child = <T>(kind: string): T => {
      const dbFile = path.join(dir, `round-${copies++}.db`);
      copyFileSync(template, dbFile);
      const out = spawnSync(process.execPath, [...process.execArgv, self, "--case", kind, dbFile, csv], { encoding: "utf8", maxBuffer: 16 * MIB });
      if (out.status !== 0) throw new Error(`${kind} round failed: ${out.stderr}`);
      rmSync(dbFile, { force: true });
      return JSON.parse(out.stdout) as T;
    };
    const runs: Record<"floor" | "import", TRun[]> = { floor: [], import: [] };
    for (let r = 0; r < ROUNDS; r++) {
      runs.floor.push(child<TRun>("floor"));
      runs.import.push(child<TRun>("import"));
    }
    const balance = child<TBalance>("balance");

    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    const fmt = (n: number, d = 0) => n.toLocaleString("en-US", { minimumFractionDigits: d, maximumFractionDigits: d });
    const line = (name: string, rs: TRun[]) => {
      const ms = median(rs.map((r) => r.ms));
      const rss = Math.max(...rs.map((r) => r.peakRssMiB));
      return `${name.padEnd(44)} ${fmt(ms).padStart(7)} ms  ${fmt((ROWS / ms) * 1000).padStart(8)} rows/s   peak RSS ${fmt(rss).padStart(4)} MiB`;
    };
    const importMs = median(runs.import.map((r) => r.ms));
    const floorMs = median(runs.floor.map((r) => r.ms));
    const importRss = Math.max(...runs.import.map((r) => r.peakRssMiB));
    console.log(`\nbench:deposits on sqlite, ${os.cpus().length} cores, median of ${ROUNDS} rounds (each a fresh process and database)`);
    console.log(`\nimport of ${fmt(ROWS)} sales lines (${fmt(bytes / MIB, 1)} MiB)`);
    console.log(line("floor: papaparse + raw better-sqlite3", runs.floor));
    console.log(line("importSales (check and store, one tx)", runs.import));
    console.log(`import / floor = ${(importMs / floorMs).toFixed(2)}×`);
    console.log(`import time ${fmt(importMs)} ms (target ≤ ${fmt(IMPORT_TARGET_MS)} ms): ${importMs <= IMPORT_TARGET_MS ? "met" : "NOT met"}`);
    console.log(`import peak RSS ${fmt(importRss)} MiB (target < ${RSS_TARGET_MIB} MiB): ${importRss < RSS_TARGET_MIB ? "met" : "NOT met"}`);

    console.log(`\nbalance of a store with ${fmt(ENTRIES * 0.9)} of ${fmt(ENTRIES)} ledger entries`);
    console.log(`${"baseline: SUM over its entries, raw".padEnd(44)} ${fmt(balance.rawSumMs, 2).padStart(9)} ms`);
    console.log(`${"baseline: SUM over its entries, Prisma".padEnd(44)} ${fmt(balance.prismaSumMs, 2).padStart(9)} ms`);
    console.log(`${"depositBalance (the site row)".padEnd(44)} ${fmt(balance.fnMedianMs, 2).padStart(9)} ms median, p99 ${fmt(balance.fnP99Ms, 2)} ms`);
    console.log(`the row and the sum agree: ${balance.balanceCents === balance.sumCents ? "yes" : `NO (${balance.balanceCents} vs ${balance.sumCents})`}`);
    console.log(`balance ${fmt(balance.fnMedianMs, 2)} ms median (target ≤ ${BALANCE_TARGET_MS} ms): ${balance.fnMedianMs <= BALANCE_TARGET_MS ? "met" : "NOT met"}`);
    const [load1] = os.loadavg();
    console.log(`
load average at the end ${load1!.toFixed(1)} on ${os.cpus().length} cores: figures of a busy machine run slow against an idle one; compare the ratios`);
    console.log(`\nwhole run ${fmt((Date.now() - started) / 1000, 1)} s`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
