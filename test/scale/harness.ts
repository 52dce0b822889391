// Shared by the scale-out and crash checks (test/scale/*.ts): scratch databases, app instances of the
// built server, an intake site with an API key, and the recount the checks end with. Loopback only.
import { spawn, type ChildProcess } from "node:child_process";
import { randomUUID } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { createDb, type TDb } from "../../lib/db/client";
import {
  applyMigrations,
  createDatabase,
  dropDatabase,
  postgresServerUrl,
  redactUrl,
  uniqueDatabaseName,
  type TDatabaseProvider,
} from "../../lib/db/migrate";
import { verifyTotals } from "../../lib/db/verify-totals";
import { ensurePostgres, type TPostgres } from "../../scripts/pg-ensure";
import { makeKey, makeOrgWithSite } from "../helpers/factories";

export const ROOT = path.resolve(import.meta.dirname, "../..");

/** The tolerance of the brief for running totals against a recount (float sums in another order). */
export const TOTALS_TOLERANCE_KG = 1e-6;

export type TScratch = { provider: TDatabaseProvider; url: string; dataDir: string; drop(): Promise<void> };

/**
 * A new, migrated database: a file in a temp dir for SQLite; for PostgreSQL a new database on the server
 * of TEST_DATABASE_URL (a throwaway cluster is started when none answers; drop() stops it again).
 * `dataDir` is a temp dir for the app instances' own files (auth secret).
 */
