import { ZodError, type ZodType } from "zod";
import { AppError, fieldIssues } from "@/lib/errors";
import { requireActor } from "@/lib/auth/actor";
import type { TActor } from "@/lib/auth/permissions";
import { fromPrismaError } from "@/lib/db/errors";

type TContext = { actor: TActor; request: Request };

/** JSON error body: `{ error: { code, message, issues: [{ field, message }] } }`. */
export function errorResponse(error: AppError): Response {
  const headers: Record<string, string> = {};
  return Response.json({ error: { code: error.code, message: error.message, issues: error.issues } }, { status: error.status, headers });
}

/** Wraps a route handler: resolves the actor (401 if none), turns expected errors into their status, logs the rest. */
export function withActor<TArgs extends unknown[]>(fn: (ctx: TContext, ...args: TArgs) => Promise<Response>) {
  return async (request: Request, ...args: TArgs): Promise<Response> => {
    try {
      const actor = await requireActor(request.headers);
      return await fn({ actor, request }, ...args);
    } catch (error) {
      return toErrorResponse(error);
    }
  };
}

export function toErrorResponse(error: unknown): Response {
  if (error instanceof AppError) return errorResponse(error);
  if (error instanceof ZodError) return errorResponse(new AppError("invalid_input", "Some fields need fixing.", fieldIssues(error.issues)));
  const mapped = fromPrismaError(error);
  if (mapped) return errorResponse(mapped);
  console.error(error);
  return errorResponse(new AppError("internal", "Something went wrong on our side; nothing was saved."));
}

/** Parses with a zod schema, throwing a 400 with field-level issues. */
export function parse<T extends ZodType>(schema: T, value: unknown): ReturnType<T["parse"]> {
  const result = schema.safeParse(value);
  if (!result.success) throw new AppError("invalid_input", "Some fields need fixing.", fieldIssues(result.error.issues));
  return result.data as ReturnType<T["parse"]>;
}

export async function readJson(request: Request): Promise<unknown> {
  try {
    return await request.json();
  } catch {
    throw new AppError("invalid_input", "The body must be JSON.", [{ field: "(body)", message: "send a JSON object" }]);
  }
}

/** Query string to a plain object, for zod. */
export const queryOf = (request: Request): Record<string, string> => Object.fromEntries(new URL(request.url).searchParams);
