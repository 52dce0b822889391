/**
 * `npm test`: the whole suite on SQLite — unit and integration tests (vitest), then the browser journeys
 * (Playwright driving a real Chromium against the built app). Stops at the first failing stage.
 */
import { spawnSync } from "node:child_process";
import path from "node:path";
import { findChromium } from "./find-chromium";
import { buildIfNeeded } from "./build-if-needed";
import { ensureTestTools } from "./debian-tools";

const root = path.resolve(import.meta.dirname, "..");
const env = { ...process.env, NEXT_TELEMETRY_DISABLED: "1" };

function stage(title: string, command: string, args: string[], extraEnv: Record<string, string> = {}) {
  console.log(`\n=== ${title} ===`);
  const started = Date.now();
  const result = spawnSync(command, args, { cwd: root, stdio: "inherit", env: { ...env, ...extraEnv } });
  console.log(`--- ${title}: ${result.status === 0 ? "passed" : "FAILED"} in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  if (result.status !== 0) process.exit(result.status ?? 1);
}

const only = process.argv[2];
ensureTestTools();
stage("Prisma clients", "npx", ["tsx", "scripts/prisma-generate.ts"]);
if (!only || only === "vitest") stage("Unit and integration tests", "npx", ["vitest", "run"]);
if (!only || only === "e2e") {
  const chromium = findChromium();
  console.log(`Browser tests use ${chromium}`);
  buildIfNeeded();
  stage("Browser journeys", "npx", ["playwright", "test"], { CHROMIUM_PATH: chromium });
}
if (!only || only === "security") {
  buildIfNeeded();
  stage("Security checks against the running server", "npx", ["vitest", "run", "--config", "test/security/vitest.config.ts"]);
}
