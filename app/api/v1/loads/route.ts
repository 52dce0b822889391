import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { ZLoadCreate, ZLoadQuery, createLoad, listLoads } from "@/lib/db/loads";

/** Plan a load at a site for a receiving facility. */
export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZLoadCreate, await readJson(request));
  return Response.json(await createLoad(actor, input), { status: 201 });
});

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZLoadQuery, queryOf(request));
  return Response.json({ loads: await listLoads(actor, { siteId: q.site, state: q.state }) });
});
