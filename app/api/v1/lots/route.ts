import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { ZLotCreate, ZSiteQuery } from "@/lib/yard/schema";
import { listLots, receiveLot } from "@/lib/db/lots";

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZLotCreate, await readJson(request));
  return Response.json(await receiveLot(actor, input), { status: 201 });
});

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZSiteQuery, queryOf(request));
  return Response.json({ lots: await listLots(actor, q.site) });
});
