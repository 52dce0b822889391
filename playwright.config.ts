import { defineConfig } from "@playwright/test";
import { CHROMIUM_ARGS, findChromium } from "./scripts/find-chromium";

const port = Number(process.env.E2E_PORT ?? 3100);

export default defineConfig({
  testDir: "e2e",
  outputDir: "test-results/e2e",
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: 0,
  reporter: [["list"]],
  use: {
    baseURL: `http://localhost:${port}`,
    launchOptions: { executablePath: process.env.CHROMIUM_PATH ?? findChromium(), args: CHROMIUM_ARGS },
    trace: "retain-on-failure",
    screenshot: "only-on-failure",
  },
  webServer: {
    // A fresh database for every run: migrated with the committed migrations, the demo loaded, then served.
    command: `node --import tsx scripts/e2e-server.ts`,
    url: `http://127.0.0.1:${port}/sign-in`,
    timeout: 180_000,
    reuseExistingServer: false,
    stdout: "pipe",
    env: { E2E_PORT: String(port) },
  },
});
