import { withActor } from "@/lib/http/handle";
import { regenerateDocument } from "@/lib/db/papers";

/** A stored document, made again from its snapshot: whether the bytes' sha256 matches the one stored at issue. */
export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { document, regeneratedSha256, isIdentical } = await regenerateDocument(actor, id);
  return Response.json({ document, verification: { storedSha256: document.sha256, regeneratedSha256, isIdentical } });
});
