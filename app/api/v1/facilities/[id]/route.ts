import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZFacilityPatch, getFacility, updateFacility } from "@/lib/db/facilities";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json({ facility: await getFacility(actor, id) });
});

/** Change a facility's name, address, regulatory IDs or weighing tolerance (never deleted: loads refer to it). */
export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZFacilityPatch, await readJson(request));
  return Response.json({ facility: await updateFacility(actor, id, patch) });
});
