import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { listDeposits, postDepositEntry, ZDepositPost, ZDepositQuery } from "@/lib/db/deposits";

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZDepositQuery, queryOf(request));
  return Response.json(await listDeposits(actor, { siteId: q.site, saleRef: q.sale, limit: q.limit }));
});

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZDepositPost, await readJson(request));
  return Response.json(await postDepositEntry(actor, input), { status: 201 });
});
