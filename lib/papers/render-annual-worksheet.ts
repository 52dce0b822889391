import { z } from "zod";
import { tierTwoRangeCode } from "@/lib/annual/tier-two-range-code";
import { kgToLb } from "@/lib/units";
import { INK, MUTED, PaperWriter, RULE_LIGHT, ZPaperBase, ZParty, countText, kgText, lbText, parsePaperInput, partyLines } from "@/lib/papers/pdf-base";

const ZSubstance = z.object({
  /** e.g. "Sulfuric acid", "Lead", "Battery mass (as a mixture)" */
  name: z.string().min(1),
  cas: z.string().default(""),
  maxDailyKg: z.number().nonnegative(),
  averageDailyKg: z.number().nonnegative(),
  daysOnSite: z.number().int().min(0).max(366),
  /** the reporting threshold that applies at the site, if any */
  thresholdKg: z.number().positive().optional(),
  thresholdCitation: z.string().default(""),
  /** on-hand amount for each day of the year, index 0 = 1 January; drawn as a line chart */
  dailyKg: z.array(z.number().nonnegative()).max(366).optional(),
});

export const ZAnnualWorksheetInput = ZPaperBase.extend({
  site: ZParty,
  year: z.number().int().min(1990).max(2200),
  /** the unit of the chart's axis; the tables show both */
  chartUnit: z.enum(["kg", "lb"]).default("lb"),
  substances: z.array(ZSubstance).min(1),
  notes: z.array(z.string()).default([]),
});
export type TAnnualWorksheetInput = z.input<typeof ZAnnualWorksheetInput>;
type TSubstance = z.output<typeof ZSubstance>;

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
const THRESHOLD = "#9b3b26";

/** The smallest of 1, 2, 2.5 or 5 × 10^n at or above v: a round top for the axis. */
function niceCeil(v: number): number {
  if (v <= 0) return 1;
  const p = 10 ** Math.floor(Math.log10(v));
  return [1, 2, 2.5, 5, 10].map((m) => m * p).find((c) => c >= v)!;
}

function dayOfYear(year: number, month: number): number {
  return (Date.UTC(year, month, 1) - Date.UTC(year, 0, 1)) / 86_400_000;
}

async function chart(w: PaperWriter, s: TSubstance, year: number, unit: "kg" | "lb") {
  const daily = s.dailyKg;
  if (!daily || daily.length === 0) return;
  const { doc } = w;
  const conv = (kg: number) => (unit === "lb" ? kgToLb(kg) : kg);
  const h = 96;
  await w.ensureSpace(h + 30);
  const x0 = w.left + 46;
  const x1 = w.left + w.width - 6;
  const y0 = w.y + 4;
  const y1 = y0 + h;
  const days = dayOfYear(year, 12); // Date.UTC rolls month 12 over to 1 January of the next year
  const values = daily.map(conv);
  const threshold = s.thresholdKg !== undefined ? conv(s.thresholdKg) : undefined;
  const top = niceCeil(Math.max(...values, threshold ?? 0) * 1.08);
  const px = (d: number) => x0 + ((x1 - x0) * d) / (days - 1);
  const py = (v: number) => y1 - ((y1 - y0) * v) / top;

  doc.save().lineWidth(0.3).strokeColor(RULE_LIGHT);
  for (let i = 0; i <= 4; i++) doc.moveTo(x0, py((top * i) / 4)).lineTo(x1, py((top * i) / 4));
  for (let m = 1; m < 12; m++) doc.moveTo(px(dayOfYear(year, m)), y0).lineTo(px(dayOfYear(year, m)), y1);
  doc.stroke().restore();
  doc.save().lineWidth(0.75).strokeColor(INK).moveTo(x0, y0).lineTo(x0, y1).lineTo(x1, y1).stroke().restore();

  doc.font("Helvetica").fontSize(6.5).fillColor(MUTED);
  for (let i = 0; i <= 4; i++) {
    const label = `${countText((top * i) / 4)} ${unit}`;
    doc.text(label, x0 - 4 - doc.widthOfString(label), py((top * i) / 4) - 3, { lineBreak: false });
  }
  MONTHS.forEach((m, i) => {
    const mid = (px(dayOfYear(year, i)) + px(Math.min(days - 1, dayOfYear(year, i + 1)))) / 2;
    doc.text(m, mid - doc.widthOfString(m) / 2, y1 + 3, { lineBreak: false });
  });

  doc.save().lineWidth(1).strokeColor(INK).lineJoin("round");
  values.forEach((v, d) => (d === 0 ? doc.moveTo(px(d), py(v)) : doc.lineTo(px(d), py(v))));
  doc.stroke().restore();

  if (threshold !== undefined) {
    const ty = py(threshold);
    doc.save().lineWidth(1).strokeColor(THRESHOLD).dash(4, { space: 3 }).moveTo(x0, ty).lineTo(x1, ty).stroke().undash().restore();
    const label = `threshold ${countText(threshold)} ${unit}`;
    doc.font("Helvetica-Bold").fontSize(7);
    const lw = doc.widthOfString(label);
    doc.save().rect(x1 - lw - 5, ty - 10, lw + 5, 8.5).fill("#ffffff").restore();
    doc.fillColor(THRESHOLD).text(label, x1 - lw - 2, ty - 9, { lineBreak: false });
  }
  doc.fillColor(INK).font("Helvetica").fontSize(8.5);
  w.y = y1 + 16;
}

