import path from "node:path";
import { defineConfig } from "prisma/config";

// Offline: every prisma CLI command first looks for a native schema engine and would download one.
// `generate` never calls it, so a stand-in that prints a version is enough (see DEVELOPERS.md).
process.env.PRISMA_SCHEMA_ENGINE_BINARY ??= path.resolve("scripts/no-engine.sh");

// The CLI is used only for `prisma generate` here; migrations go through scripts/db.ts (WASM engine).
export default defineConfig({
  schema: path.join("prisma", "schema.prisma"),
  migrations: { path: path.join("prisma", "migrations") },
  datasource: { url: process.env.DATABASE_URL ?? "file:./data/leadger.db" },
});
