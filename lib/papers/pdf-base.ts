import { createHash } from "node:crypto";
import PDFDocument from "pdfkit";
import { z } from "zod";
import { AppError, fieldIssues } from "@/lib/errors";
import { CAUTION } from "@/lib/rules/caution";
import { kgToLb } from "@/lib/units";

/** DESIGN.md §6, the project's one caution text: carried in the footer of every page of every paper. */
export { CAUTION };

export const INK = "#23262b";
export const MUTED = "#5d6168";
export const RULE_LIGHT = "#b8b5ad";
export const SHADE = "#efece4";

export type TPageSize = "A4" | "LETTER";

/** What every paper's input carries: when it was issued (the only clock it reads) and under which rulebook. */
export const ZPaperBase = z.object({
  issuedAt: z.iso.datetime({ offset: true, message: "issuedAt must be an ISO 8601 date-time" }),
  rulebook: z.object({ id: z.string().min(1), version: z.string().min(1) }),
  /** A4 or US Letter; when absent, US Letter for a rulebook whose id starts with "us", A4 otherwise */
  pageSize: z.enum(["A4", "LETTER"]).optional(),
  /** goes into the document info (and so the PDF file ID): e.g. the Document row id */
  documentSeed: z.string().optional(),
});
export type TPaperBase = z.input<typeof ZPaperBase>;

export const ZIsoDate = z.iso.date({ message: "must be a date as YYYY-MM-DD" });

export const ZParty = z.object({
  name: z.string().min(1, "name is required"),
  /** lines separated by "\n" */
  address: z.string().default(""),
  regulatoryIds: z.string().default(""),
});
export type TParty = z.input<typeof ZParty>;

/** A party as printed: name, address lines, regulatory IDs. */
export function partyLines(p: z.output<typeof ZParty>): string[] {
  return [p.name, ...p.address.split("\n").filter(Boolean), ...(p.regulatoryIds ? [p.regulatoryIds] : [])];
}

/** Parses a paper's input, turning zod issues into the domain's field error. */
export function parsePaperInput<S extends z.ZodType>(schema: S, input: unknown): z.output<S> {
  const parsed = schema.safeParse(input);
  if (!parsed.success) throw new AppError("invalid_input", "the paper's input is not valid", fieldIssues(parsed.error.issues));
  return parsed.data;
}

export function pageSizeFor(base: { pageSize?: TPageSize; rulebook: { id: string } }): TPageSize {
  return base.pageSize ?? (base.rulebook.id.toLowerCase().startsWith("us") ? "LETTER" : "A4");
}

export const sha256 = (buffer: Buffer): string => createHash("sha256").update(buffer).digest("hex");

/** ISO 8601 date-time in UTC to the minute, e.g. 2025-03-04T14:05Z. */
export const isoDateTime = (iso: string): string => new Date(iso).toISOString().slice(0, 16) + "Z";

const number = (v: number, decimals: number) =>
  v.toLocaleString("en-US", { minimumFractionDigits: decimals, maximumFractionDigits: decimals });
export const kgText = (kg: number, decimals = 1) => `${number(kg, decimals)} kg`;
export const lbText = (kg: number, decimals = 1) => `${number(kgToLb(kg), decimals)} lb`;
export const kgLbText = (kg: number, decimals = 1) => `${kgText(kg, decimals)} (${lbText(kg, decimals)})`;
export const countText = (n: number) => number(n, 0);

export type TColumn = { header: string; weight: number; align?: "left" | "right" };

export const yieldToLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/** How long a paper may hold the event loop between yields, so concurrent renders interleave finely. */
const SLICE_MS = 3;

const MARGIN = 40;
const FOOTER_SPACE = 46;
const BODY = 8.5;

/**
 * A page-flowing writer over pdfkit with the project's plain look: graphite text, thin rules, one
 * light shade for headers. Pages are buffered so the footer ("page n of m", rulebook, caution) is
 * written at the end. Output is deterministic: the only dates in the file come from `issuedAt`.
 */
export class PaperWriter {
  readonly doc: PDFKit.PDFDocument;
  readonly left = MARGIN;
  readonly width: number;
  private readonly footerLeft: string;
  private readonly chunks: Buffer[] = [];
  private readonly done: Promise<Buffer>;
  private sliceStart = performance.now();

