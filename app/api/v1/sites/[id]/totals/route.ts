import { withActor } from "@/lib/http/handle";
import { siteTotals } from "@/lib/db/sites";

export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  return Response.json(await siteTotals(actor, id));
});
