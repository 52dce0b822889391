import { spawnSync } from "node:child_process";
import { existsSync, readdirSync, statSync } from "node:fs";
import path from "node:path";

const root = path.resolve(import.meta.dirname, "..");

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    if (entry.name === "node_modules" || entry.name === "generated" || entry.name.startsWith(".")) continue;
    const full = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(full) : statSync(full).mtimeMs);
  }
  return newest;
}

/** Runs `npm run build` when there is no build yet or any source is newer than it. */
export function buildIfNeeded(): void {
  const buildId = path.join(root, ".next", "BUILD_ID");
  const sources = Math.max(
    ...["app", "lib", "prisma"].map((d) => newestMtime(path.join(root, d))),
    ...["next.config.ts", "proxy.ts", "package-lock.json"].map((f) => statSync(path.join(root, f)).mtimeMs),
  );
  if (existsSync(buildId) && statSync(buildId).mtimeMs >= sources) {
    console.log("The build is up to date.");
    return;
  }
  console.log("Building the app (first run, or the sources changed)…");
  const result = spawnSync("npm", ["run", "--silent", "build"], { cwd: root, stdio: "inherit", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
  if (result.status !== 0) process.exit(result.status ?? 1);
}
