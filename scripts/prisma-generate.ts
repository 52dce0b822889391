// Writes prisma/postgres/schema.prisma from prisma/schema.prisma, then runs `prisma generate` for
// both, offline. Usage: tsx scripts/prisma-generate.ts [--check | --if-stale]
//   --check: fail if the file is stale; --if-stale: generate only if a client is missing or older than the schema
//   (the benchmarks and scale tests start with it, since they import the clients before anything can build).
import { execFileSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { migrationPaths, schemaText } from "../lib/db/migrate/migrations";

const ROOT = fileURLToPath(new URL("..", import.meta.url));

/** Whether prisma/postgres/schema.prisma matches its derivation from prisma/schema.prisma. */
export function isPostgresSchemaCurrent(): boolean {
  const { schemaPath } = migrationPaths({ provider: "postgresql" });
  return existsSync(schemaPath) && readFileSync(schemaPath, "utf8") === schemaText({ provider: "postgresql" });
}

/** Writes prisma/postgres/schema.prisma; returns its path. */
export function writePostgresSchema(): string {
  const { schemaPath } = migrationPaths({ provider: "postgresql" });
  mkdirSync(path.dirname(schemaPath), { recursive: true });
  writeFileSync(schemaPath, schemaText({ provider: "postgresql" }));
  return schemaPath;
}

/** `prisma generate` for one schema. Never downloads: the CLI is given a stand-in schema engine. */
export function prismaGenerate(schemaPath: string): void {
  execFileSync(process.execPath, [path.join(ROOT, "node_modules/prisma/build/index.js"), "generate", "--schema", schemaPath], {
    cwd: ROOT,
    stdio: "inherit",
    env: {
      ...process.env,
      PRISMA_SCHEMA_ENGINE_BINARY: path.join(ROOT, "scripts/no-engine.sh"),
      CHECKPOINT_DISABLE: "1",
      PRISMA_HIDE_UPDATE_MESSAGE: "1",
    },
  });
}

/** Whether both generated clients exist and are newer than prisma/schema.prisma. */
export function areClientsCurrent(): boolean {
  const schema = statSync(migrationPaths({ provider: "sqlite" }).schemaPath).mtimeMs;
  return ["sqlite", "postgres"].every((name) => {
    const client = path.join(ROOT, "lib/db/generated", name, "client.ts");
    return existsSync(client) && statSync(client).mtimeMs >= schema;
  });
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? "").href) {
  if (process.argv.includes("--if-stale") && isPostgresSchemaCurrent() && areClientsCurrent()) process.exit(0);
  if (process.argv.includes("--check")) {
    if (!isPostgresSchemaCurrent()) {
      console.error("prisma/postgres/schema.prisma is stale: run `npm run db:generate` and commit it.");
      process.exit(1);
    }
    console.log("prisma/postgres/schema.prisma is current.");
  } else {
    const postgresSchemaPath = writePostgresSchema();
    console.log(`wrote ${path.relative(ROOT, postgresSchemaPath)}`);
    prismaGenerate(migrationPaths({ provider: "sqlite" }).schemaPath);
    prismaGenerate(postgresSchemaPath);
  }
}
