// Helpers that read generated PDFs with poppler-utils and zbar-tools (Debian: poppler-utils, zbar-tools).
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";

function withFile<T>(pdf: Buffer, fn: (file: string, dir: string) => T): T {
  const dir = mkdtempSync(path.join(tmpdir(), "leadger-papers-"));
  try {
    const file = path.join(dir, "paper.pdf");
    writeFileSync(file, pdf);
    return fn(file, dir);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** `pdftotext -layout`, split into pages on form feeds. */
export function pdfPages(pdf: Buffer): string[] {
  const text = withFile(pdf, (file) => execFileSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" }));
  const pages = text.split("\f");
  if (pages.at(-1)?.trim() === "") pages.pop();
  return pages;
}

/** `pdfinfo -isodates` as key → value. */
export function pdfInfo(pdf: Buffer): Record<string, string> {
  const text = withFile(pdf, (file) => execFileSync("pdfinfo", ["-isodates", file], { encoding: "utf8" }));
  return Object.fromEntries(text.split("\n").filter((l) => l.includes(":")).map((l) => [l.slice(0, l.indexOf(":")).trim(), l.slice(l.indexOf(":") + 1).trim()]));
}

/** Whitespace (line breaks of wrapped text included) collapsed to single spaces. */
export const squash = (s: string) => s.replace(/\s+/g, " ").trim();

export type TGrayImage = { width: number; height: number; pixels: Buffer };

/** One page as an 8-bit grey PGM (P5), read with pdftoppm. */
export function pagePgm(pdf: Buffer, { page = 1, dpi = 50 }: { page?: number; dpi?: number } = {}): Buffer {
  return withFile(pdf, (file, dir) => {
    const out = path.join(dir, "page");
    execFileSync("pdftoppm", ["-r", String(dpi), "-gray", "-f", String(page), "-l", String(page), "-singlefile", file, out]);
    return readFileSync(`${out}.pgm`);
  });
}

/** Parses a binary PGM: "P5", width, height, maxval (≤ 255), one whitespace byte, then the pixels. */
export function parsePgm(bytes: Buffer): TGrayImage {
  let pos = 0;
  const token = () => {
    for (;;) {
      while (/\s/.test(String.fromCharCode(bytes[pos]))) pos++;
      if (bytes[pos] !== 0x23) break; // "#" comment to end of line
      while (bytes[pos] !== 0x0a) pos++;
    }
    const start = pos;
    while (!/\s/.test(String.fromCharCode(bytes[pos]))) pos++;
    return bytes.subarray(start, pos).toString("ascii");
  };
  if (token() !== "P5") throw new Error("not a binary PGM");
  const width = Number(token());
  const height = Number(token());
  const maxval = Number(token());
  if (maxval > 255) throw new Error("16-bit PGM not supported");
  pos++; // the single whitespace byte after maxval
  return { width, height, pixels: bytes.subarray(pos, pos + width * height) };
}

/** Share of pixels whose grey level differs by more than `threshold`, and the mean absolute difference. */
export function compareGray(a: TGrayImage, b: TGrayImage, threshold = 64) {
  if (a.width !== b.width || a.height !== b.height) return { sameSize: false, differingShare: 1, meanAbsDiff: 255 };
  let differing = 0;
  let sum = 0;
  for (let i = 0; i < a.pixels.length; i++) {
    const d = Math.abs(a.pixels[i] - b.pixels[i]);
    sum += d;
    if (d > threshold) differing++;
  }
  return { sameSize: true, differingShare: differing / a.pixels.length, meanAbsDiff: sum / a.pixels.length };
}

/** Decodes the barcodes on one page rendered with `pdftoppm -r <dpi>`: zbarimg's raw output, one per line. */
export function decodeBarcodes(pdf: Buffer, { page = 1, dpi = 200 }: { page?: number; dpi?: number } = {}): string[] {
  return withFile(pdf, (file, dir) => {
    const out = path.join(dir, "page");
    execFileSync("pdftoppm", ["-r", String(dpi), "-png", "-gray", "-f", String(page), "-l", String(page), "-singlefile", file, out]);
    // zbarimg complains on stderr that there is no D-Bus; only stdout matters
    const raw = execFileSync("zbarimg", ["-q", "--raw", `${out}.png`], { encoding: "utf8", stdio: ["ignore", "pipe", "ignore"] });
    return raw.split("\n").filter(Boolean);
  });
}

/** Formats like the papers do (en-US grouping), computed here on its own so a test checks the paper. */
export const fmt = (v: number, decimals = 1) =>
  new Intl.NumberFormat("en-US", { minimumFractionDigits: decimals, maximumFractionDigits: decimals }).format(v);
