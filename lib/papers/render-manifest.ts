import { z } from "zod";
import { ZLoadContainer, ZLoadUnit, summariseLoad, type TLoadSummary } from "@/lib/loads/summarise-load";
import { TRANSPORT_BASIS_IDS, applicableItems, checkBasis, loadFactsOf, transportBasis } from "@/lib/loads/transport-basis";
import {
  ADR_UN2794,
  BASEL_ENTRY,
  ERG_GUIDE,
  EU_WASTE_CODE,
  SHIPPER_CERTIFICATION,
  adrDescription,
} from "@/lib/papers/hazmat-description";
import {
  PaperWriter,
  ZIsoDate,
  ZPaperBase,
  ZParty,
  countText,
  kgLbText,
  kgText,
  lbText,
  parsePaperInput,
  partyLines,
  yieldToLoop,
  type TColumn,
} from "@/lib/papers/pdf-base";

export const ZManifestInput = ZPaperBase.extend({
  reference: z.string().min(1, "the load reference is required"),
  shipDate: ZIsoDate,
  basis: z.enum(TRANSPORT_BASIS_IDS),
  /** the basis checklist as confirmed by a person: `{ itemId: true }` */
  checklist: z.record(z.string(), z.boolean()).default({}),
  /** the origin site */
  shipper: ZParty,
  /** the receiving facility */
  consignee: ZParty,
  carrier: ZParty.optional(),
  vehicle: z.string().default(""),
  emergencyPhone: z.string().default(""),
  containers: z.array(ZLoadContainer),
  units: z.array(ZLoadUnit).min(1, "a load needs at least one unit"),
  departureScaleKg: z.number().positive().optional(),
  notes: z.string().default(""),
  /** adds a schedule listing every unit after the container schedule */
  includeUnitSchedule: z.boolean().default(false),
});
export type TManifestInput = z.input<typeof ZManifestInput>;

const typeOf = (nonSpillable: boolean) => (nonSpillable ? "non-spillable (UN2800)" : "flooded (UN2794)");

const KIND_COLUMNS: TColumn[] = [
  { header: "Kind", weight: 3.2 },
  { header: "Type", weight: 2.4 },
  { header: "Count", weight: 1.1, align: "right" },
  { header: "Mass (kg)", weight: 1.6, align: "right" },
  { header: "Mass (lb)", weight: 1.6, align: "right" },
];

/** Lines by kind with a totals row: shared by the manifest and the receipt form. */
export function kindTable(summary: TLoadSummary) {
  return {
    columns: KIND_COLUMNS,
    rows: summary.byKind.map((k) => [k.kind, typeOf(k.isNonSpillable), countText(k.count), kgText(k.massKg), lbText(k.massKg)]),
    totals: ["Total", summary.packagesText, countText(summary.count), kgText(summary.massKg), lbText(summary.massKg)],
  };
}

/**
 * The load manifest: the shipping paper and bill of lading for one load (DESIGN.md §7). The content
 * follows the basis: a full hazardous-materials description and certification (49 CFR 172.202,
 * 172.204), a statement of the 173.159(e) exception, or the ADR entries with the waste code.
 */
