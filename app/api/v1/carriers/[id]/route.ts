import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZCarrierPatch, getCarrier, updateCarrier } from "@/lib/db/facilities";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json({ carrier: await getCarrier(actor, id) });
});

export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZCarrierPatch, await readJson(request));
  return Response.json({ carrier: await updateCarrier(actor, id, patch) });
});
