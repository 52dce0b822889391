/**
 * `npm run test:scale`: two instances of the built app on one PostgreSQL database, taking intakes at once.
 *   1. a fresh database (on the server of TEST_DATABASE_URL, or a throwaway one), migrated; an organisation,
 *      a store and a clerk's API key made in it;
 *   2. two app instances (ports 3000 and 3001; `--ports a,b`), sharing the database and the session secret;
 *   3. 20 000 intakes (`--count`) split across both with autocannon, each with its own Idempotency-Key;
 *      any key that got no 201 is sent again with the same key;
 *   4. a sample of keys (`--replays`) sent again to the OTHER instance: each must answer with the unit it
 *      first created, marked as a replay; and `--race` new keys, each sent to both instances at the same
 *      moment (on a second store): exactly one unit per key;
 *   5. then: units = 20 000 (none lost, none duplicated), the site's running totals = a recount of its units
 *      (within 1e-6 kg), trail events = level changes = idempotency records = 20 000.
 * Prints the throughput of each instance and of both. Exits 1 on any failed check. Loopback only; bounded by
 * `--max-seconds` (default 900).
 */
import { randomUUID } from "node:crypto";
import os from "node:os";
import autocannon from "autocannon";
import { buildIfNeeded } from "../../scripts/build-if-needed";
import {
  assertPortsFree,
  check,
  createDb,
  eachLimited,
  intakeBody,
  intakeHeaders,
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
  type TIntakeSite,
} from "./harness";

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1]! : (process.env[`SCALE_${name.toUpperCase().replaceAll("-", "_")}`] ?? fallback);
}

const PORTS = option("ports", "3000,3001").split(",").map(Number);
const COUNT = Number(option("count", "20000"));
const CONNECTIONS = Number(option("connections", "8"));
const REPLAYS = Number(option("replays", "1000"));
const RACE = Number(option("race", "200"));
const MAX_SECONDS = Number(option("max-seconds", "900"));

type TSent = { key: string; body: string };
type TInstanceRun = { app: TApp; sent: TSent[]; unitByKey: Map<string, string>; statuses: Map<string, number>; seconds: number; topUps: number };

/** One instance's share through autocannon; records the unit id of every key answered 201. */
async function drive(app: TApp, site: TIntakeSite, sent: TSent[]): Promise<TInstanceRun> {
  const unitByKey = new Map<string, string>();
  const statuses = new Map<string, number>();
  let next = 0;
  const started = performance.now();
  const result = await autocannon({
    url: `${app.baseUrl}/api/v1/units`,
    method: "POST",
    connections: Math.min(CONNECTIONS, sent.length),
    // Exactly one request per prepared key: autocannon builds a request only just before writing it.
    amount: sent.length,
    timeout: 30,
    requests: [
      {
        setupRequest: (req) => {
          const item = sent[next++]!;
          return { ...req, method: "POST", headers: intakeHeaders(site.key, item.key), body: item.body };
        },
        onResponse: (status, body) => {
          statuses.set(String(status), (statuses.get(String(status)) ?? 0) + 1);
          if (status !== 201) return;
          try {
            const { unit } = JSON.parse(body) as { unit: { id: string; note: string } };
            unitByKey.set(unit.note, unit.id);
          } catch {
            statuses.set("unparsed 201", (statuses.get("unparsed 201") ?? 0) + 1);
          }
        },
      },
    ],
  });
  const seconds = (performance.now() - started) / 1000;
  if (result.errors) statuses.set("no response", result.errors);
  // Keys that got no 201 (an error, a timeout, a non-201): the same key again, as a client would.
  let topUps = 0;
  await eachLimited(
    sent.filter((s) => !unitByKey.has(s.key)),
    4,
    async (s) => {
      for (let attempt = 1; attempt <= 3 && !unitByKey.has(s.key); attempt++) {
        topUps++;
        const answer = await postIntake({ baseUrl: app.baseUrl, key: site.key, idempotencyKey: s.key, body: s.body });
        if (answer?.status === 201 && answer.unitId) unitByKey.set(s.key, answer.unitId);
      }
    },
  );
  return { app, sent, unitByKey, statuses, seconds, topUps };
}

