import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZDeparture, departLoad } from "@/lib/db/loads";

/** A ready load leaves: its units leave the site's on-hand totals. Optional departure scale weight and time. */
export const POST = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const input = parse(ZDeparture, await readJson(request));
  return Response.json(await departLoad(actor, id, input));
});
