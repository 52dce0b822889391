import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZContainerPatch } from "@/lib/yard/schema";
import { getContainer, updateContainer } from "@/lib/db/yard";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json(await getContainer(actor, id));
});

/** Seal (`{ state: "sealed" }`) or move to another bay (`{ bayId }`). */
export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZContainerPatch, await readJson(request));
  return Response.json({ container: await updateContainer(actor, id, patch) });
});
