/**
 * `npm run test:pg`: the integration suite and the browser journeys on PostgreSQL.
 * The server is TEST_DATABASE_URL (default postgresql://postgres@127.0.0.1:5432/test); when none answers
 * there, a throwaway cluster is started for the run (Debian's postgresql is installed first if its binaries
 * are missing, as root) and stopped at the end. The integration suite builds its template and per-worker
 * databases on that server; the browser journeys get a fresh database of their own (E2E_DATABASE_URL),
 * which the e2e server migrates and seeds. Both stages run; the exit code is non-zero if either failed.
 *   npm run test:pg -- test/integration/units-api.test.ts   (those integration files only, no browser)
 */
import { spawn } from "node:child_process";
import net from "node:net";
import path from "node:path";
import { createDatabase, dropDatabase, postgresServerUrl, redactUrl, uniqueDatabaseName } from "../lib/db/migrate";
import { buildIfNeeded } from "./build-if-needed";
import { ensureTestTools } from "./debian-tools";
import { findChromium } from "./find-chromium";
import { ensurePostgres, type TPostgres } from "./pg-ensure";

const root = path.resolve(import.meta.dirname, "..");
const baseEnv = { ...process.env, NEXT_TELEMETRY_DISABLED: "1" };

type TStage = { title: string; isPassed: boolean; seconds: number };
const stages: TStage[] = [];
// `npm run test:pg -- <files or name filters>`: only those integration tests, and no browser journeys.
const filters = process.argv.slice(2);
let interrupted = false;
let running: ReturnType<typeof spawn> | undefined;

function stage(title: string, command: string, args: string[], extraEnv: Record<string, string> = {}): Promise<boolean> {
  console.log(`\n=== ${title} ===`);
  const started = Date.now();
  return new Promise((resolve) => {
    running = spawn(command, args, { cwd: root, stdio: "inherit", env: { ...baseEnv, ...extraEnv } });
    running.on("exit", (code) => {
      running = undefined;
      const seconds = (Date.now() - started) / 1000;
      const isPassed = code === 0;
      stages.push({ title, isPassed, seconds });
      console.log(`--- ${title}: ${isPassed ? "passed" : "FAILED"} in ${seconds.toFixed(1)} s`);
      resolve(isPassed);
    });
  });
}

/** A port nobody listens on now, so a concurrent `npm test` on the default 3100 does not collide. */
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

async function main(): Promise<number> {
  ensureTestTools();
  if (!(await stage("Prisma clients", "npx", ["tsx", "scripts/prisma-generate.ts"]))) return 1;

  let postgres: TPostgres | undefined;
  let e2eDatabase: { serverUrl: string; name: string } | undefined;
  const cleanUp = async () => {
    if (e2eDatabase) await dropDatabase({ url: e2eDatabase.serverUrl, name: e2eDatabase.name }).catch(() => {});
    e2eDatabase = undefined;
    if (postgres?.isThrowaway) console.log("\nStopping the throwaway PostgreSQL.");
    await postgres?.stop();
    postgres = undefined;
  };
  for (const signal of ["SIGINT", "SIGTERM"] as const) {
    process.on(signal, () => {
      interrupted = true;
      running?.kill(signal);
      void cleanUp().finally(() => process.exit(130));
    });
  }

  try {
    postgres = await ensurePostgres({ url: postgresServerUrl() });
    console.log(`PostgreSQL for this run: ${redactUrl(postgres.url)}${postgres.isThrowaway ? " (throwaway, started for this run)" : ""}`);

    await stage("Integration tests on PostgreSQL", "npx", ["vitest", "run", "--project", "integration", ...filters], { TEST_DATABASE_URL: postgres.url });
    if (interrupted) return 130;
    if (filters.length > 0) return summary();

    const chromium = findChromium();
    console.log(`\nBrowser tests use ${chromium}`);
    buildIfNeeded();
    const name = uniqueDatabaseName("leadger_e2e");
    const e2eUrl = await createDatabase({ url: postgres.url, name });
    e2eDatabase = { serverUrl: postgres.url, name };
    const port = await freePort();
    await stage("Browser journeys on PostgreSQL", "npx", ["playwright", "test"], {
      CHROMIUM_PATH: chromium,
      E2E_DATABASE_URL: e2eUrl,
      E2E_PORT: String(port),
      TEST_DATABASE_URL: postgres.url,
    });
  } finally {
    await cleanUp();
  }

  return summary();
}

function summary(): number {
  console.log("\n=== test:pg summary ===");
  for (const s of stages) console.log(`${s.isPassed ? "passed" : "FAILED"}  ${s.title} (${s.seconds.toFixed(1)} s)`);
  return stages.every((s) => s.isPassed) ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (error: unknown) => {
    console.error(`test:pg failed: ${error instanceof Error ? error.message : String(error)}`);
    process.exit(1);
  },
);
