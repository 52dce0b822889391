import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZLoadPatch, getLoad, updateLoad } from "@/lib/db/loads";

type TParams = { params: Promise<{ id: string }> };

/** The load with its containers, summary by kind, basis and checklist, gate, reconciliation, papers and history. */
export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json(await getLoad(actor, id));
});

/** Edit while planning (facility, carrier, vehicle, basis, checklist), or `{ state: "ready" }` / `{ state: "planning" }`. */
export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZLoadPatch, await readJson(request));
  return Response.json(await updateLoad(actor, id, patch));
});
