/** Header of the derived file; its presence also marks a file as generated. */
export const POSTGRES_SCHEMA_HEADER = [
  "// GENERATED from prisma/schema.prisma by scripts/prisma-generate.ts. Do not edit.",
  "// Change prisma/schema.prisma and run `npm run db:generate`.",
].join("\n");

/**
 * prisma/postgres/schema.prisma from the SQLite source of truth: the same models, with the
 * datasource provider set to postgresql and the client generated into lib/db/generated/postgres.
 */
export function postgresSchema(sqliteSchema: string): string {
  const body = sqliteSchema.replace(/^(?:[ \t]*\/\/.*\n|[ \t]*\n)*/, "");
  const derived = replaceOnce(
    replaceOnce(body, /(datasource\s+db\s*\{[^}]*?provider\s*=\s*)"sqlite"/, '$1"postgresql"', "datasource provider"),
    /(generator\s+client\s*\{[^}]*?output\s*=\s*)"\.\.\/lib\/db\/generated\/sqlite"/,
    '$1"../../lib/db/generated/postgres"',
    "generator output",
  );
  return `${POSTGRES_SCHEMA_HEADER}\n\n${derived}`;
}

function replaceOnce(text: string, pattern: RegExp, replacement: string, what: string): string {
  const matches = text.match(new RegExp(pattern.source, "g"))?.length ?? 0;
  if (matches !== 1) throw new Error(`prisma/schema.prisma: expected one ${what} to derive the PostgreSQL schema, found ${matches}`);
  return text.replace(pattern, replacement);
}
