import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { ZBayCreate, ZSiteQuery } from "@/lib/yard/schema";
import { createBay, listBays } from "@/lib/db/yard";

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZSiteQuery, queryOf(request));
  return Response.json({ bays: await listBays(actor, q.site) });
});

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZBayCreate, await readJson(request));
  return Response.json({ bay: await createBay(actor, input) }, { status: 201 });
});
