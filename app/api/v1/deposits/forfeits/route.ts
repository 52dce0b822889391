import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { depositReports, runForfeits, ZForfeitRun } from "@/lib/db/deposits";

/** The sales whose window has closed with deposit still held. */
export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZForfeitRun, queryOf(request));
  const reports = await depositReports(actor, { siteId: q.site });
  return Response.json({ asOf: reports.asOf, forfeitsDue: reports.forfeitsDue, rule: reports.rule, caution: reports.caution });
});

/** Books their forfeit entries. */
export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZForfeitRun, await readJson(request));
  return Response.json(await runForfeits(actor, { siteId: input.site }), { status: 201 });
});
