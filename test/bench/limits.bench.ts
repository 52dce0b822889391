/**
 * `npm run bench:limits`: the limits and annual figures of the built app on a large database — 1 000 000 units and
 * 50 000 containers across 20 sites, one busy site with about 200 000 level changes in a year — beside a
 * full-recount baseline measured in the same run: the same figures recomputed by scanning every unit of the site
 * (in a child process, so its memory is its own). Targets: limits ≤ 20 ms, annual figures ≤ 1 s, server RSS ≤ 400 MB.
 * BENCH_UNITS scales the data down for a quick look (e.g. BENCH_UNITS=100000).
 */
import { spawn, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import { annualFigures, type TLevelEvent } from "../../lib/annual/annual-figures";
import { newApiKey } from "../../lib/auth/api-keys";
import { evaluateLimits, HISTORY_WINDOW_DAYS } from "../../lib/limits/evaluate-limits";
import { getRulebook } from "../../lib/rules/rulebooks";

const root = path.resolve(import.meta.dirname, "../..");
const DAY = 86_400_000;
const SITES = 20;
const CONTAINERS_PER_SITE = 2_500;
const ON_SITE_CONTAINERS = 100;
const LOOSE_PER_SITE = 300;
const PORT = Number(process.env.BENCH_PORT ?? 3220);

/** Prisma's better-sqlite3 adapter stores DateTime as ISO 8601 text with "+00:00"; range queries compare that text. */
const iso = (ms: number) => new Date(ms).toISOString().replace("Z", "+00:00");

type TUnitRow = { batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };
/** Invented per-unit figures of the engine's order (a 12 V flooded unit and its neighbours); deterministic by index. */
const unitFigures = (i: number): TUnitRow => {
  const k = 0.8 + ((i * 7919) % 400) / 1000;
  return { batteryKg: 18 * k, leadKg: 11.2 * k, electrolyteKg: 4.3 * k, acidKg: 1.6 * k };
};

// ---------------------------------------------------------------------------------------------------------------
// Baseline mode: the same figures by scanning every unit of the site (run as a child process).
if (process.argv[2] === "--baseline") {
  const [file, siteId, yearText] = process.argv.slice(3) as [string, string, string];
  const sql = new Database(file, { readonly: true });
  const year = Number(yearText);
  const site = sql.prepare(`SELECT * FROM "Site" WHERE "id" = ?`).get(siteId) as { rulebookId: string; isConsumerExempt: number; peakYear: number; peakBatteryKg: number };
  // Every unit with the departure time of the load its container left on, if any.
  const scan = sql.prepare(`SELECT u."state", u."condition", u."containerId", u."receivedAt", u."batteryKg", u."leadKg", u."electrolyteKg", u."acidKg", l."departedAt"
    FROM "Unit" u LEFT JOIN "Container" c ON c."id" = u."containerId" LEFT JOIN "Load" l ON l."id" = c."loadId" WHERE u."siteId" = ?`);
  const containers = sql.prepare(`SELECT "id", "labelNumber", "accumulationStart", "state", "isClosed" FROM "Container" WHERE "siteId" = ?`);
  type TScanned = { state: string; condition: string; containerId: string | null; receivedAt: string; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number; departedAt: string | null };

  const limitsOnce = () => {
    const asOf = new Date();
    const from = asOf.getTime() - HISTORY_WINDOW_DAYS * DAY;
    const totals = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };
    const net = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };
    const damaged = new Set<string>();
    const add = (t: typeof totals, u: TScanned, sign: number) => {
      t.unitCount += sign;
      t.batteryKg += sign * u.batteryKg;
      t.leadKg += sign * u.leadKg;
      t.electrolyteKg += sign * u.electrolyteKg;
      t.acidKg += sign * u.acidKg;
    };
    for (const u of scan.iterate(siteId) as Iterable<TScanned>) {
      if (u.state === "received" || u.state === "stowed" || u.state === "loaded") {
        add(totals, u, 1);
        if (u.containerId && (u.condition === "leaking" || u.condition === "cracked")) damaged.add(u.containerId);
      }
      const received = Date.parse(u.receivedAt);
      if (received > from && received <= asOf.getTime()) add(net, u, 1);
      const departed = u.departedAt ? Date.parse(u.departedAt) : Number.NaN;
      if (departed > from && departed <= asOf.getTime()) add(net, u, -1);
    }
    const rows = (containers.all(siteId) as { id: string; labelNumber: string; accumulationStart: string | null; state: string; isClosed: number }[]).map((c) => ({
      id: c.id,
      labelNumber: c.labelNumber,
      accumulationStart: c.accumulationStart ? new Date(c.accumulationStart) : null,
      state: c.state,
      isClosed: c.isClosed === 1,
      hasLeaking: damaged.has(c.id),
    }));
    return evaluateLimits({
      rulebook: getRulebook(site.rulebookId),
      totals,
      containers: rows,
      history: { netChangeLast28Days: net },
      asOf,
      site: { isConsumerExempt: site.isConsumerExempt === 1, peakYear: site.peakYear, peakBatteryKg: site.peakBatteryKg },
    });
  };
  const annualOnce = () => {
    const events: TLevelEvent[] = [];
    for (const u of scan.iterate(siteId) as Iterable<TScanned>) {
      events.push({ at: new Date(u.receivedAt), batteryKg: u.batteryKg, leadKg: u.leadKg, acidKg: u.acidKg, unitCount: 1 });
      if (u.departedAt) events.push({ at: new Date(u.departedAt), batteryKg: -u.batteryKg, leadKg: -u.leadKg, acidKg: -u.acidKg, unitCount: -1 });
    }
    return annualFigures({ events, year, siteId });
  };
  const time = <T,>(runs: number, fn: () => T) => {
    const samples: number[] = [];
    let last: T | undefined;
    for (let i = 0; i < runs; i++) {
      const t0 = performance.now();
      last = fn();
      samples.push(performance.now() - t0);
    }
    samples.sort((a, b) => a - b);
    return { p50: samples[Math.floor(runs / 2)]!, last: last! };
  };
  const limits = time(5, limitsOnce);
  const annual = time(3, annualOnce);
  const hwm = /VmHWM:\s+(\d+) kB/.exec(readFileSync("/proc/self/status", "utf8"))?.[1];
  process.stdout.write(
    JSON.stringify({
      limitsMs: limits.p50,
      annualMs: annual.p50,
      rssMb: Number(hwm) / 1024,
      status: limits.last.status,
      battery: annual.last.substances.find((s) => s.substance === "battery")!.maxDailyKg,
      eventCount: annual.last.eventCount,
    }),
  );
  process.exit(0);
}

