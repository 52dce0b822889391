import { withActor, parse, queryOf } from "@/lib/http/handle";
import { checkReturn, ZReturnCheckQuery } from "@/lib/db/deposits";

/** The Counter's look-up of a sale reference: window verdict, refund due, what the rule allows. Writes nothing. */
export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZReturnCheckQuery, queryOf(request));
  return Response.json(await checkReturn(actor, { siteId: q.site, saleRef: q.sale, weightKg: q.weightKg, groupSize: q.groupSize }));
});