/**
 * The annual figures worksheet: per substance the maximum daily amount, average daily amount and days
 * on site with their Tier II range codes (40 CFR 370.42–370.45; codes by lib/annual's rule), and the
 * year's daily on-hand line.
 */
export async function renderAnnualWorksheet(input: TAnnualWorksheetInput): Promise<Buffer> {
  const a = parsePaperInput(ZAnnualWorksheetInput, input);
  const w = new PaperWriter({ title: "Annual figures worksheet", subject: `Annual figures ${a.year}, ${a.site.name}`, base: a });
  w.titleBlock({
    title: "Annual figures worksheet",
    reference: String(a.year),
    facts: [`reporting year ${a.year}`, "Tier II: maximum amount, average daily amount, days on site", "40 CFR 370.42–370.45"],
  });
  await w.boxes([
    { label: "Site", lines: partyLines(a.site) },
    { label: "Period", lines: [`${a.year}-01-01 to ${a.year}-12-31`, "Range codes: 40 CFR 370.43(a)"] },
  ]);

  for (const s of a.substances) {
    await w.heading(s.cas ? `${s.name} (CAS ${s.cas})` : s.name, 160);
    if (s.thresholdKg !== undefined) {
      await w.paragraph(`Reporting threshold: ${lbText(s.thresholdKg, 0)} (${kgText(s.thresholdKg)})${s.thresholdCitation ? `, ${s.thresholdCitation}` : ""}.`);
    }
    await w.table({
      columns: [
        { header: "Figure", weight: 3 },
        { header: "Amount (lb)", weight: 2, align: "right" },
        { header: "Amount (kg)", weight: 2, align: "right" },
        { header: "Range code", weight: 1.5, align: "right" },
      ],
      rows: [
        ["Maximum daily amount", lbText(s.maxDailyKg), kgText(s.maxDailyKg), tierTwoRangeCode(kgToLb(s.maxDailyKg))],
        ["Average daily amount", lbText(s.averageDailyKg), kgText(s.averageDailyKg), tierTwoRangeCode(kgToLb(s.averageDailyKg))],
        ["Days on site", `${s.daysOnSite} days`, "", ""],
      ],
    });
    await chart(w, s, a.year, a.chartUnit);
  }

  if (a.notes.length > 0) {
    await w.heading("Notes");
    for (const n of a.notes) await w.paragraph(`– ${n}`);
  }
  return w.finish();
}
