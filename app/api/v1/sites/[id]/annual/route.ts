import { withActor, parse, queryOf } from "@/lib/http/handle";
import { ZAnnualQuery } from "@/lib/yard/schema";
import { annualCsvOf, annualWorksheetPdf, siteAnnual } from "@/lib/db/annual";

/** `?year=2025` JSON; `&format=csv` the worksheet as CSV; `&format=pdf` the printable worksheet. */
export const GET = withActor(async ({ actor, request }, { params }: { params: Promise<{ id: string }> }) => {
  const { id } = await params;
  const q = parse(ZAnnualQuery, queryOf(request));
  const { site, figures } = await siteAnnual(actor, id, q.year);
  const name = `annual-${q.year}-${site.id}`;
  if (q.format === "csv") {
    return new Response(annualCsvOf(figures), { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${name}.csv"` } });
  }
  if (q.format === "pdf") {
    const pdf = await annualWorksheetPdf({ site, figures });
    return new Response(new Uint8Array(pdf), { headers: { "content-type": "application/pdf", "content-disposition": `inline; filename="${name}.pdf"` } });
  }
  return Response.json(figures);
});
