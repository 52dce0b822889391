import { withActor } from "@/lib/http/handle";
import { revokeApiKey } from "@/lib/db/api-keys";

/** Revokes the key: requests with it are refused from now on. The record stays for the trail. */
export const DELETE = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  return Response.json({ apiKey: await revokeApiKey(actor, id) });
});
