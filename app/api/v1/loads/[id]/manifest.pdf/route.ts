import { withActor } from "@/lib/http/handle";
import { issueManifest, paperFileName, paperHeaders } from "@/lib/db/papers";

/** The load manifest (shipping paper and bill of lading), issued and stored with its snapshot and hash. */
export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { document, pdf, reference, isNew } = await issueManifest(actor, id);
  return new Response(new Uint8Array(pdf), { headers: { ...paperHeaders(document, paperFileName("manifest", reference)), "x-document-new": String(isNew) } });
});
