import { withActor, parse, queryOf } from "@/lib/http/handle";
import { ZRecordsQuery, issueShipmentRecords, paperFileName, paperHeaders, shipmentRecords } from "@/lib/db/papers";

/** Shipments received and sent in a period with the 40 CFR 273.39 fields: CSV (default), JSON, or an issued PDF. */
export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZRecordsQuery, queryOf(request));
  const name = `shipment-records-${q.from}-to-${q.to}`;
  if (q.format === "pdf") {
    const { document, pdf, isNew } = await issueShipmentRecords(actor, q);
    return new Response(new Uint8Array(pdf), { headers: { ...paperHeaders(document, paperFileName("records", `${q.from}-to-${q.to}`)), "x-document-new": String(isNew) } });
  }
  const records = await shipmentRecords(actor, q);
  if (q.format === "json") return Response.json({ from: q.from, to: q.to, rows: records.rows, notes: records.notes });
  return new Response(records.csv, { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${name}.csv"`, "cache-control": "private, no-store" } });
});
