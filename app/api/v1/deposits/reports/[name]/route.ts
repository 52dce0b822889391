import { z } from "zod";
import { withActor, parse, queryOf } from "@/lib/http/handle";
import { depositReportCsv, REPORT_NAMES } from "@/lib/db/deposits";
import { AppError } from "@/lib/errors";

const ZReportQuery = z.object({ site: z.string({ error: "site is required" }).min(1, { error: "site is required" }) });

/** `/api/v1/deposits/reports/<outstanding|returns|forfeited|forfeits-due>.csv?site=` */
export const GET = withActor(async ({ actor, request }, { params }: { params: Promise<{ name: string }> }) => {
  const { name } = await params;
  const report = REPORT_NAMES.find((n) => `${n}.csv` === name);
  if (!report) throw new AppError("not_found", `There is no report "${name}"; try ${REPORT_NAMES.map((n) => `${n}.csv`).join(", ")}.`);
  const q = parse(ZReportQuery, queryOf(request));
  const csv = await depositReportCsv(actor, { siteId: q.site, name: report });
  return new Response(csv, {
    headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="deposits-${report}.csv"` },
  });
});
