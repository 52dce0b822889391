import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { createApiKey, listApiKeys, ZApiKeyCreate, ZApiKeyQuery } from "@/lib/db/api-keys";

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZApiKeyQuery, queryOf(request));
  return Response.json({ apiKeys: await listApiKeys(actor, { siteId: q.site }) });
});

/** The response carries the key itself; it is never shown again (only its hash is kept). */
export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZApiKeyCreate, await readJson(request));
  return Response.json(await createApiKey(actor, input), { status: 201, headers: { "cache-control": "no-store" } });
});
