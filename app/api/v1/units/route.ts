import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { ZIdempotencyKey, ZUnitIntake, ZUnitQuery } from "@/lib/intake/schema";
import { recordIntake, listUnits } from "@/lib/db/units";

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZUnitIntake, await readJson(request));
  const keyHeader = request.headers.get("idempotency-key");
  const key = keyHeader === null ? undefined : parse(ZIdempotencyKey, keyHeader);
  const result = await recordIntake(actor, input, key);
  return Response.json(result.body, { status: result.status, headers: result.isReplay ? { "Idempotent-Replayed": "true" } : {} });
});

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZUnitQuery, queryOf(request));
  const units = await listUnits(actor, { siteId: q.site, from: q.from, to: q.to, limit: q.limit });
  return Response.json({ units });
});
