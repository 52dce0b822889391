import { withActor } from "@/lib/http/handle";
import { siteLimits } from "@/lib/db/limits";

export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { site, report } = await siteLimits(actor, id);
  return Response.json({ site, ...report });
});
