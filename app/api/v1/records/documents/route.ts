import { withActor, parse, queryOf } from "@/lib/http/handle";
import { ZDocumentQuery, listDocuments } from "@/lib/db/papers";

/** Issued documents of a site, newest first: kind, rulebook id and version, sha256, who and when. */
export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZDocumentQuery, queryOf(request));
  return Response.json({ documents: await listDocuments(actor, { siteId: q.site, loadId: q.load, kind: q.kind }) });
});
