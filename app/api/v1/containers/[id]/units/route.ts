import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZStow } from "@/lib/yard/schema";
import { stowIntoContainer } from "@/lib/db/yard";

/** Stow or move into this container: `{ scan }`, `{ unitIds }`, `{ lotId }` or `{ fromContainerId }`. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZStow, await readJson(request));
  return Response.json(await stowIntoContainer(actor, id, input));
});
