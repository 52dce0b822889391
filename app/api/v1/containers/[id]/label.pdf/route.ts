import { withActor } from "@/lib/http/handle";
import { containerLabelPdf } from "@/lib/db/yard";

export const GET = withActor(async ({ actor }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const { pdf, labelNumber } = await containerLabelPdf(actor, id);
  return new Response(new Uint8Array(pdf), {
    headers: { "content-type": "application/pdf", "content-disposition": `inline; filename="label-${labelNumber.replace(/[^A-Za-z0-9._-]/g, "_")}.pdf"` },
  });
});
