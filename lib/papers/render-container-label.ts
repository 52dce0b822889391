import { toBuffer } from "bwip-js/node";
import { z } from "zod";
import { ZContainerKind } from "@/lib/loads/summarise-load";
import { LEAK_HANDLING } from "@/lib/rules/caution";
import { INK, MUTED, PaperWriter, ZIsoDate, ZPaperBase, ZParty, parsePaperInput, partyLines } from "@/lib/papers/pdf-base";

/** DESIGN.md §6 handling guidance (the project's one text), with the storage rule for such units. */
export const LEAKING_HANDLING_NOTE = `Holds leaking or damaged batteries. ${LEAK_HANDLING} The container must be structurally sound, compatible with the contents and free of leaks (40 CFR 273.13(a)(1), 273.33(a)(1)).`;

export const ZContainerLabelInput = ZPaperBase.extend({
  /** Code 128 carries printable ASCII */
  labelNumber: z.string().regex(/^[\x20-\x7e]{1,40}$/, "the label number must be 1 to 40 plain characters"),
  /** the wording of the site's rulebook, e.g. "Universal Waste—Batteries" (40 CFR 273.14(a), 273.34(a)) */
  wording: z.string().min(1),
  wordingCitation: z.string().default(""),
  /** YYYY-MM-DD, the date the first unit went in; null for an empty container */
  accumulationStart: ZIsoDate.nullable(),
  /** YYYY-MM-DD, the end of the accumulation limit as the limits engine computed it */
  keepUntil: ZIsoDate.optional(),
  keepUntilCitation: z.string().default(""),
  site: ZParty,
  containerKind: ZContainerKind,
  bay: z.string().default(""),
  holdsLeakingOrDamaged: z.boolean().default(false),
});
export type TContainerLabelInput = z.input<typeof ZContainerLabelInput>;

/** A Code 128 image with a white background and a quiet zone of more than 10 modules each side. */
export function code128Png(text: string): Promise<Buffer> {
  return toBuffer({
    bcid: "code128",
    text,
    scale: 3,
    height: 14,
    includetext: false,
    backgroundcolor: "FFFFFF",
    paddingwidth: 12,
    paddingheight: 4,
  });
}

/** A container label: the rulebook wording, accumulation start date, the label number as a barcode and text. */
export async function renderContainerLabel(input: TContainerLabelInput): Promise<Buffer> {
  const l = parsePaperInput(ZContainerLabelInput, input);
  const barcode = await code128Png(l.labelNumber);
  const w = new PaperWriter({ title: "Container label", subject: `Container ${l.labelNumber}`, base: l });
  const { doc } = w;
  const x = w.left;
  const inner = w.width - 36;
  const top = w.y;

  let y = top + 20;
  doc.font("Helvetica-Bold").fontSize(30).fillColor(INK);
  doc.text(l.wording, x + 18, y, { width: inner, align: "center" });
  y = doc.y + 4;
  if (l.wordingCitation) {
    doc.font("Helvetica").fontSize(8).fillColor(MUTED).text(l.wordingCitation, x + 18, y, { width: inner, align: "center" });
    y = doc.y;
  }
  y += 16;
  doc.save().lineWidth(0.5).strokeColor(INK).moveTo(x + 18, y).lineTo(x + 18 + inner, y).stroke().restore();
  y += 14;

  doc.font("Helvetica").fontSize(9).fillColor(MUTED).text("ACCUMULATION START DATE", x + 18, y, { width: inner, align: "center", characterSpacing: 0.6 });
  y = doc.y + 2;
  doc.font("Helvetica-Bold").fontSize(30).fillColor(INK).text(l.accumulationStart ?? "not started (empty)", x + 18, y, { width: inner, align: "center" });
  y = doc.y + 2;
  if (l.keepUntil) {
    const cite = l.keepUntilCitation ? ` (${l.keepUntilCitation})` : "";
    doc.font("Helvetica").fontSize(10).text(`Ship by ${l.keepUntil}${cite}`, x + 18, y, { width: inner, align: "center" });
    y = doc.y;
  }
  y += 18;

  // 1.5 pt per barcode module: wide enough to scan from a printed page and from a 200 dpi image.
  // PNG IHDR: width and height as big-endian 32-bit integers at bytes 16 and 20; 3 px per module.
  const imageW = (barcode.readUInt32BE(16) / 3) * 1.5;
  const imageH = (barcode.readUInt32BE(20) / 3) * 1.5;
  doc.image(barcode, x + (w.width - imageW) / 2, y, { width: imageW, height: imageH });
  y += imageH + 6;
  doc.font("Helvetica-Bold").fontSize(20).fillColor(INK).text(l.labelNumber, x + 18, y, { width: inner, align: "center" });
  y = doc.y + 16;

  doc.save().lineWidth(0.5).strokeColor(INK).moveTo(x + 18, y).lineTo(x + 18 + inner, y).stroke().restore();
  y += 10;
  const facts = [
    ["Site", partyLines(l.site).join(", ")],
    ["Container", l.containerKind + (l.bay ? `, bay ${l.bay}` : "")],
  ];
  for (const [k, v] of facts) {
    doc.font("Helvetica-Bold").fontSize(10).fillColor(INK).text(k, x + 18, y, { lineBreak: false });
    doc.font("Helvetica").fontSize(10).text(v, x + 100, y, { width: inner - 82 });
    y = doc.y + 4;
  }

  if (l.holdsLeakingOrDamaged) {
    y += 10;
    doc.font("Helvetica").fontSize(10);
    const h = doc.heightOfString(LEAKING_HANDLING_NOTE, { width: inner - 24 }) + 30;
    doc.save().lineWidth(1.5).strokeColor(INK).rect(x + 18, y, inner, h).stroke().restore();
    doc.font("Helvetica-Bold").fontSize(11).text("Handle with care", x + 30, y + 8, { lineBreak: false });
    doc.font("Helvetica").fontSize(10).text(LEAKING_HANDLING_NOTE, x + 30, y + 22, { width: inner - 24 });
    y += h;
  }
  y += 18;
  doc.save().lineWidth(2).strokeColor(INK).rect(x, top, w.width, y - top).stroke().restore();
  w.y = y;
  return w.finish();
}
