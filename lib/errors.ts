/** A field-level problem with the input, as the API returns it: `{ field, message }`. */
export type TFieldIssue = { field: string; message: string };

export type TErrorCode =
  | "invalid_input"
  | "unauthenticated"
  | "forbidden"
  | "not_found"
  | "conflict"
  | "rate_limited"
  | "internal";

const STATUS: Record<TErrorCode, number> = {
  invalid_input: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  rate_limited: 429,
  internal: 500,
};

/** The one error type of the domain: the user sees `message` (and `issues`); the log gets the rest. */
export class AppError extends Error {
  readonly code: TErrorCode;
  readonly status: number;
  readonly issues: TFieldIssue[];

  constructor(code: TErrorCode, message: string, issues: TFieldIssue[] = []) {
    super(message);
    this.name = "AppError";
    this.code = code;
    this.status = STATUS[code];
    this.issues = issues;
  }
}

/** Turns zod issues into `{ field, message }` items with dotted paths. */
export function fieldIssues(issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>): TFieldIssue[] {
  return issues.map((i) => ({ field: i.path.map(String).join(".") || "(body)", message: i.message }));
}
