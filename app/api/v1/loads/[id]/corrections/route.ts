import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZCorrection, addCorrection } from "@/lib/db/loads";

/** Correct a recorded weight or date: a new trail event, never an overwrite of the load. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZCorrection, await readJson(request));
  return Response.json(await addCorrection(actor, id, input), { status: 201 });
});