// ---------------------------------------------------------------------------------------------------------------
const TOTAL_UNITS = Number(process.env.BENCH_UNITS ?? 1_000_000);
const BUSY_UNITS = Math.round(TOTAL_UNITS / 5);
const started = Date.now();
const now = Date.now();
const year = new Date(now).getUTCFullYear() - 1; // the last complete calendar year
const yearStart = Date.UTC(year, 0, 1);
const yearEnd = Date.UTC(year + 1, 0, 1);

const tmp = mkdtempSync(path.join(os.tmpdir(), "leadger-bench-limits-"));
const file = path.join(tmp, "bench.db");
const url = `file:${file}`;
// Removed however the run ends (a failed build exits the process from inside buildIfNeeded).
process.on("exit", () => rmSync(tmp, { recursive: true, force: true }));

async function seed() {
  const { applyMigrations } = await import("../../lib/db/migrate/migrations");
  await applyMigrations({ provider: "sqlite", url });
  const sql = new Database(file);
  // Bulk load only: the server reopens the file with WAL and normal syncs.
  sql.pragma("journal_mode = OFF");
  sql.pragma("synchronous = OFF");
  sql.pragma("cache_size = -200000");
  const created = iso(now - 800 * DAY);
  const orgId = "bench-org";
  sql.prepare(`INSERT INTO "Organisation" ("id","name","createdAt") VALUES (?,?,?)`).run(orgId, "Bench organisation", created);
  sql.prepare(`INSERT INTO "Facility" ("id","organisationId","name","address","createdAt") VALUES (?,?,?,?,?)`).run("bench-fac", orgId, "Bench smelter", "1 Furnace Road", created);
  const insertSite = sql.prepare(`INSERT INTO "Site" ("id","organisationId","name","kind","createdAt","unitCount","batteryKg","leadKg","electrolyteKg","acidKg","peakYear","peakBatteryKg") VALUES (?,?,?,?,?,?,?,?,?,?,?,?)`);
  const insertBay = sql.prepare(`INSERT INTO "Bay" ("id","siteId","name","createdAt","unitCount","batteryKg","leadKg","electrolyteKg","acidKg") VALUES (?,?,?,?,?,?,?,?,?)`);
  const insertLoad = sql.prepare(`INSERT INTO "Load" ("id","siteId","facilityId","reference","state","departedAt","createdAt") VALUES (?,?,?,?,?,?,?)`);
  const insertContainer = sql.prepare(`INSERT INTO "Container" ("id","siteId","bayId","labelNumber","kind","isClosed","state","accumulationStart","sealedAt","loadId","createdAt","unitCount","batteryKg","leadKg","electrolyteKg","acidKg") VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?,?,?,?)`);
  const insertUnit = sql.prepare(`INSERT INTO "Unit" ("id","siteId","containerId","kind","nominalVoltage","capacityAh","condition","source","state","receivedAt","receivedBy","method",
    "batteryKg","batteryKgLow","batteryKgHigh","leadKg","leadKgLow","leadKgHigh","electrolyteKg","electrolyteKgLow","electrolyteKgHigh","acidKg","acidKgLow","acidKgHigh","polymerKg","otherKg")
    VALUES (?,?,?,'flooded',12,60,?,'fleet',?,?,'bench','weighed',?,?,?,?,?,?,?,?,?,?,?,?,1.2,0.9)`);
  const insertLevel = sql.prepare(`INSERT INTO "LevelChange" ("id","siteId","at","reason","refId","unitCount","batteryKg","leadKg","electrolyteKg","acidKg") VALUES (?,?,?,?,?,?,?,?,?,?)`);
  const keys: string[] = [];
  const siteIds: string[] = [];

  for (let s = 0; s < SITES; s++) {
    const siteId = `bench-site-${String(s).padStart(2, "0")}`;
    siteIds.push(siteId);
    const count = s === 0 ? BUSY_UNITS : Math.floor((TOTAL_UNITS - BUSY_UNITS) / (SITES - 1)) + (s === SITES - 1 ? (TOTAL_UNITS - BUSY_UNITS) % (SITES - 1) : 0);
    // Receipt times: the busy site takes almost all of its units in the benchmark year (its 200 000 events); the
    // others spread theirs over about two years. The newest 1 % arrive in the last 60 days.
    const recent = Math.round(count * 0.01);
    const span = s === 0 ? { from: yearStart, to: yearEnd - 3 * DAY } : { from: now - 760 * DAY, to: now - 60 * DAY };
    const receivedAt = (i: number) => (i < count - recent ? span.from + ((span.to - span.from) * i) / (count - recent) : now - 60 * DAY + (60 * DAY * (i - (count - recent) + 1)) / (recent + 1));
    const inContainers = count - LOOSE_PER_SITE;
    const departedContainers = CONTAINERS_PER_SITE - ON_SITE_CONTAINERS;
    const onSiteUnits = Math.min(inContainers, ON_SITE_CONTAINERS * 20);
    const perDeparted = (inContainers - onSiteUnits) / departedContainers;
    const bays = [0, 1, 2, 3].map((b) => ({ id: `${siteId}-bay-${b}`, unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 }));
    const totals = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };
    let peak = 0;

    sql.exec("BEGIN");
    insertSite.run(siteId, orgId, `Bench site ${s}`, "yard", created, 0, 0, 0, 0, 0, 0, 0);
    for (const b of bays) insertBay.run(b.id, siteId, `Bay ${b.id.slice(-1)}`, created, 0, 0, 0, 0, 0);
    // Departed containers first, each with the units that filled it and a load that took it away a week later.
    let u = 0;
    const levels: [number, number, TUnitRow & { unitCount: number }, string][] = [];
    for (let c = 0; c < CONTAINERS_PER_SITE; c++) {
      const id = `${siteId}-c${String(c).padStart(5, "0")}`;
      const isOnSite = c >= departedContainers;
      const take = isOnSite ? Math.floor(onSiteUnits / ON_SITE_CONTAINERS) + (c === CONTAINERS_PER_SITE - 1 ? onSiteUnits % ON_SITE_CONTAINERS : 0) : Math.floor(perDeparted * (c + 1)) - Math.floor(perDeparted * c);
      const first = u;
      const sum = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };
      const isClosed = c % 10 === 0;
      const lastAt = receivedAt(first + take - 1);
      const departedAt = Math.min(now - DAY, lastAt + 7 * DAY);
      const loadId = isOnSite ? null : `${id}-load`;
      if (loadId) insertLoad.run(loadId, siteId, "bench-fac", `L-${c}`, "delivered", iso(departedAt), iso(departedAt));
      const state = isOnSite ? (c % 3 === 0 ? "sealed" : "open") : "delivered";
      const bay = bays[c % 4]!;
      insertContainer.run(id, siteId, isOnSite ? bay.id : null, `PAL-${String(c).padStart(5, "0")}`, isClosed ? "drum" : "pallet", isClosed ? 1 : 0, state, take ? iso(receivedAt(first)) : null, null, loadId, created, 0, 0, 0, 0, 0);
      for (let k = 0; k < take; k++, u++) {
        const f = unitFigures(u);
        const at = receivedAt(u);
        const condition = isClosed && k % 7 === 0 ? "leaking" : "intact";
        const lo = 0.9;
        const hi = 1.1;
        insertUnit.run(`${siteId}-u${String(u).padStart(7, "0")}`, siteId, id, condition, isOnSite ? "stowed" : "delivered", iso(at), f.batteryKg, f.batteryKg, f.batteryKg, f.leadKg, f.leadKg * lo, f.leadKg * hi, f.electrolyteKg, f.electrolyteKg * lo, f.electrolyteKg * hi, f.acidKg, f.acidKg * lo, f.acidKg * hi);
        levels.push([at, 1, { unitCount: 1, ...f }, `${siteId}-u${String(u).padStart(7, "0")}`]);
        for (const key of ["batteryKg", "leadKg", "electrolyteKg", "acidKg"] as const) sum[key] += f[key];
        sum.unitCount++;
      }
      if (isOnSite) {
        sql.prepare(`UPDATE "Container" SET "unitCount" = ?, "batteryKg" = ?, "leadKg" = ?, "electrolyteKg" = ?, "acidKg" = ? WHERE "id" = ?`).run(sum.unitCount, sum.batteryKg, sum.leadKg, sum.electrolyteKg, sum.acidKg, id);
        for (const key of ["unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg"] as const) bay[key] += sum[key];
      } else if (take) {
        levels.push([departedAt, -1, sum, loadId!]);
      }
    }
    for (let k = 0; k < LOOSE_PER_SITE && u < count; k++, u++) {
      const f = unitFigures(u);
      const at = receivedAt(u);
      insertUnit.run(`${siteId}-u${String(u).padStart(7, "0")}`, siteId, null, "intact", "received", iso(at), f.batteryKg, f.batteryKg, f.batteryKg, f.leadKg, f.leadKg, f.leadKg, f.electrolyteKg, f.electrolyteKg, f.electrolyteKg, f.acidKg, f.acidKg, f.acidKg);
      levels.push([at, 1, { unitCount: 1, ...f }, `${siteId}-u${String(u).padStart(7, "0")}`]);
    }
    // The level ledger in time order, with the running level for the year's peak (40 CFR 273.9 category).
    levels.sort((a, b) => a[0] - b[0]);
    let n = 0;
    const thisYear = new Date(now).getUTCFullYear();
    for (const [at, sign, d, ref] of levels) {
      insertLevel.run(`${siteId}-l${String(n++).padStart(7, "0")}`, siteId, iso(at), sign > 0 ? "intake" : "departure", ref, sign * d.unitCount, sign * d.batteryKg, sign * d.leadKg, sign * d.electrolyteKg, sign * d.acidKg);
      const before = totals.batteryKg;
      for (const key of ["unitCount", "batteryKg", "leadKg", "electrolyteKg", "acidKg"] as const) totals[key] += sign * d[key];
      // As changeSiteLevel keeps it: the most on hand at any moment of this calendar year, its opening level included.
      if (new Date(at).getUTCFullYear() === thisYear) peak = Math.max(peak, before, totals.batteryKg);
    }
    sql.prepare(`UPDATE "Site" SET "unitCount" = ?, "batteryKg" = ?, "leadKg" = ?, "electrolyteKg" = ?, "acidKg" = ?, "peakYear" = ?, "peakBatteryKg" = ? WHERE "id" = ?`).run(
      totals.unitCount, totals.batteryKg, totals.leadKg, totals.electrolyteKg, totals.acidKg, thisYear, peak, siteId,
    );
    for (const b of bays) sql.prepare(`UPDATE "Bay" SET "unitCount" = ?, "batteryKg" = ?, "leadKg" = ?, "electrolyteKg" = ?, "acidKg" = ? WHERE "id" = ?`).run(b.unitCount, b.batteryKg, b.leadKg, b.electrolyteKg, b.acidKg, b.id);
    if (s < 2) {
      const { key, prefix, hash } = newApiKey();
      sql.prepare(`INSERT INTO "ApiKey" ("id","organisationId","siteId","role","name","prefix","hash","createdBy","createdAt") VALUES (?,?,?,?,?,?,?,?,?)`).run(`bench-key-${s}`, orgId, siteId, "compliance", "bench", prefix, hash, "bench", created);
      keys.push(key);
    }
    sql.exec("COMMIT");
  }
  sql.pragma("journal_mode = WAL");
  sql.exec("ANALYZE");
  const counts = sql.prepare(`SELECT (SELECT count(*) FROM "Unit") AS units, (SELECT count(*) FROM "Container") AS containers, (SELECT count(*) FROM "LevelChange" WHERE "siteId" = ? AND "at" >= ? AND "at" < ?) AS busyEvents`).get(siteIds[0], iso(yearStart), iso(yearEnd)) as { units: number; containers: number; busyEvents: number };
  sql.close();
  return { siteIds, keys, counts };
}

