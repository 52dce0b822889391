import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZReconcile, reconcileLoad } from "@/lib/db/loads";

/** Close a delivered load; a flagged difference needs a note. The load is read-only afterwards. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZReconcile, await readJson(request));
  return Response.json(await reconcileLoad(actor, id, input));
});
