import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZLoadContainersAdd, addContainers } from "@/lib/db/loads";

/** Put sealed containers on a planning load; a container already claimed by another load is a 409. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZLoadContainersAdd, await readJson(request));
  return Response.json(await addContainers(actor, id, input));
});