  constructor({ title, subject, base }: { title: string; subject: string; base: z.output<typeof ZPaperBase> }) {
    const issued = new Date(base.issuedAt);
    this.doc = new PDFDocument({
      size: pageSizeFor(base),
      margins: { top: MARGIN, left: MARGIN, right: MARGIN, bottom: FOOTER_SPACE + 14 },
      bufferPages: true,
      autoFirstPage: true,
      info: {
        Title: title,
        Subject: subject,
        Author: "Leadger",
        Creator: "Leadger",
        Producer: "Leadger (PDFKit)",
        Keywords: base.documentSeed ?? "",
        CreationDate: issued,
        ModDate: issued,
      },
    });
    this.width = this.doc.page.width - 2 * MARGIN;
    this.footerLeft = `${title}  ·  rulebook ${base.rulebook.id} ${base.rulebook.version}  ·  issued ${isoDateTime(base.issuedAt)}`;
    this.done = new Promise((resolve, reject) => {
      this.doc.on("data", (c: Buffer) => this.chunks.push(c));
      this.doc.on("end", () => resolve(Buffer.concat(this.chunks)));
      this.doc.on("error", reject);
    });
    this.doc.fillColor(INK).strokeColor(INK).font("Helvetica").fontSize(BODY);
  }

  get y() {
    return this.doc.y;
  }
  set y(v: number) {
    this.doc.y = v;
  }
  get bottom() {
    return this.doc.page.height - this.doc.page.margins.bottom;
  }

  /**
   * Yields to the event loop once this paper has held it for a few milliseconds. Output does not
   * depend on it: it only lets other work (and other papers) run between rows.
   */
  async breathe() {
    if (performance.now() - this.sliceStart < SLICE_MS) return;
    await yieldToLoop();
    this.sliceStart = performance.now();
  }

  /** Starts a new page when less than `height` points are left. */
  async ensureSpace(height: number): Promise<boolean> {
    await this.breathe();
    if (this.y + height <= this.bottom) return false;
    this.doc.addPage();
    this.doc.fillColor(INK).font("Helvetica").fontSize(BODY);
    this.y = this.doc.page.margins.top;
    return true;
  }

  gap(points = 8) {
    this.y += points;
  }

  /** Document title block: title left, a reference right, a line of facts below, then a rule. */
  titleBlock({ title, reference, facts }: { title: string; reference?: string; facts: string[] }) {
    const { doc } = this;
    const top = this.y;
    doc.font("Helvetica-Bold").fontSize(15).fillColor(INK).text(title, this.left, top, { width: this.width * 0.68, lineBreak: false });
    if (reference) {
      doc.font("Helvetica-Bold").fontSize(12).text(reference, this.left, top + 2, { width: this.width, align: "right", lineBreak: false });
    }
    doc.font("Helvetica").fontSize(BODY).fillColor(MUTED).text(facts.join("   ·   "), this.left, top + 21, { width: this.width });
    doc.fillColor(INK);
    this.y = Math.max(doc.y, top + 32) + 3;
    this.rule(1);
    this.gap(8);
  }

  rule(lineWidth = 0.5, color = INK) {
    this.doc.save().lineWidth(lineWidth).strokeColor(color).moveTo(this.left, this.y).lineTo(this.left + this.width, this.y).stroke().restore();
  }

  /** A section heading; keeps at least `keepWith` points of what follows on the same page. */
  async heading(text: string, keepWith = 40) {
    this.gap(4);
    await this.ensureSpace(18 + keepWith);
    const { doc } = this;
    const top = this.y;
    doc.font("Helvetica-Bold").fontSize(10.5).fillColor(INK).text(text, this.left, top, { lineBreak: false });
    this.y = top + 16;
    doc.font("Helvetica").fontSize(BODY);
  }

  async paragraph(text: string, { size = BODY, bold = false, color = INK }: { size?: number; bold?: boolean; color?: string } = {}) {
    const { doc } = this;
    doc.font(bold ? "Helvetica-Bold" : "Helvetica").fontSize(size);
    await this.ensureSpace(doc.heightOfString(text, { width: this.width }));
    doc.fillColor(color).text(text, this.left, this.y, { width: this.width });
    doc.fillColor(INK).font("Helvetica").fontSize(BODY);
    this.gap(3);
  }

  /** A framed note (e.g. "not ready"): a thick left bar, text beside it. */
  async notice(lines: string[], { title }: { title: string }) {
    const { doc } = this;
    doc.fontSize(BODY);
    const text = lines.join("\n");
    const h = 16 + doc.heightOfString(text, { width: this.width - 20 }) + 8;
    await this.ensureSpace(h);
    const top = this.y;
    doc.save().rect(this.left, top, this.width, h).lineWidth(0.75).strokeColor(INK).stroke().rect(this.left, top, 4, h).fill(INK).restore();
    doc.font("Helvetica-Bold").text(title, this.left + 12, top + 5, { width: this.width - 20, lineBreak: false });
    doc.font("Helvetica").text(text, this.left + 12, top + 17, { width: this.width - 20 });
    this.y = top + h + 8;
  }

