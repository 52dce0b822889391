import { spawnSync } from "node:child_process";
import path from "node:path";
import { expect, test } from "vitest";

const root = path.resolve(import.meta.dirname, "../../..");
const run = (args: string[]) =>
  spawnSync(process.execPath, ["--import", "tsx", "scripts/estimate.ts", ...args], { cwd: root, encoding: "utf8", timeout: 20_000 });

test("npm run estimate prints the estimate as a table in kg and lb", () => {
  const r = run(["--kind", "flooded", "--voltage", "12", "--ah", "60", "--kg", "18"]);
  expect(r.status).toBe(0);
  expect(r.stdout).toMatch(/Method: weighed/);
  // 18 kg = 39.68 lb (0.45359237 kg/lb, exact; REFERENCES.md)
  expect(r.stdout).toMatch(/^battery\s+18\.00\s+18\.00 – 18\.00\s+39\.68\s+39\.68 – 39\.68$/m);
  expect(r.stdout).toMatch(/^lead \(as Pb\)\s+\d+\.\d\d/m);
  expect(r.stdout).toMatch(/confirm with the authority having jurisdiction/);
}, 30_000);

test("bad input gives the clerk's message for each flag and a non-zero exit", () => {
  const r = run(["--kind", "flooded", "--voltage", "13", "--ah", "60", "--kg", "abc"]);
  expect(r.status).not.toBe(0);
  expect(r.stderr).toMatch(/--voltage: voltage must be between 2 and 96 V, in steps of 2 V/);
  expect(r.stderr).toMatch(/--kg \/ --lb: weight must be between 0.5 and 3 000 kg/);
}, 30_000);
