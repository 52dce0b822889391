import { withActor } from "@/lib/http/handle";
import { paperFileName, paperHeaders, regenerateDocument } from "@/lib/db/papers";

/** The stored document made again from its snapshot; `x-regenerated-sha256` and `x-identical` say whether it matches. */
export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { document, pdf, regeneratedSha256, isIdentical } = await regenerateDocument(actor, id);
  return new Response(new Uint8Array(pdf), {
    headers: { ...paperHeaders(document, paperFileName(document.kind, document.id)), "x-regenerated-sha256": regeneratedSha256, "x-identical": String(isIdentical) },
  });
});
