import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZIdempotencyKey } from "@/lib/intake/schema";
import { recordReturn, ZCounterReturn } from "@/lib/db/deposits";

/** A used battery logged at the Counter against a sale, with its refund, credit or forfeit. */
export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZCounterReturn, await readJson(request));
  const keyHeader = request.headers.get("idempotency-key");
  const key = keyHeader === null ? undefined : parse(ZIdempotencyKey, keyHeader);
  const result = await recordReturn(actor, input, key);
  return Response.json(result.body, { status: result.status, headers: result.isReplay ? { "Idempotent-Replayed": "true" } : {} });
});