function startServer() {
  const child = spawn(process.execPath, ["--import", "tsx", "scripts/serve.ts"], {
    cwd: root,
    env: { ...process.env, DATABASE_URL: url, PORT: String(PORT), LEADGER_DATA_DIR: tmp, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
    stdio: ["ignore", "pipe", "inherit"],
  });
  return new Promise<typeof child>((resolve, reject) => {
    child.stdout.on("data", (chunk: Buffer) => {
      if (chunk.toString().includes("listening")) resolve(child);
    });
    child.on("exit", (code) => reject(new Error(`server exited with ${code}`)));
  });
}

async function timeRequests(pathname: string, key: string, runs: number) {
  const get = async () => {
    const t0 = performance.now();
    const response = await fetch(`http://127.0.0.1:${PORT}${pathname}`, { headers: { authorization: `Bearer ${key}` } });
    const body = await response.text();
    if (!response.ok) throw new Error(`${pathname}: ${response.status} ${body.slice(0, 300)}`);
    return { ms: performance.now() - t0, body };
  };
  for (let i = 0; i < Math.min(3, runs); i++) await get(); // warm-up: compilation, first connections, caches
  const samples: number[] = [];
  let body = "";
  for (let i = 0; i < runs; i++) ({ ms: samples[i]!, body } = await get());
  samples.sort((a, b) => a - b);
  return { p50: samples[Math.floor(runs / 2)]!, p95: samples[Math.min(runs - 1, Math.floor(runs * 0.95))]!, body };
}

const status = (pid: number) => {
  const text = readFileSync(`/proc/${pid}/status`, "utf8");
  const kb = (field: string) => Number(new RegExp(`${field}:\\s+(\\d+) kB`).exec(text)?.[1] ?? Number.NaN);
  return { hwmMb: kb("VmHWM") / 1024, rssMb: kb("VmRSS") / 1024 };
};

const { siteIds, keys, counts } = await seed();
const seededS = (Date.now() - started) / 1000;
console.log(`seeded ${counts.units.toLocaleString("en-US")} units, ${counts.containers.toLocaleString("en-US")} containers, ${SITES} sites in ${seededS.toFixed(1)} s; busy site: ${counts.busyEvents.toLocaleString("en-US")} level changes in ${year}`);
// The data functions in this process first (no HTTP, no auth): the floor of what the routes add to.
const inProcess = await (async () => {
  const { createDb } = await import("../../lib/db/client");
  const { limitsOfSite } = await import("../../lib/db/limits");
  const { annualOfSite } = await import("../../lib/db/annual");
  const client = createDb(url);
  const site = await client.site.findUniqueOrThrow({ where: { id: siteIds[0] } });
  const time = async (runs: number, fn: () => Promise<unknown>) => {
    await fn();
    const samples: number[] = [];
    for (let i = 0; i < runs; i++) {
      const t0 = performance.now();
      await fn();
      samples.push(performance.now() - t0);
    }
    return samples.sort((a, b) => a - b)[Math.floor(runs / 2)]!;
  };
  const limitsMs = await time(20, () => limitsOfSite(client, site));
  const annualMs = await time(3, () => annualOfSite(client, site.id, year));
  await client.$disconnect();
  console.log(`data functions in-process: limits ${limitsMs.toFixed(1)} ms, annual figures ${annualMs.toFixed(0)} ms`);
  return { limitsMs, annualMs };
})();
const { buildIfNeeded } = await import("../../scripts/build-if-needed");
buildIfNeeded();
const server = await startServer();
try {
  const idle = status(server.pid!);
  // The framework floor of this machine at this moment: a route through the same auth and client doing one row read.
  const floor = await timeRequests(`/api/v1/sites/${siteIds[0]}/totals`, keys[0]!, 40);
  const afterFloor = status(server.pid!);
  const busyLimits = await timeRequests(`/api/v1/sites/${siteIds[0]}/limits`, keys[0]!, 40);
  const quietLimits = await timeRequests(`/api/v1/sites/${siteIds[1]}/limits`, keys[1]!, 40);
  const afterLimits = status(server.pid!);
  const annual = await timeRequests(`/api/v1/sites/${siteIds[0]}/annual?year=${year}`, keys[0]!, 5);
  const served = status(server.pid!);

  const baselineRun = spawnSync(process.execPath, ["--import", "tsx", path.join(import.meta.dirname, "limits.bench.ts"), "--baseline", file, siteIds[0]!, String(year)], { cwd: root, encoding: "utf8", maxBuffer: 1 << 20 });
  if (baselineRun.status !== 0) throw new Error(`baseline failed: ${baselineRun.stderr}`);
  const baseline = JSON.parse(baselineRun.stdout) as { limitsMs: number; annualMs: number; rssMb: number; status: string; battery: number; eventCount: number };

  const limitsBody = JSON.parse(busyLimits.body) as { status: string };
  const annualBody = JSON.parse(annual.body) as { eventCount: number; substances: { substance: string; maxDailyKg: number }[] };
  const appBattery = annualBody.substances.find((s) => s.substance === "battery")!.maxDailyKg;
  const agree = limitsBody.status === baseline.status && Math.abs(appBattery - baseline.battery) < 1e-6 * Math.max(1, baseline.battery);

  const row = (name: string, app: string, base: string, target: string, ok: boolean) => `${name.padEnd(44)} ${app.padStart(14)} ${base.padStart(16)}   ${target.padEnd(10)} ${ok ? "met" : "NOT met"}`;
  console.log(`\nbench:limits on SQLite, ${os.cpus().length} cores; app over HTTP (p50 / p95), baseline = full recount of every unit of the site, in-process`);
  console.log(`${"".padEnd(44)} ${"app".padStart(14)} ${"full recount".padStart(16)}   target`);
  console.log(row("floor: GET …/totals (auth + one row)", `${floor.p50.toFixed(1)} / ${floor.p95.toFixed(1)} ms`, "", "", true).replace(/ met$/, ""));
  console.log(row("limits, busy site (GET …/limits)", `${busyLimits.p50.toFixed(1)} / ${busyLimits.p95.toFixed(1)} ms`, `${baseline.limitsMs.toFixed(1)} ms`, "≤ 20 ms", busyLimits.p50 <= 20));
  console.log(row("limits, ordinary site", `${quietLimits.p50.toFixed(1)} / ${quietLimits.p95.toFixed(1)} ms`, "", "≤ 20 ms", quietLimits.p50 <= 20));
  console.log(row(`annual figures ${year}, ${annualBody.eventCount.toLocaleString("en-US")} events`, `${annual.p50.toFixed(0)} / ${annual.p95.toFixed(0)} ms`, `${baseline.annualMs.toFixed(0)} ms`, "≤ 1 s", annual.p50 <= 1000));
  console.log(row("  the same two, data functions in-process", `${inProcess.limitsMs.toFixed(1)} / ${inProcess.annualMs.toFixed(0)} ms`, "", "", true).replace(/ met$/, ""));
  console.log(row("server peak RSS (VmHWM)", `${served.hwmMb.toFixed(0)} MB`, `${baseline.rssMb.toFixed(0)} MB`, "≤ 400 MB", served.hwmMb <= 400));
  console.log(`\nserver VmHWM: idle ${idle.hwmMb.toFixed(0)} MB, after the floor route ${afterFloor.hwmMb.toFixed(0)} MB, after limits ${afterLimits.hwmMb.toFixed(0)} MB, after annual ${served.hwmMb.toFixed(0)} MB (RSS now ${served.rssMb.toFixed(0)} MB)`);
  console.log(`load average during the run: ${os.loadavg().map((l) => l.toFixed(1)).join(" ")} on ${os.cpus().length} cores (figures scale with it; compare against the floor row)`);
  console.log(`app and recount ${agree ? "agree" : "DISAGREE"}: status ${limitsBody.status} / ${baseline.status}, max daily battery ${appBattery.toFixed(1)} / ${baseline.battery.toFixed(1)} kg`);
  console.log(`speed-up over the full recount: limits ×${(baseline.limitsMs / busyLimits.p50).toFixed(0)}, annual ×${(baseline.annualMs / annual.p50).toFixed(1)}; total run ${((Date.now() - started) / 1000).toFixed(0)} s`);
} finally {
  server.kill("SIGTERM");
  await new Promise((resolve) => server.once("exit", resolve));
}
