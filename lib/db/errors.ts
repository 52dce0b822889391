import { AppError, type TFieldIssue } from "../errors";
import { Prisma } from "./generated/sqlite/client";

export type TDbErrorMessages = { conflict?: string; notFound?: string };

/**
 * The one place where Prisma's known errors become domain errors, by error code (never by message
 * text): P2002 unique constraint → `conflict` (409) with the fields as issues, P2025 record not
 * found → `not_found` (404). undefined for anything else, which the caller rethrows or logs.
 */
export function fromPrismaError(error: unknown, messages: TDbErrorMessages = {}): AppError | undefined {
  if (!isKnownRequestError(error)) return undefined;
  switch (error.code) {
    case "P2002":
      return new AppError(
        "conflict",
        messages.conflict ?? "a record with these values already exists",
        uniqueFields(error).map((field): TFieldIssue => ({ field, message: "is already in use" })),
      );
    case "P2025":
      return new AppError("not_found", messages.notFound ?? "the record was not found");
    default:
      return undefined;
  }
}

/** Runs `work`; a known database error comes out as its AppError, anything else unchanged. */
export async function withDbErrors<T>(work: () => Promise<T>, messages?: TDbErrorMessages): Promise<T> {
  try {
    return await work();
  } catch (error) {
    throw fromPrismaError(error, messages) ?? error;
  }
}

function isKnownRequestError(error: unknown): error is Prisma.PrismaClientKnownRequestError {
  // Both generated clients share the runtime's class; the name covers a second copy of the runtime.
  return (
    error instanceof Prisma.PrismaClientKnownRequestError ||
    (error instanceof Error && error.name === "PrismaClientKnownRequestError" && typeof (error as { code?: unknown }).code === "string")
  );
}

type TUniqueMeta = {
  modelName?: string;
  target?: unknown;
  driverAdapterError?: { cause?: { table?: unknown; constraint?: { fields?: unknown; index?: unknown } } };
};

/**
 * The fields of the violated unique constraint. SQLite reports them; PostgreSQL reports the index,
 * named `<table>_<field>_..._key` by Prisma's default naming.
 */
function uniqueFields(error: Prisma.PrismaClientKnownRequestError): string[] {
  const meta = (error.meta ?? {}) as TUniqueMeta;
  const cause = meta.driverAdapterError?.cause;
  const constraint = cause?.constraint;
  const fields = constraint?.fields ?? meta.target;
  if (Array.isArray(fields)) return fields.filter((f): f is string => typeof f === "string");
  const index = typeof constraint?.index === "string" ? constraint.index : "";
  const table = typeof cause?.table === "string" ? cause.table : meta.modelName;
  const prefix = `${table}_`;
  if (table && index.startsWith(prefix) && index.endsWith("_key")) {
    return index.slice(prefix.length, -"_key".length).split("_").filter(Boolean);
  }
  return [];
}