async function main(): Promise<number> {
  if (PORTS.length !== 2 || PORTS.some((p) => !Number.isInteger(p) || p <= 0)) throw new Error(`--ports needs two port numbers, got ${option("ports", "")}`);
  await assertPortsFree(PORTS);
  buildIfNeeded();
  const scratch = await scratchDatabase("postgresql");
  console.log(`Database: ${redactUrl(scratch.url)}`);
  const client = createDb(scratch.url);
  const apps: TApp[] = [];
  const watchdog = setTimeout(() => {
    console.error(`\ntest:scale FAILED: not finished within ${MAX_SECONDS} s`);
    killAllApps();
    process.exit(1);
  }, MAX_SECONDS * 1000);
  try {
    const site = await makeIntakeSite(client);
    const raceSite = await makeIntakeSite(client);
    const secret = newAuthSecret();
    apps.push(...(await Promise.all(PORTS.map((port) => startApp({ port, url: scratch.url, dataDir: scratch.dataDir, secret })))));
    console.log(`Instances: ${apps.map((a) => `${a.baseUrl} (pid ${a.pid})`).join(", ")}`);
    // Warm both up (first requests load the route modules and open the pools) without writing units.
    await Promise.all(apps.map((app) => autocannon({ url: `${app.baseUrl}/api/v1/sites/${site.siteId}/totals`, headers: { authorization: `Bearer ${site.key}` }, amount: 100, connections: 4 })));

    const shares = apps.map((_, i) => Math.floor(COUNT / apps.length) + (i < COUNT % apps.length ? 1 : 0));
    let n = 0;
    const plans: TSent[][] = shares.map((share, i) =>
      Array.from({ length: share }, () => {
        const key = `scale-${i}-${randomUUID()}`;
        return { key, body: intakeBody(site.siteId, n++, key) };
      }),
    );
    console.log(`\nSending ${COUNT.toLocaleString("en-US")} intakes (${shares.join(" + ")}), ${CONNECTIONS} connections per instance…`);
    const started = performance.now();
    const runs = await Promise.all(apps.map((app, i) => drive(app, site, plans[i]!)));
    const wallSeconds = (performance.now() - started) / 1000;

    // The other instance gets a sample of each instance's keys again.
    const replayChecks = { total: 0, sameUnit: 0, markedReplay: 0 };
    const samples = runs.flatMap((run, i) => run.sent.slice(0, Math.floor(REPLAYS / runs.length)).map((s) => ({ s, from: run, to: apps[(i + 1) % apps.length]! })));
    await eachLimited(samples, 8, async ({ s, from, to }) => {
      const answer = await postIntake({ baseUrl: to.baseUrl, key: site.key, idempotencyKey: s.key, body: s.body });
      replayChecks.total++;
      if (answer?.status === 201 && answer.unitId === from.unitByKey.get(s.key)) replayChecks.sameUnit++;
      if (answer?.isReplay) replayChecks.markedReplay++;
    });

    // New keys sent to both instances at the same moment: one creates, the other must answer with that unit.
    const race = { pairs: 0, sameUnit: 0, oneCreated: 0 };
    await eachLimited(
      Array.from({ length: RACE }, (_, i) => i),
      8,
      async (i) => {
        const key = `race-${randomUUID()}`;
        const body = intakeBody(raceSite.siteId, i, key);
        const answers = await Promise.all(apps.map((app) => postIntake({ baseUrl: app.baseUrl, key: raceSite.key, idempotencyKey: key, body })));
        race.pairs++;
        if (answers.every((a) => a?.status === 201 && a.unitId && a.unitId === answers[0]?.unitId)) race.sameUnit++;
        if (answers.filter((a) => a && !a.isReplay).length === 1) race.oneCreated++;
      },
    );

    for (const app of apps) await app.stop();
    const ledger = await readLedger(client, site);
    const raceLedger = await readLedger(client, raceSite);

    console.log(`\ntest:scale on PostgreSQL, ${os.cpus().length} cores, load average ${os.loadavg().map((l) => l.toFixed(2)).join(" ")}`);
    for (const run of runs) {
      const created = [...run.sent].filter((s) => run.unitByKey.has(s.key)).length;
      console.log(
        `  instance :${run.app.port}  ${run.sent.length.toLocaleString("en-US")} intakes in ${run.seconds.toFixed(1)} s = ${(run.sent.length / run.seconds).toFixed(0)} intakes/s` +
          `   first answers ${[...run.statuses].map(([s, c]) => `${s}×${c}`).join(", ")}; sent again ${run.topUps}; 201 for ${created}`,
      );
    }
    console.log(`  both        ${COUNT.toLocaleString("en-US")} intakes in ${wallSeconds.toFixed(1)} s = ${(COUNT / wallSeconds).toFixed(0)} intakes/s`);

    const firstTryErrors = runs.reduce((sum, run) => sum + [...run.statuses].filter(([s]) => s !== "201").reduce((a, [, c]) => a + c, 0), 0);
    const checks: TCheck[] = [
      check("every key answered 201 with a unit id", runs.every((run) => run.sent.every((s) => run.unitByKey.has(s.key))), `${runs.reduce((a, r) => a + r.unitByKey.size, 0)} of ${COUNT}`),
      check("every first attempt answered 201", firstTryErrors === 0, `${firstTryErrors} did not`),
      check("every unit id answered is distinct", new Set(runs.flatMap((r) => [...r.unitByKey.values()])).size === COUNT),
      check(`re-sent to the other instance: the same unit, marked as a replay`, replayChecks.sameUnit === replayChecks.total && replayChecks.markedReplay === replayChecks.total, `${replayChecks.sameUnit} same unit, ${replayChecks.markedReplay} marked, of ${replayChecks.total}`),
      ...ledgerChecks(ledger, COUNT),
    ];
    const raceChecks: TCheck[] = [
      check("both instances answered 201 with the same unit", race.sameUnit === race.pairs, `${race.sameUnit} of ${race.pairs}`),
      check("exactly one of each pair created it", race.oneCreated === race.pairs, `${race.oneCreated} of ${race.pairs}`),
      ...ledgerChecks(raceLedger, RACE),
    ];
    const isMainOk = printChecks(`Main store (${COUNT} intakes)`, checks);
    const isRaceOk = printChecks(`Race store (${RACE} keys, each sent to both instances at once)`, raceChecks);
    const isOk = isMainOk && isRaceOk;
    console.log(`\ntest:scale ${isOk ? "passed" : "FAILED"}`);
    return isOk ? 0 : 1;
  } finally {
    clearTimeout(watchdog);
    for (const app of apps) await app.stop();
    await client.$disconnect();
    await scratch.drop();
  }
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(`test:scale failed: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  },
);
