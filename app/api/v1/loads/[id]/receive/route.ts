import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZReceipt, receiveLoad } from "@/lib/db/loads";

/** The receiving facility's scale weight and date of receipt; the response carries the reconciliation. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZReceipt, await readJson(request));
  return Response.json(await receiveLoad(actor, id, input));
});
