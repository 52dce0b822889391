import { spawnSync } from "node:child_process";
import { existsSync, readdirSync } from "node:fs";
import os from "node:os";
import path from "node:path";

/** A browser Playwright already has in its cache (never downloaded by us). */
function playwrightCached(): string | undefined {
  const cache = process.env.PLAYWRIGHT_BROWSERS_PATH ?? path.join(os.homedir(), ".cache", "ms-playwright");
  if (!existsSync(cache)) return undefined;
  for (const dir of readdirSync(cache).filter((d) => d.startsWith("chromium")).sort().reverse()) {
    for (const candidate of ["chrome-linux/chrome", "chrome-linux64/chrome", "chrome-headless-shell-linux64/chrome-headless-shell"]) {
      const full = path.join(cache, dir, candidate);
      if (existsSync(full)) return full;
    }
  }
  return undefined;
}

/**
 * Finds Chromium for the browser tests: CHROMIUM_PATH, then /usr/bin/chromium, then Playwright's cache. On a
 * Debian machine run as root it installs Debian's `chromium` package and says so; otherwise it stops with how to
 * install one. It never downloads a browser build itself.
 */
export function findChromium(): string {
  const fromEnv = process.env.CHROMIUM_PATH;
  if (fromEnv) {
    if (existsSync(fromEnv)) return fromEnv;
    throw new Error(`CHROMIUM_PATH is set to ${fromEnv}, but there is no file there.`);
  }
  if (existsSync("/usr/bin/chromium")) return "/usr/bin/chromium";
  const cached = playwrightCached();
  if (cached) return cached;
  const isDebian = existsSync("/etc/debian_version");
  const isRoot = process.getuid?.() === 0;
  if (isDebian && isRoot) {
    console.log("No Chromium found: installing Debian's chromium package with apt-get (needs the Debian mirror)…");
    for (const args of [["update", "-q"], ["install", "-y", "-q", "chromium"]]) {
      const result = spawnSync("apt-get", args, { stdio: "inherit", env: { ...process.env, DEBIAN_FRONTEND: "noninteractive" } });
      if (result.status !== 0) throw new Error(`apt-get ${args.join(" ")} failed.`);
    }
    if (existsSync("/usr/bin/chromium")) return "/usr/bin/chromium";
  }
  throw new Error(
    "No Chromium for the browser tests. Install one (Debian/Ubuntu: `sudo apt-get install chromium`) or set CHROMIUM_PATH to a Chromium or Chrome binary.",
  );
}

/** Launch flags that keep Chromium from reaching for the network (see DEVELOPERS.md). */
export const CHROMIUM_ARGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--disable-dev-shm-usage",
];
