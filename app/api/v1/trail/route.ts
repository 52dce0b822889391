import { withActor, parse, queryOf } from "@/lib/http/handle";
import { queryTrail, trailCsv, ZTrailQuery } from "@/lib/db/trail-query";

/** Newest first, paged by `cursor`; `format=csv` streams every matching event with the same filters. */
export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZTrailQuery, queryOf(request));
  if (q.format === "csv") {
    const day = new Date().toISOString().slice(0, 10);
    return new Response(await trailCsv(actor, q), {
      headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="trail-${day}.csv"`, "cache-control": "no-store" },
    });
  }
  return Response.json(await queryTrail(actor, q));
});
