/**
 * `npm run test:crash [-- --db sqlite|pg]`: intake survives `kill -9` of the server, on SQLite and PostgreSQL
 * (both by default). For each database:
 *   1. a fresh, migrated database with a store and a clerk's API key; the built app serving it;
 *   2. `--workers` client loops send intakes without pause, each with its own Idempotency-Key, recording
 *      which got a 201 and with which unit id;
 *   3. in the middle (a random moment after the first `--kill-after` 201s) the server gets SIGKILL;
 *   4. the server is started again, and every request that got no answer (or no 201) is sent again with the
 *      same key and body;
 *   5. then: every unit answered 201 is stored exactly once; a retried key whose first request had committed
 *      answers with that same unit (a replay) and adds nothing; units = keys sent, and the site's totals,
 *      trail events and level changes agree with them (recount within 1e-6 kg).
 * Exits 1 on any failed check. Loopback only; every loop is bounded in count and time.
 */
import { randomUUID } from "node:crypto";
import net from "node:net";
import { buildIfNeeded } from "../../scripts/build-if-needed";
import type { TDatabaseProvider } from "../../lib/db/migrate";
import {
  check,
  createDb,
  eachLimited,
  intakeBody,
  killAllApps,
  ledgerChecks,
  makeIntakeSite,
  newAuthSecret,
  postIntake,
  printChecks,
  readLedger,
  redactUrl,
  scratchDatabase,
  startApp,
  type TApp,
  type TCheck,
} from "./harness";

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1]! : fallback;
}

const DB = option("db", "both");
const WORKERS = Number(option("workers", "8"));
const KILL_AFTER = Number(option("kill-after", "100"));
const MAX_REQUESTS = Number(option("max-requests", "20000"));
const MAX_SECONDS = Number(option("max-seconds", "300"));

type TRecord = { key: string; body: string; answer?: Awaited<ReturnType<typeof postIntake>>; retry?: Awaited<ReturnType<typeof postIntake>> };

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

