import { z } from "zod";
import { kgToLb } from "@/lib/units";
import { PaperWriter, ZIsoDate, ZPaperBase, ZParty, countText, kgText, lbText, parsePaperInput, partyLines } from "@/lib/papers/pdf-base";

/** 40 CFR 273.39: quantity of each type of universal waste in a shipment. */
const ZQuantity = z.object({
  /** e.g. "lead-acid batteries, flooded" */
  type: z.string().min(1),
  count: z.number().int().nonnegative(),
  massKg: z.number().nonnegative(),
});

const ZShipment = z.object({
  /** YYYY-MM-DD: the date received (for a shipment in) or the date it left (for a shipment out) */
  date: ZIsoDate,
  /** origin (received) or destination (sent) */
  counterpart: ZParty,
  quantities: z.array(ZQuantity).min(1),
  /** a load reference or scale ticket */
  reference: z.string().default(""),
});

export const ZShipmentRecordsInput = ZPaperBase.extend({
  handler: ZParty,
  from: ZIsoDate,
  to: ZIsoDate,
  received: z.array(ZShipment).default([]),
  sent: z.array(ZShipment).default([]),
  retentionYears: z.number().int().positive().default(3),
  /** Said under the shipments received: why a row has no sender. Absent in records issued before it existed. */
  notes: z.array(z.string().min(1)).default([]),
}).refine((v) => v.from <= v.to, { path: ["to"], message: "the end of the period must not be before its start" });
export type TShipmentRecordsInput = z.input<typeof ZShipmentRecordsInput>;
type TShipment = z.output<typeof ZShipment>;

export type TShipmentRecordRow = {
  direction: "received" | "sent";
  date: string;
  counterpartName: string;
  counterpartAddress: string;
  type: string;
  count: number;
  massKg: number;
  reference: string;
};

/**
 * The rows of the record for the period, one per shipment and type: received first, then sent, each
 * by date (ISO dates compare as text). Shipments outside [from, to] are left out.
 */
export function shipmentRecordRows(input: TShipmentRecordsInput): TShipmentRecordRow[] {
  return rowsOf(parsePaperInput(ZShipmentRecordsInput, input));
}

function rowsOf(r: z.output<typeof ZShipmentRecordsInput>): TShipmentRecordRow[] {
  const rows = (direction: "received" | "sent", list: TShipment[]) =>
    list
      .filter((s) => s.date >= r.from && s.date <= r.to)
      .sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0))
      .flatMap((s) =>
        s.quantities.map((q) => ({
          direction,
          date: s.date,
          counterpartName: s.counterpart.name,
          counterpartAddress: s.counterpart.address.split("\n").filter(Boolean).join(", "),
          type: q.type,
          count: q.count,
          massKg: q.massKg,
          reference: s.reference,
        })),
      );
  return [...rows("received", r.received), ...rows("sent", r.sent)];
}

const csvCell = (v: string) => (/[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v);

/** The same record as CSV (RFC 4180: CRLF line ends, quoted where needed), one row per shipment and type. */
export function shipmentRecordsCsv(input: TShipmentRecordsInput): string {
  const header = ["direction", "date", "counterpart_name", "counterpart_address", "type", "count", "mass_kg", "mass_lb", "reference"];
  const lines = shipmentRecordRows(input).map((row) =>
    [row.direction, row.date, row.counterpartName, row.counterpartAddress, row.type, String(row.count), row.massKg.toFixed(1), kgToLb(row.massKg).toFixed(1), row.reference]
      .map(csvCell)
      .join(","),
  );
  return [header.join(","), ...lines].join("\r\n") + "\r\n";
}

/** Shipments received and sent in a period, with the fields of 40 CFR 273.39 (DESIGN.md §7). */
export async function renderShipmentRecords(input: TShipmentRecordsInput): Promise<Buffer> {
  const r = parsePaperInput(ZShipmentRecordsInput, input);
  const rows = rowsOf(r);
  const w = new PaperWriter({ title: "Shipment records", subject: `Shipments received and sent, ${r.from} to ${r.to}`, base: r });

  w.titleBlock({ title: "Shipment records", facts: [`${r.from} to ${r.to}`, "received and sent", "40 CFR 273.39"] });
  await w.boxes([
    { label: "Handler", lines: partyLines(r.handler) },
    {
      label: "Keeping these records",
      lines: [`Keep each record at least ${r.retentionYears} years from the date of the shipment (40 CFR 273.39).`],
    },
  ]);

  for (const direction of ["received", "sent"] as const) {
    const part = rows.filter((row) => row.direction === direction);
    const isIn = direction === "received";
    await w.heading(isIn ? "Shipments received" : "Shipments sent", 50);
    if (part.length === 0) {
      await w.paragraph(`No shipments ${direction} in this period.`);
      continue;
    }
    const totalKg = part.reduce((s, row) => s + row.massKg, 0);
    await w.table({
      columns: [
        // weights in points of a US Letter page, sized so a typical address and type fit on one line at 7.5 pt
        { header: isIn ? "Date received" : "Date left", weight: 56 },
        { header: isIn ? "From (origin)" : "To (destination)", weight: 152 },
        { header: "Type", weight: 118 },
        { header: "Count", weight: 34, align: "right" },
        { header: "Mass (kg)", weight: 54, align: "right" },
        { header: "Mass (lb)", weight: 52, align: "right" },
        { header: "Reference", weight: 58 },
      ],
      rows: part.map((row) => [
        row.date,
        `${row.counterpartName}\n${row.counterpartAddress}`,
        row.type,
        countText(row.count),
        kgText(row.massKg),
        lbText(row.massKg),
        row.reference,
      ]),
      totals: ["Total", "", "", countText(part.reduce((s, row) => s + row.count, 0)), kgText(totalKg), lbText(totalKg), ""],
      size: 7.5,
    });
    if (isIn) for (const note of r.notes) await w.paragraph(note, { size: 8 });
  }
  return w.finish();
}
