// The security tests that need the running production server (scripts/serve.ts on the built app): run with
// `npx vitest run --config test/security/vitest.config.ts`. They build the app first if it is out of date.
import path from "node:path";
import { defineConfig } from "vitest/config";

const root = path.resolve(import.meta.dirname, "../..");

export default defineConfig({
  root,
  resolve: { alias: { "@": root } },
  test: {
    include: ["test/security/**/*.test.ts"],
    environment: "node",
    fileParallelism: false,
    testTimeout: 120_000,
    // A first `next build` on two shared cores can take several minutes.
    hookTimeout: 900_000,
  },
});