export async function scratchDatabase(provider: TDatabaseProvider): Promise<TScratch> {
  const dataDir = mkdtempSync(path.join(os.tmpdir(), "leadger-scale-"));
  if (provider === "sqlite") {
    const url = `file:${path.join(dataDir, "scale.db")}`;
    await applyMigrations({ provider, url });
    return { provider, url, dataDir, drop: async () => rmSync(dataDir, { recursive: true, force: true }) };
  }
  const postgres: TPostgres = await ensurePostgres({ url: postgresServerUrl() });
  const name = uniqueDatabaseName("leadger_scale");
  const url = await createDatabase({ url: postgres.url, name });
  await applyMigrations({ provider, url });
  return {
    provider,
    url,
    dataDir,
    drop: async () => {
      await dropDatabase({ url: postgres.url, name });
      await postgres.stop();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

export type TIntakeSite = { organisationId: string; siteId: string; key: string; keyId: string; idempotencyScope: string };

/** An organisation, a store and a clerk's API key for it. */
export async function makeIntakeSite(client: TDb): Promise<TIntakeSite> {
  const { organisation, site } = await makeOrgWithSite(client);
  const { key, id } = await makeKey(client, { organisationId: organisation.id, siteId: site.id, role: "clerk" });
  // The scope recordIntake files idempotency records under for this key (lib/db/units.ts).
  return { organisationId: organisation.id, siteId: site.id, key, keyId: id, idempotencyScope: `key:${id} POST /api/v1/units` };
}

/** One intake's JSON body; `n` varies the battery so the totals are not sums of one repeated number. */
export function intakeBody(siteId: string, n: number, note: string): string {
  return JSON.stringify({
    site: siteId,
    kind: n % 5 === 0 ? "agm" : "flooded",
    nominalVoltage: 12,
    capacityAh: 40 + (n % 61),
    weightKg: 10 + ((n * 7919) % 2000) / 100,
    condition: "intact",
    source: n % 3 === 0 ? "drop-off" : "core-return",
    note,
  });
}

export const intakeHeaders = (key: string, idempotencyKey: string) => ({
  authorization: `Bearer ${key}`,
  "content-type": "application/json",
  "idempotency-key": idempotencyKey,
});

/** Throws with a clear message when something already listens on one of the ports (or it cannot be bound). */
export async function assertPortsFree(ports: number[], host = "127.0.0.1"): Promise<void> {
  for (const port of ports) {
    await new Promise<void>((resolve, reject) => {
      const server = net.createServer();
      server.once("error", (error: NodeJS.ErrnoException) =>
        reject(new Error(`port ${port} on ${host} is not free (${error.code ?? error.message}): stop what uses it, or choose other ports (--ports a,b)`)),
      );
      server.listen(port, host, () => server.close(() => resolve()));
    });
  }
}

export type TApp = {
  port: number;
  baseUrl: string;
  pid: number;
  /** Resolves with the exit code or signal when the process ends. */
  exited: Promise<string>;
  kill(signal: NodeJS.Signals): void;
  stop(): Promise<void>;
};

const liveApps = new Set<TApp>();

/** SIGKILLs every instance still running (for a watchdog about to exit the process). */
export function killAllApps(): void {
  for (const app of liveApps) app.kill("SIGKILL");
}

/**
 * One instance of the built app (scripts/serve.ts, production mode) on `port`, started as
 * `node --import tsx scripts/serve.ts` so the PID held is the server's own. Resolves once it listens.
 */
export async function startApp({ port, url, dataDir, secret }: { port: number; url: string; dataDir: string; secret: string }): Promise<TApp> {
  const child: ChildProcess = spawn(process.execPath, ["--import", "tsx", "scripts/serve.ts"], {
    cwd: ROOT,
    env: {
      ...process.env,
      DATABASE_URL: url,
      PORT: String(port),
      HOST: "127.0.0.1",
      NODE_ENV: "production",
      NEXT_TELEMETRY_DISABLED: "1",
      LEADGER_DATA_DIR: dataDir,
      // Instances behind one database must share the session secret.
      BETTER_AUTH_SECRET: secret,
      BETTER_AUTH_URL: `http://127.0.0.1:${port}`,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let stderr = "";
  child.stderr!.on("data", (chunk: Buffer) => {
    stderr = (stderr + chunk.toString()).slice(-4000);
  });
  let isEndExpected = false;
  const exited = new Promise<string>((resolve) => child.on("exit", (code, signal) => resolve(signal ?? `exit ${code}`)));
  void exited.then((how) => {
    // Said at once, so that a failed check later can be traced to an instance that went away.
    if (!isEndExpected) console.error(`\n!!! the app on port ${port} (pid ${child.pid}) ended unexpectedly: ${how}${stderr ? `\n${stderr}` : ""}`);
  });
  await new Promise<void>((resolve, reject) => {
    const timer = setTimeout(() => {
      isEndExpected = true;
      child.kill("SIGKILL");
      reject(new Error(`the app on port ${port} did not start within 60 s\n${stderr}`));
    }, 60_000);
    child.stdout!.on("data", (chunk: Buffer) => {
      if (chunk.toString().includes("listening")) {
        clearTimeout(timer);
        resolve();
      }
    });
    void exited.then((how) => {
      clearTimeout(timer);
      isEndExpected = true;
      reject(new Error(`the app on port ${port} ended before listening (${how})\n${stderr}`));
    });
  });
  child.stdout!.resume();
  const app: TApp = {
    port,
    baseUrl: `http://127.0.0.1:${port}`,
    pid: child.pid!,
    exited,
    kill: (signal) => {
      isEndExpected = true;
      child.kill(signal);
    },
    stop: async () => {
      isEndExpected = true;
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill("SIGTERM");
      const timer = setTimeout(() => child.kill("SIGKILL"), 10_000);
      await exited;
      clearTimeout(timer);
    },
  };
  liveApps.add(app);
  void exited.then(() => liveApps.delete(app));
  return app;
}

export const newAuthSecret = () => randomUUID() + randomUUID();

export type TLedger = {
  unitCount: number;
  distinctUnitIds: number;
  trailEvents: number;
  levelChanges: number;
  idempotencyRecords: number;
  siteTotals: { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };
  recount: { unitCount: number; batteryKg: number; leadKg: number; electrolyteKg: number; acidKg: number };
  /** lib/db/verify-totals.ts: sites, bays, containers and the level ledger against their records. */
  driftReport: string[];
};

/** Everything the checks compare, for one site, read straight from the database. */
export async function readLedger(client: TDb, site: TIntakeSite): Promise<TLedger> {
  const where = { siteId: site.siteId };
  const [row, sums, trailEvents, levelChanges, idempotencyRecords, ids, report] = await Promise.all([
    client.site.findUniqueOrThrow({ where: { id: site.siteId } }),
    client.unit.aggregate({ where, _count: { _all: true }, _sum: { batteryKg: true, leadKg: true, electrolyteKg: true, acidKg: true } }),
    client.trailEvent.count({ where: { ...where, action: "unit.received" } }),
    client.levelChange.count({ where: { ...where, reason: "intake" } }),
    client.idempotencyKey.count({ where: { scope: site.idempotencyScope } }),
    client.unit.groupBy({ by: ["id"], where }),
    verifyTotals(client, { siteIds: [site.siteId] }),
  ]);
  return {
    unitCount: sums._count._all,
    distinctUnitIds: ids.length,
    trailEvents,
    levelChanges,
    idempotencyRecords,
    siteTotals: { unitCount: row.unitCount, batteryKg: row.batteryKg, leadKg: row.leadKg, electrolyteKg: row.electrolyteKg, acidKg: row.acidKg },
    recount: {
      unitCount: sums._count._all,
      batteryKg: sums._sum.batteryKg ?? 0,
      leadKg: sums._sum.leadKg ?? 0,
      electrolyteKg: sums._sum.electrolyteKg ?? 0,
      acidKg: sums._sum.acidKg ?? 0,
    },
    driftReport: report.drift.flatMap((d) => d.fields.map((f) => `${d.scope} ${d.name}: ${f.field} recorded ${f.recorded}, recounted ${f.recounted}`)),
  };
}

/** The checks common to both runs: every count equals `expectedUnits`, totals equal the recount. */
export function ledgerChecks(ledger: TLedger, expectedUnits: number): TCheck[] {
  const checks: TCheck[] = [
    check(`units = ${expectedUnits}`, ledger.unitCount === expectedUnits, `${ledger.unitCount}`),
    check(`distinct unit ids = ${expectedUnits}`, ledger.distinctUnitIds === expectedUnits, `${ledger.distinctUnitIds}`),
    check(`trail events (unit.received) = ${expectedUnits}`, ledger.trailEvents === expectedUnits, `${ledger.trailEvents}`),
    check(`level changes (intake) = ${expectedUnits}`, ledger.levelChanges === expectedUnits, `${ledger.levelChanges}`),
    check(`idempotency records = ${expectedUnits}`, ledger.idempotencyRecords === expectedUnits, `${ledger.idempotencyRecords}`),
    check(`site unit count = ${expectedUnits}`, ledger.siteTotals.unitCount === expectedUnits, `${ledger.siteTotals.unitCount}`),
  ];
  for (const field of ["batteryKg", "leadKg", "electrolyteKg", "acidKg"] as const) {
    const difference = ledger.siteTotals[field] - ledger.recount[field];
    checks.push(
      check(
        `site ${field} = recount within ${TOTALS_TOLERANCE_KG} kg`,
        Math.abs(difference) <= TOTALS_TOLERANCE_KG,
        `running ${ledger.siteTotals[field].toFixed(6)}, recount ${ledger.recount[field].toFixed(6)}, difference ${difference.toExponential(2)}`,
      ),
    );
  }
  checks.push(check("verifyTotals reports no drift", ledger.driftReport.length === 0, ledger.driftReport.join("; ") || "clean"));
  return checks;
}

export type TCheck = { name: string; isOk: boolean; detail: string };

export const check = (name: string, isOk: boolean, detail = ""): TCheck => ({ name, isOk, detail });

/** Prints the checks; returns whether all passed. */
export function printChecks(title: string, checks: TCheck[]): boolean {
  console.log(`\n${title}`);
  for (const c of checks) console.log(`  ${c.isOk ? "ok  " : "FAIL"}  ${c.name}${c.detail ? `  (${c.detail})` : ""}`);
  return checks.every((c) => c.isOk);
}

export { createDb, redactUrl };

/** Runs `work` on up to `limit` items at once. */
export async function eachLimited<T>(items: T[], limit: number, work: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  await Promise.all(
    Array.from({ length: Math.min(limit, items.length) }, async () => {
      while (next < items.length) await work(items[next++]!);
    }),
  );
}

/** A POST of one intake with fetch; `null` when no response came (connection refused or reset, timeout). */
export async function postIntake({ baseUrl, key, idempotencyKey, body, timeoutMs = 30_000 }: { baseUrl: string; key: string; idempotencyKey: string; body: string; timeoutMs?: number }): Promise<{ status: number; unitId?: string; isReplay: boolean } | null> {
  try {
    const response = await fetch(`${baseUrl}/api/v1/units`, { method: "POST", headers: intakeHeaders(key, idempotencyKey), body, signal: AbortSignal.timeout(timeoutMs) });
    const text = await response.text();
    let unitId: string | undefined;
    try {
      unitId = (JSON.parse(text) as { unit?: { id?: string } }).unit?.id;
    } catch {
      unitId = undefined;
    }
    return { status: response.status, unitId, isReplay: response.headers.get("idempotent-replayed") === "true" };
  } catch {
    return null;
  }
}