  /** Boxes side by side, each a small label and lines of text; all as tall as the tallest. */
  async boxes(items: { label: string; lines: string[] }[], { columns = items.length }: { columns?: number } = {}) {
    const { doc } = this;
    const w = this.width / columns;
    for (let start = 0; start < items.length; start += columns) {
      const row = items.slice(start, start + columns);
      doc.font("Helvetica").fontSize(BODY);
      const heights = row.map((b) => doc.heightOfString(b.lines.join("\n") || " ", { width: w - 12 }));
      const h = 18 + Math.max(...heights) + 5;
      await this.ensureSpace(h);
      const top = this.y;
      row.forEach((b, i) => {
        const x = this.left + i * w;
        doc.save().rect(x, top, w, h).lineWidth(0.5).strokeColor(INK).stroke().restore();
        doc.font("Helvetica-Bold").fontSize(6.5).fillColor(MUTED).text(b.label.toUpperCase(), x + 6, top + 5, { width: w - 12, lineBreak: false, characterSpacing: 0.4 });
        doc.font("Helvetica").fontSize(BODY).fillColor(INK).text(b.lines.join("\n") || " ", x + 6, top + 15, { width: w - 12 });
      });
      this.y = top + h;
    }
    this.gap(8);
  }

  /**
   * A grid table that flows over pages, repeating its header. A cell that fits on one line is drawn
   * at a computed x without pdfkit's line wrapper (the common case, several times cheaper); longer
   * cells wrap. Row rules are gathered and stroked once per page.
   */
  async table({ columns, rows, totals, size = BODY }: { columns: TColumn[]; rows: string[][]; totals?: string[]; size?: number }) {
    const { doc } = this;
    const sum = columns.reduce((s, c) => s + c.weight, 0);
    const widths = columns.map((c) => (c.weight / sum) * this.width);
    const xs = widths.map((_, i) => this.left + widths.slice(0, i).reduce((s, w) => s + w, 0));
    const pad = size < 8 ? 2.5 : 4;
    const lineH = size * 1.2;
    const inner = widths.map((w) => w - 2 * pad);
    const measured = new Map<string, number>();
    // measured with the font and size already set on the document, which `font` names
    const widthOf = (font: string, t: string) => {
      const key = font + "\u0000" + t;
      let v = measured.get(key);
      if (v === undefined) measured.set(key, (v = t.includes("\n") ? Infinity : doc.widthOfString(t)));
      return v;
    };

    let segmentTop = this.y;
    let ruleYs: number[] = [];
    const closeSegment = () => {
      doc.save().lineWidth(0.3).strokeColor(RULE_LIGHT);
      for (const y of ruleYs) doc.moveTo(this.left, y).lineTo(this.left + this.width, y);
      for (const x of xs.slice(1)) doc.moveTo(x, segmentTop).lineTo(x, this.y);
      doc.stroke().lineWidth(0.75).strokeColor(INK).rect(this.left, segmentTop, this.width, this.y - segmentTop).stroke().restore();
      ruleYs = [];
    };
    const drawCells = (cells: string[], font: string, top: number, fits: boolean[]) => {
      cells.forEach((t, i) => {
        if (t === "") return;
        const align = columns[i].align ?? "left";
        if (fits[i]) {
          const w = widthOf(font, t);
          const x = align === "right" ? xs[i] + pad + inner[i] - w : xs[i] + pad;
          doc.text(t, x, top + pad + 0.5, { lineBreak: false, textWidth: w, wordCount: 1 } as PDFKit.Mixins.TextOptions);
        } else {
          doc.text(t, xs[i] + pad, top + pad + 0.5, { width: inner[i], align });
        }
      });
    };
    const header = () => {
      const font = "Helvetica-Bold header";
      doc.font("Helvetica-Bold").fontSize(size - 0.5).fillColor(INK);
      const h = lineH + 2 * pad;
      const top = (segmentTop = this.y);
      doc.save().rect(this.left, top, this.width, h).fill(SHADE).restore();
      const names = columns.map((c) => c.header);
      drawCells(names, font, top, names.map((t, i) => widthOf(font, t) <= inner[i]));
      this.y = top + h;
      doc.save().lineWidth(0.75).strokeColor(INK).moveTo(this.left, this.y).lineTo(this.left + this.width, this.y).stroke().restore();
    };
    const drawRow = async (cells: string[], isTotal: boolean) => {
      const font = isTotal ? "Helvetica-Bold" : "Helvetica";
      doc.font(font).fontSize(size);
      const fits = cells.map((t, i) => widthOf(font, t) <= inner[i]);
      let h = lineH;
      cells.forEach((t, i) => {
        if (!fits[i]) h = Math.max(h, doc.heightOfString(t, { width: inner[i] }));
      });
      h += 2 * pad;
      if (this.y + h > this.bottom) {
        closeSegment();
        await this.ensureSpace(this.bottom);
        header();
        doc.font(font).fontSize(size);
      }
      const top = this.y;
      drawCells(cells, font, top, fits);
      this.y = top + h;
      if (isTotal) doc.save().lineWidth(0.75).strokeColor(INK).moveTo(this.left, top).lineTo(this.left + this.width, top).stroke().restore();
      else ruleYs.push(this.y);
    };

    await this.ensureSpace(3 * (lineH + 2 * pad));
    header();
    for (const r of rows) {
      await drawRow(r, false);
      await this.breathe();
    }
    if (totals) await drawRow(totals, true);
    closeSegment();
    doc.font("Helvetica").fontSize(BODY).fillColor(INK);
    this.gap(10);
  }

