// Makes sure a PostgreSQL answers at TEST_DATABASE_URL (default postgresql://postgres@127.0.0.1:5432/test).
// If none does, starts a throwaway cluster (trust auth, a temp dir, a free port on 127.0.0.1),
// installing Debian's postgresql first if its binaries are missing (root only), and prints its URL.
//   tsx scripts/pg-ensure.ts        (the throwaway server keeps running; the stop command is printed;
//                                    stdout is the URL alone)
import { execFileSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { createDatabase, pgConfig, postgresServerUrl, postgresUnreachableReason, redactUrl } from "../lib/db/migrate";

export type TPostgres = {
  url: string;
  /** true when this call started the server; stop() then shuts it down and deletes its files. */
  isThrowaway: boolean;
  /** The shell command that stops a throwaway server from outside this process. */
  stopCommand?: string;
  stop(): Promise<void>;
};

const loud = (lines: string[]) => console.warn(["", ...lines.map((line) => `!!! ${line}`), ""].join("\n"));

/** A reachable PostgreSQL: the one at `url` if it answers, else a throwaway cluster started here. */
export async function ensurePostgres({ url = postgresServerUrl() }: { url?: string } = {}): Promise<TPostgres> {
  const unreachable = await postgresUnreachableReason(url);
  if (!unreachable) return { url, isThrowaway: false, stop: async () => {} };

  loud([unreachable, "Starting a throwaway PostgreSQL cluster for this run."]);
  const bin = postgresBinDir() ?? installPostgres();
  const root = mkdtempSync(path.join(os.tmpdir(), "leadger-pg-"));
  const dataDir = path.join(root, "data");
  const asRoot = process.getuid?.() === 0;
  // initdb and the server refuse to run as root: they run as the postgres user, who owns the dir.
  const run = (tool: string, args: string[]) =>
    execFileSync(asRoot ? "runuser" : path.join(bin, tool), asRoot ? ["-u", "postgres", "--", path.join(bin, tool), ...args] : args, {
      stdio: ["ignore", "pipe", "pipe"],
    });
  mkdirSync(dataDir);
  if (asRoot) execFileSync("chown", ["-R", "postgres:postgres", root]);
  const port = await freePort();
  const pgCtl = (...args: string[]) => run("pg_ctl", ["-D", dataDir, ...args]);
  try {
    run("initdb", ["-D", dataDir, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--no-sync"]);
    pgCtl("-o", `-p ${port} -k ${root} -c listen_addresses=127.0.0.1`, "-l", path.join(root, "server.log"), "-w", "start");
  } catch (error) {
    rmSync(root, { recursive: true, force: true });
    throw new Error(`could not start a throwaway PostgreSQL: ${processError(error)}`);
  }
  // The database the URL asked for, so the throwaway server stands in for the expected one.
  const database = pgConfig(url).database || "test";
  const serverUrl = `postgresql://postgres@127.0.0.1:${port}/postgres`;
  const testUrl = database === "postgres" ? serverUrl : await createDatabase({ url: serverUrl, name: database });
  const stopCommand = `${asRoot ? "runuser -u postgres -- " : ""}${path.join(bin, "pg_ctl")} -D ${dataDir} stop -m fast && rm -rf ${root}`;
  loud([`Throwaway PostgreSQL running: ${testUrl}`]);
  return {
    url: testUrl,
    isThrowaway: true,
    stopCommand,
    stop: async () => {
      try {
        pgCtl("stop", "-m", "fast");
      } finally {
        rmSync(root, { recursive: true, force: true });
      }
    },
  };
}

/** The bin dir of the newest PostgreSQL installed the Debian way, if any. */
function postgresBinDir(): string | undefined {
  const base = "/usr/lib/postgresql";
  if (!existsSync(base)) return undefined;
  const versions = readdirSync(base)
    .filter((v) => existsSync(path.join(base, v, "bin", "initdb")))
    .sort((a, b) => Number(b) - Number(a));
  return versions[0] && path.join(base, versions[0], "bin");
}

function installPostgres(): string {
  if (process.getuid?.() !== 0) {
    throw new Error("no PostgreSQL binaries under /usr/lib/postgresql and not root: install Debian's postgresql package, or set TEST_DATABASE_URL");
  }
  loud(["PostgreSQL binaries are missing: installing Debian's postgresql package with apt-get (as root)."]);
  const apt = (...args: string[]) => execFileSync("apt-get", args, { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
  try {
    apt("install", "-y", "--no-install-recommends", "postgresql");
  } catch {
    apt("update");
    apt("install", "-y", "--no-install-recommends", "postgresql");
  }
  const bin = postgresBinDir();
  if (!bin) throw new Error("apt-get installed postgresql, but no initdb was found under /usr/lib/postgresql");
  return bin;
}

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

function processError(error: unknown): string {
  const stderr = (error as { stderr?: Buffer }).stderr?.toString().trim();
  return stderr || (error instanceof Error ? error.message : String(error));
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  ensurePostgres().then(
    (postgres) => {
      if (postgres.isThrowaway) loud([`Use it with: export TEST_DATABASE_URL=${postgres.url}`, `Stop it with: ${postgres.stopCommand}`]);
      else console.error(`PostgreSQL is reachable: ${redactUrl(postgres.url)}`);
      // stdout carries the URL alone, for `TEST_DATABASE_URL=$(npm run --silent pg:ensure)`.
      console.log(postgres.url);
    },
    (error: unknown) => {
      console.error(`pg-ensure failed: ${error instanceof Error ? error.message : String(error)}`);
      process.exit(1);
    },
  );
}
