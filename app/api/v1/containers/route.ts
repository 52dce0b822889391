import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { ZContainerCreate, ZContainerQuery } from "@/lib/yard/schema";
import { createContainer, listContainers } from "@/lib/db/yard";

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZContainerQuery, queryOf(request));
  return Response.json({ containers: await listContainers(actor, { siteId: q.site, state: q.state, bayId: q.bay }) });
});

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZContainerCreate, await readJson(request));
  return Response.json({ container: await createContainer(actor, input) }, { status: 201 });
});
