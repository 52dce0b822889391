import { withActor } from "@/lib/http/handle";
import { issueReceiptForm, paperFileName, paperHeaders } from "@/lib/db/papers";

/** The receipt form for the receiving facility, issued and stored with its snapshot and hash. */
export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { document, pdf, reference, isNew } = await issueReceiptForm(actor, id);
  return new Response(new Uint8Array(pdf), { headers: { ...paperHeaders(document, paperFileName("receipt-form", reference)), "x-document-new": String(isNew) } });
});