async function crashRun(provider: TDatabaseProvider): Promise<boolean> {
  const label = provider === "sqlite" ? "SQLite" : "PostgreSQL";
  console.log(`\n=== crash check on ${label} ===`);
  const scratch = await scratchDatabase(provider);
  console.log(`Database: ${redactUrl(scratch.url)}`);
  const client = createDb(scratch.url);
  const apps: TApp[] = [];
  try {
    const site = await makeIntakeSite(client);
    const port = await freePort();
    const secret = newAuthSecret();
    const first = await startApp({ port, url: scratch.url, dataDir: scratch.dataDir, secret });
    apps.push(first);

    const records: TRecord[] = [];
    let created = 0;
    let isKilled = false;
    const deadline = Date.now() + MAX_SECONDS * 1000;
    const worker = async () => {
      // Each loop stops at its first request without an answer after the kill (or at the bounds).
      while (records.length < MAX_REQUESTS && Date.now() < deadline) {
        const key = `crash-${randomUUID()}`;
        const record: TRecord = { key, body: intakeBody(site.siteId, records.length, key) };
        records.push(record);
        record.answer = await postIntake({ baseUrl: first.baseUrl, key: site.key, idempotencyKey: key, body: record.body, timeoutMs: 15_000 });
        if (record.answer?.status === 201) created++;
        if (isKilled && record.answer === null) return;
      }
    };
    const killer = async () => {
      while (created < KILL_AFTER && Date.now() < deadline) await sleep(20);
      // A random moment, so the kill lands at different points of the transactions from run to run.
      await sleep(200 + Math.random() * 1500);
      isKilled = true;
      first.kill("SIGKILL");
      console.log(`kill -9 ${first.pid} after ${created} intakes answered 201 (${records.length} sent): ${await first.exited}`);
    };
    await Promise.all([killer(), ...Array.from({ length: WORKERS }, worker)]);

    const answered = records.filter((r) => r.answer?.status === 201 && r.answer.unitId);
    const unanswered = records.filter((r) => !(r.answer?.status === 201 && r.answer.unitId));
    const otherStatuses = records.filter((r) => r.answer && r.answer.status !== 201).map((r) => r.answer!.status);
    // Which of the unanswered keys committed before the crash: their idempotency record is there.
    const committed = new Set(
      (await client.idempotencyKey.findMany({ where: { scope: site.idempotencyScope, key: { in: unanswered.map((r) => r.key) } }, select: { key: true } })).map((row) => row.key),
    );
    console.log(
      `before the restart: ${answered.length} answered 201, ${unanswered.length} without a 201 (${otherStatuses.length ? `statuses ${otherStatuses.join(", ")}; ` : ""}${committed.size} of them had committed)`,
    );

    const second = await startApp({ port, url: scratch.url, dataDir: scratch.dataDir, secret });
    apps.push(second);
    await eachLimited(unanswered, 4, async (record) => {
      for (let attempt = 1; attempt <= 3 && record.retry?.status !== 201; attempt++) {
        record.retry = await postIntake({ baseUrl: second.baseUrl, key: site.key, idempotencyKey: record.key, body: record.body });
      }
    });
    await second.stop();

    const answeredIds = answered.map((r) => r.answer!.unitId!);
    let storedAnswered = 0;
    for (let i = 0; i < answeredIds.length; i += 500) {
      storedAnswered += await client.unit.count({ where: { id: { in: answeredIds.slice(i, i + 500) } } });
    }
    const retried = unanswered;
    const retriedOk = retried.filter((r) => r.retry?.status === 201 && r.retry.unitId);
    const committedRetries = retried.filter((r) => committed.has(r.key));
    const storedBodies = new Map(
      (await client.idempotencyKey.findMany({ where: { scope: site.idempotencyScope, key: { in: committedRetries.map((r) => r.key) } } })).map((row) => [
        row.key,
        (JSON.parse(row.body) as { unit: { id: string } }).unit.id,
      ]),
    );
    const replayedSame = committedRetries.filter((r) => r.retry?.isReplay && r.retry.unitId === storedBodies.get(r.key)).length;
    const allIds = [...answeredIds, ...retriedOk.map((r) => r.retry!.unitId!)];
    const ledger = await readLedger(client, site);

    const checks: TCheck[] = [
      check("the kill landed mid-stream (intakes answered before it)", answered.length >= KILL_AFTER, `${answered.length}`),
      check("every unit answered 201 before the kill is stored", storedAnswered === answeredIds.length, `${storedAnswered} of ${answeredIds.length}`),
      check("every retried key answered 201 after the restart", retriedOk.length === retried.length, `${retriedOk.length} of ${retried.length}`),
      check("a retried key that had committed answered with its first unit, as a replay", replayedSame === committedRetries.length, `${replayedSame} of ${committedRetries.length}`),
      check("one unit per key: every unit id answered is distinct", new Set(allIds).size === records.length, `${new Set(allIds).size} ids for ${records.length} keys`),
      ...ledgerChecks(ledger, records.length),
    ];
    return printChecks(`${label}: ${records.length} keys, ${answered.length} answered before the kill, ${retried.length} retried`, checks);
  } finally {
    for (const app of apps) await app.stop();
    await client.$disconnect();
    await scratch.drop();
  }
}

async function main(): Promise<number> {
  const providers: TDatabaseProvider[] = DB === "both" ? ["sqlite", "postgresql"] : DB === "sqlite" ? ["sqlite"] : DB === "pg" || DB === "postgresql" ? ["postgresql"] : [];
  if (providers.length === 0) throw new Error(`--db must be sqlite, pg or both, got ${DB}`);
  buildIfNeeded();
  const watchdog = setTimeout(() => {
    console.error(`\ntest:crash FAILED: not finished within ${2 * MAX_SECONDS} s per database`);
    killAllApps();
    process.exit(1);
  }, providers.length * 2 * MAX_SECONDS * 1000);
  const results: [string, boolean][] = [];
  for (const provider of providers) results.push([provider, await crashRun(provider)]);
  clearTimeout(watchdog);
  console.log(`\ntest:crash ${results.map(([p, ok]) => `${p} ${ok ? "passed" : "FAILED"}`).join(", ")}`);
  return results.every(([, ok]) => ok) ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(`test:crash failed: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  },
);
