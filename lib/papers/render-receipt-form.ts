import { z } from "zod";
import { ZLoadContainer, ZLoadUnit, summariseLoad } from "@/lib/loads/summarise-load";
import { kindTable } from "@/lib/papers/render-manifest";
import { PaperWriter, ZIsoDate, ZPaperBase, ZParty, kgLbText, kgText, parsePaperInput, partyLines } from "@/lib/papers/pdf-base";

export const ZReceiptFormInput = ZPaperBase.extend({
  reference: z.string().min(1, "the load reference is required"),
  shipDate: ZIsoDate,
  shipper: ZParty,
  /** the receiving facility that fills the form in */
  consignee: ZParty,
  carrier: ZParty.optional(),
  vehicle: z.string().default(""),
  containers: z.array(ZLoadContainer),
  units: z.array(ZLoadUnit).min(1, "a load needs at least one unit"),
  departureScaleKg: z.number().positive().optional(),
  /** the facility's tolerance on shipped vs received weight; see reconcileWeights */
  tolerancePct: z.number().min(0).max(100).default(2),
});
export type TReceiptFormInput = z.input<typeof ZReceiptFormInput>;

/** The form a receiving facility fills in on arrival: what was shipped, and blanks for what it weighed. */
export async function renderReceiptForm(input: TReceiptFormInput): Promise<Buffer> {
  const r = parsePaperInput(ZReceiptFormInput, input);
  const summary = summariseLoad(r.units, r.containers);
  const w = new PaperWriter({ title: "Receipt form", subject: `Receipt of load ${r.reference}`, base: r });

  w.titleBlock({
    title: "Receipt form",
    reference: r.reference,
    facts: ["For the receiving facility to fill in and return", `shipped ${r.shipDate}`],
  });
  await w.boxes([
    { label: "Shipped by", lines: partyLines(r.shipper) },
    { label: "Received at", lines: partyLines(r.consignee) },
    { label: "Carrier and vehicle", lines: [...(r.carrier ? partyLines(r.carrier) : ["(carrier not named)"]), ...(r.vehicle ? [`Vehicle: ${r.vehicle}`] : [])] },
  ]);

  await w.heading("What was shipped");
  await w.table(kindTable(summary));
  await w.paragraph(`Shipped estimate: ${kgLbText(summary.massKg)} gross in ${summary.packagesText}.`, { bold: true });
  if (r.departureScaleKg !== undefined) await w.paragraph(`Departure scale weight: ${kgLbText(r.departureScaleKg)}.`, { bold: true });
  const band = (kg: number) => `${kgText(kg * (1 - r.tolerancePct / 100))} to ${kgText(kg * (1 + r.tolerancePct / 100))}`;
  await w.paragraph(
    `A received net weight more than ${r.tolerancePct} % away from the shipped weight is flagged for review; exactly ${r.tolerancePct} % is within tolerance. ` +
      `Within tolerance of the estimate: ${band(summary.massKg)}` +
      (r.departureScaleKg !== undefined ? `; of the departure scale weight: ${band(r.departureScaleKg)}.` : "."),
  );

  await w.heading("Received (to fill in)", 160);
  await w.blanks([
    ["Scale ticket number", "Date received (YYYY-MM-DD)"],
    ["Gross (kg)", "Tare (kg)", "Net received (kg)"],
    ["Containers received", "Batteries counted"],
  ]);
  await w.paragraph("Condition on arrival:   [  ] as shipped     [  ] leaking or damaged units found (describe below)");
  await w.heading("Notes", 110);
  await w.blanks([[""], [""], [""], [""]]);
  w.gap(6);
  await w.signatures(["Received by (receiving facility)"], ["Name", "Signature", "Date"]);
  return w.finish();
}
