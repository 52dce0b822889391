import { withActor } from "@/lib/http/handle";
import { removeContainer } from "@/lib/db/loads";

/** Take a container off a planning load: it is sealed again and free for another load. */
export const DELETE = withActor(async ({ actor }, { params }: { params: Promise<{ id: string; containerId: string }> }) => {
  const { id, containerId } = await params;
  return Response.json(await removeContainer(actor, id, containerId));
});