  /** A row of small square boxes with a statement each; ticked when confirmed. */
  async checks(items: { text: string; citation: string; isConfirmed: boolean }[]) {
    const { doc } = this;
    for (const item of items) {
      doc.font("Helvetica").fontSize(BODY);
      const body = `${item.isConfirmed ? "Confirmed" : "NOT CONFIRMED"}: ${item.text}  (${item.citation})`;
      const h = doc.heightOfString(body, { width: this.width - 18 }) + 4;
      await this.ensureSpace(h);
      const top = this.y;
      doc.save().lineWidth(0.75).strokeColor(INK).rect(this.left, top + 0.5, 8, 8).stroke();
      if (item.isConfirmed) doc.lineWidth(1.2).moveTo(this.left + 1.6, top + 4.6).lineTo(this.left + 3.6, top + 7).lineTo(this.left + 7, top + 1.8).stroke();
      doc.restore();
      doc.fillColor(INK).text(body, this.left + 16, top, { width: this.width - 18 });
      this.y = top + h;
    }
    this.gap(6);
  }

  /** Signature blocks side by side: name, signature, date lines under each heading. */
  async signatures(parties: string[], fields = ["Name", "Signature", "Date"]) {
    const { doc } = this;
    const h = 14 + fields.length * 22;
    await this.ensureSpace(h + 6);
    const colW = this.width / Math.max(parties.length, 3);
    const top = this.y;
    parties.forEach((p, i) => {
      const x = this.left + i * colW;
      doc.font("Helvetica-Bold").fontSize(BODY).fillColor(INK).text(p, x, top, { width: colW - 14, lineBreak: false });
      fields.forEach((f, j) => {
        const ly = top + 14 + (j + 1) * 22 - 6;
        doc.font("Helvetica").fontSize(7).fillColor(MUTED).text(f, x, ly - 9, { width: colW - 14, lineBreak: false });
        doc.save().lineWidth(0.5).strokeColor(INK).moveTo(x + 44, ly).lineTo(x + colW - 14, ly).stroke().restore();
      });
    });
    doc.fillColor(INK).fontSize(BODY);
    this.y = top + h + 6;
  }

  /** Fill-in fields: each row a list of labels sharing the width, each with a line to write on. */
  async blanks(rows: string[][]) {
    const { doc } = this;
    for (const labels of rows) {
      await this.ensureSpace(26);
      const top = this.y;
      const w = this.width / labels.length;
      labels.forEach((label, i) => {
        const x = this.left + i * w;
        doc.font("Helvetica").fontSize(7).fillColor(MUTED).text(label, x, top, { lineBreak: false });
        doc.save().lineWidth(0.5).strokeColor(INK).moveTo(x, top + 22).lineTo(x + w - 14, top + 22).stroke().restore();
      });
      doc.fillColor(INK).fontSize(BODY);
      this.y = top + 30;
    }
  }

  /** Writes the footer on every buffered page and ends the document. */
  async finish(): Promise<Buffer> {
    const { doc } = this;
    const { start, count } = doc.bufferedPageRange();
    for (let i = start; i < start + count; i++) {
      await this.breathe();
      doc.switchToPage(i);
      // The footer sits inside the bottom margin: lift the margin so pdfkit does not start a new page.
      const bottomMargin = doc.page.margins.bottom;
      doc.page.margins.bottom = 0;
      const y = doc.page.height - FOOTER_SPACE;
      doc.save().lineWidth(0.5).strokeColor(INK).moveTo(this.left, y).lineTo(this.left + this.width, y).stroke().restore();
      doc.font("Helvetica").fontSize(7).fillColor(INK);
      doc.text(this.footerLeft, this.left, y + 5, { width: this.width - 70, lineBreak: false });
      doc.font("Helvetica-Bold").text(`page ${i + 1 - start} of ${count}`, this.left + this.width - 70, y + 5, { width: 70, align: "right", lineBreak: false });
      doc.font("Helvetica").fillColor(MUTED).text(CAUTION, this.left, y + 15, { width: this.width });
      doc.page.margins.bottom = bottomMargin;
    }
    doc.end();
    return this.done;
  }
}
