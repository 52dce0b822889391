import { z } from "zod";
import { ZIdempotencyKey, ZUnitIntake, ZUnitQuery } from "@/lib/intake/schema";

/**
 * The API description, generated from the same zod schemas the routes parse with (never written by hand).
 * Each route family lists its operations in OPERATIONS.
 */
type TOperation = {
  method: "get" | "post" | "put" | "patch" | "delete";
  path: string;
  summary: string;
  tag: string;
  body?: { id: string; schema: z.ZodType };
  query?: z.ZodObject;
  headers?: Record<string, { schema: z.ZodType; description: string }>;
  pathParams?: string[];
  responses: Record<string, string>;
};

const ERRORS = { "400": "Invalid input: `{ error: { code, message, issues: [{ field, message }] } }`; nothing was written", "401": "Not signed in and no valid API key", "403": "Your role at this site does not allow it", "404": "No such record in your organisation" };

export const OPERATIONS: TOperation[] = [
  {
    method: "post",
    path: "/api/v1/units",
    summary: "Log one spent battery; its composition is computed and the site's totals move by exactly that unit",
    tag: "Counter",
    body: { id: "UnitIntake", schema: ZUnitIntake },
    headers: { "Idempotency-Key": { schema: ZIdempotencyKey, description: "A retry with the same key returns the first response and writes nothing new" } },
    responses: { "201": "The unit, its composition and the site's new totals", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/units",
    summary: "List units received, newest first, within the sites you may see",
    tag: "Counter",
    query: ZUnitQuery,
    responses: { "200": "`{ units: [...] }`", ...ERRORS },
  },
  {
    method: "get",
    path: "/api/v1/sites/{id}/totals",
    summary: "On-hand totals of a site: unit count and battery, lead, electrolyte and sulfuric acid mass in kg",
    tag: "Sites",
    pathParams: ["id"],
    responses: { "200": "`{ site, totals }`", ...ERRORS },
  },
];

function strip(schema: Record<string, unknown>) {
  const { $schema: _s, $id: _i, ...rest } = schema;
  return rest;
}

export function openApiDocument(): Record<string, unknown> {
  const registry = z.registry<{ id: string }>();
  for (const op of OPERATIONS) if (op.body && !registry.has(op.body.schema)) registry.add(op.body.schema, { id: op.body.id });
  const components = z.toJSONSchema(registry, { io: "input", uri: (id) => `#/components/schemas/${id}`, unrepresentable: "any" });
  const schemas = Object.fromEntries(Object.entries(components.schemas).map(([id, s]) => [id, strip(s as Record<string, unknown>)]));

  const paths: Record<string, Record<string, unknown>> = {};
  for (const op of OPERATIONS) {
    const parameters: unknown[] = [];
    for (const name of op.pathParams ?? []) parameters.push({ name, in: "path", required: true, schema: { type: "string" } });
    if (op.query) {
      const q = z.toJSONSchema(op.query, { io: "input", unrepresentable: "any" }) as { properties?: Record<string, unknown>; required?: string[] };
      for (const [name, schema] of Object.entries(q.properties ?? {})) {
        parameters.push({ name, in: "query", required: q.required?.includes(name) ?? false, schema });
      }
    }
    for (const [name, h] of Object.entries(op.headers ?? {})) {
      parameters.push({ name, in: "header", required: false, description: h.description, schema: strip(z.toJSONSchema(h.schema, { io: "input" }) as Record<string, unknown>) });
    }
    paths[op.path] ??= {};
    paths[op.path]![op.method] = {
      summary: op.summary,
      tags: [op.tag],
      ...(parameters.length ? { parameters } : {}),
      ...(op.body ? { requestBody: { required: true, content: { "application/json": { schema: { $ref: `#/components/schemas/${op.body.id}` } } } } } : {}),
      responses: Object.fromEntries(Object.entries(op.responses).map(([code, description]) => [code, { description }])),
    };
  }
  return {
    openapi: "3.1.0",
    info: { title: "Leadger API", version: "1", description: "Figures are estimates to support, not replace, a trained person's judgement; local rules may be stricter." },
    components: {
      schemas,
      securitySchemes: { apiKey: { type: "http", scheme: "bearer", description: "An API key made under Setup for one site and role" }, session: { type: "apiKey", in: "cookie", name: "__Secure-better-auth.session_token" } },
    },
    security: [{ apiKey: [] }, { session: [] }],
    paths,
  };
}