export async function renderManifest(input: TManifestInput): Promise<Buffer> {
  const m = parsePaperInput(ZManifestInput, input);
  await yieldToLoop();
  const summary = summariseLoad(m.units, m.containers);
  await yieldToLoop();
  const basis = transportBasis(m.basis);
  const facts = loadFactsOf({ summary, emergencyPhone: m.emergencyPhone });
  const check = checkBasis({ basis: basis.id, checklist: m.checklist, load: facts });

  const w = new PaperWriter({
    title: "Load manifest",
    subject: `Shipping paper and bill of lading, load ${m.reference}`,
    base: m,
  });

  w.titleBlock({
    title: "Load manifest",
    reference: m.reference,
    facts: ["Shipping paper and bill of lading", `ship date ${m.shipDate}`, basis.title],
  });

  if (!check.isReady) {
    await w.notice(
      [
        ...check.blockers.map((b) => `Blocked: ${b.message} (${b.citation})`),
        ...check.missing.map((i) => `Not yet confirmed: ${i.text}`),
      ],
      { title: "Draft: this load is not ready to ship" },
    );
  }

  await w.boxes([
    { label: "Shipper", lines: partyLines(m.shipper) },
    { label: "Consignee (receiving facility)", lines: partyLines(m.consignee) },
    {
      label: "Carrier and vehicle",
      lines: [...(m.carrier ? partyLines(m.carrier) : ["(carrier not named)"]), ...(m.vehicle ? [`Vehicle: ${m.vehicle}`] : [])],
    },
  ]);

  const confirmed = applicableItems(basis, facts).map((item) => ({ ...item, isConfirmed: m.checklist[item.id] === true }));
  const massColumns: TColumn[] = [
    { header: "Mass (kg)", weight: 1.25, align: "right" },
    { header: "Mass (lb)", weight: 1.25, align: "right" },
  ];

  switch (basis.id) {
    case "us-full": {
      await w.heading("Hazardous materials (49 CFR 172.202)");
      await w.table({
        columns: [{ header: "Packages", weight: 1.5 }, { header: "Basic description", weight: 5.4 }, ...massColumns],
        rows: summary.byDescription.map((d) => [d.packagesText, d.description, kgText(d.massKg), lbText(d.massKg)]),
        totals: ["Total", `${countText(summary.count)} batteries, gross mass`, kgText(summary.massKg), lbText(summary.massKg)],
      });
      await w.paragraph(
        `Emergency response telephone: ${m.emergencyPhone || "(none given)"}, monitored at all times while the load is in transport (49 CFR 172.604(a)).   ERG guide ${ERG_GUIDE.number} (check against the current Emergency Response Guidebook).`,
        { bold: false },
      );
      break;
    }
    case "us-exception": {
      await w.heading("Shipped under the highway or rail exception (49 CFR 173.159(e))");
      await w.paragraph(basis.statement);
      await w.checks(confirmed);
      await w.paragraph(
        `Goods: ${countText(summary.count)} spent lead-acid batteries for recycling, ${summary.packagesText}, ${kgLbText(summary.massKg)} gross.`,
        { bold: true },
      );
      await w.paragraph("This paper makes no hazardous materials certification: the exception above is the basis of shipment.");
      break;
    }
    case "eu-adr-full":
    case "eu-sp598": {
      if (basis.id === "eu-adr-full") {
        await w.heading("Dangerous goods (ADR 5.4.1)");
        await w.table({
          // one mass column: the ADR entry is long and must stay on one line
          columns: [{ header: "Packages", weight: 1.3 }, { header: "Description", weight: 6.3 }, { header: "Gross mass", weight: 1.4, align: "right" }],
          rows: summary.byDescription.map((d) => [d.packagesText, adrDescription({ nonSpillable: d.isNonSpillable, isWaste: true }), kgText(d.massKg)]),
          totals: ["Total", `${countText(summary.count)} batteries`, kgText(summary.massKg)],
        });
        await w.paragraph(
          `UN 2794: class ${ADR_UN2794.hazardClass}, classification code ${ADR_UN2794.classificationCode}, label ${ADR_UN2794.labels.join(", ")}, transport category ${ADR_UN2794.transportCategory}, tunnel code ${ADR_UN2794.tunnelCode}, packing instruction ${ADR_UN2794.packingInstruction}, special provisions ${ADR_UN2794.specialProvisions.join(" and ")}; in bulk ${ADR_UN2794.bulk}, hazard identification number ${ADR_UN2794.hazardIdentificationNumber} (${ADR_UN2794.source}).`,
        );
        if (m.emergencyPhone) await w.paragraph(`Emergency telephone: ${m.emergencyPhone}`);
      } else {
        await w.heading("Carried under ADR special provision 598 (used batteries)");
        await w.paragraph(basis.statement);
        await w.checks(confirmed);
        await w.paragraph(`Goods: ${countText(summary.count)} used lead-acid batteries for recycling, ${summary.packagesText}, ${kgLbText(summary.massKg)} gross.`, { bold: true });
      }
      await w.paragraph(
        `Waste code: ${EU_WASTE_CODE.code} ${EU_WASTE_CODE.text} (${EU_WASTE_CODE.source}). Across borders: Basel ${BASEL_ENTRY.code} ${BASEL_ENTRY.text}.`,
        { bold: true },
      );
      break;
    }
  }

  await w.heading("Load by kind");
  await w.table(kindTable(summary));
  const leadRange =
    summary.leadKgLow !== summary.leadKgHigh ? ` (range ${kgText(summary.leadKgLow)} to ${kgText(summary.leadKgHigh)})` : "";
  await w.paragraph(`Estimated lead for settlement: ${kgLbText(summary.leadKg)}${leadRange}, computed from each unit's kind and weight.`, { bold: true });
  if (m.departureScaleKg !== undefined) await w.paragraph(`Departure scale weight: ${kgLbText(m.departureScaleKg)}.`);
  for (const r of summary.remarks) await w.paragraph(r);
  if (m.notes) await w.paragraph(`Notes: ${m.notes}`);

  if (basis.id === "us-full") {
    await w.heading("Shipper's certification (49 CFR 172.204(a)(1))", 90);
    await w.paragraph(SHIPPER_CERTIFICATION);
  }
  w.gap(6);
  await w.signatures(["Shipper", "Carrier", "Receiver (receiving facility)"]);

  await w.heading("Containers on this load", 60);
  await w.table({
    columns: [
      { header: "Container", weight: 2 },
      { header: "Type", weight: 1.1 },
      { header: "UN numbers", weight: 2 },
      { header: "Units", weight: 1, align: "right" },
      { header: "Mass (kg)", weight: 1.5, align: "right" },
      { header: "Mass (lb)", weight: 1.5, align: "right" },
      { header: "Note", weight: 2.6 },
    ],
    rows: summary.byContainer.map((c) => [
      c.labelNumber,
      c.kind,
      c.unNumbers.join(", "),
      countText(c.count),
      kgText(c.massKg),
      lbText(c.massKg),
      c.hasLeakingOrDamaged ? (c.isClosed ? "leaking or damaged units, closed container" : "leaking or damaged units, NOT closed") : "",
    ]),
    totals: ["Total", "", "", countText(summary.count), kgText(summary.massKg), lbText(summary.massKg), ""],
  });

  if (m.includeUnitSchedule) {
    await w.heading("Units on this load", 60);
    await w.table({
      columns: [
        { header: "#", weight: 0.8, align: "right" },
        { header: "Unit", weight: 2 },
        { header: "Container", weight: 1.8 },
        { header: "Kind", weight: 2.6 },
        { header: "Type", weight: 1.2 },
        { header: "Condition", weight: 1.2 },
        { header: "Count", weight: 0.9, align: "right" },
        { header: "Mass (kg)", weight: 1.4, align: "right" },
        { header: "Lead (kg)", weight: 1.4, align: "right" },
      ],
      rows: m.units.map((u, i) => [
        String(i + 1),
        u.id ?? "",
        u.containerLabel,
        u.kind,
        u.isNonSpillable ? "UN2800" : "UN2794",
        u.condition,
        countText(u.count),
        kgText(u.massKg),
        kgText(u.leadKg),
      ]),
      size: 7.5,
    });
  }

  return w.finish();
}
