import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import path from "node:path";
import { beforeAll, describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { CAUTION, sha256 } from "@/lib/papers/pdf-base";
import { renderManifest } from "@/lib/papers/render-manifest";
import { compareGray, fmt, pagePgm, parsePgm, pdfInfo, pdfPages, squash } from "./pdf-tools";
import { sampleManifest } from "./sample-inputs";

const KG_PER_LB = 0.45359237; // exact (REFERENCES.md, Unit conversions)
const CERTIFICATION_172_204 =
  "This is to certify that the above-named materials are properly classified, described, packaged, marked and labeled, and are in proper condition for transportation according to the applicable regulations of the Department of Transportation.";
const UN2794_172_101 = "UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III";
const UN2800_172_101 = "UN2800, Batteries, wet, non-spillable, electric storage, 8, PG III";

const EXCEPTION_ALL = { "no-other-hazmat": true, "loaded-braced": true, "other-cargo-secured": true, "sole-shipper": true };

describe("load manifest, full US shipping paper (26 pallets, 1 500 units)", () => {
  const input = sampleManifest();
  let pdf: Buffer;
  let pages: string[];
  beforeAll(async () => {
    pdf = await renderManifest(input);
    pages = pdfPages(pdf);
  });

  test("carries both descriptions exactly, each on its own line (49 CFR 172.101, 172.202(a))", () => {
    const lines = pages[0].split("\n");
    expect(lines.filter((l) => l.includes(UN2794_172_101))).toHaveLength(1);
    expect(lines.filter((l) => l.includes(UN2800_172_101))).toHaveLength(1);
  });

  test("carries the shipper's certification word for word (49 CFR 172.204(a)(1))", () => {
    expect(squash(pages.join(" "))).toContain(CERTIFICATION_172_204);
  });

  test("carries the emergency telephone (49 CFR 172.604(a)) and ERG guide 154 (from memory, REFERENCES.md M)", () => {
    expect(pages[0]).toContain("+1 555 0142");
    expect(pages[0]).toContain("ERG guide 154");
  });

  test("description lines show packages and mass computed from the input load", () => {
    for (const [nonSpillable, description] of [[false, UN2794_172_101], [true, UN2800_172_101]] as const) {
      const units = input.units.filter((u) => u.isNonSpillable === nonSpillable);
      const pallets = new Set(units.map((u) => u.containerLabel)).size;
      const kg = units.reduce((s, u) => s + u.massKg, 0);
      const line = pages[0].split("\n").find((l) => l.includes(description))!;
      expect(squash(line)).toBe(`${pallets} pallets ${description} ${fmt(kg)} kg ${fmt(kg / KG_PER_LB)} lb`);
    }
  });

  test("totals and lines by kind match the input", () => {
    const text = pages[0];
    const kg = input.units.reduce((s, u) => s + u.massKg, 0);
    expect(squash(text)).toContain(`Total 1,500 batteries, gross mass ${fmt(kg)} kg ${fmt(kg / KG_PER_LB)} lb`);
    const kinds = new Map<string, { count: number; kg: number; nonSpillable: boolean }>();
    for (const u of input.units) {
      const k = kinds.get(u.kind) ?? { count: 0, kg: 0, nonSpillable: u.isNonSpillable };
      kinds.set(u.kind, { ...k, count: k.count + 1, kg: k.kg + u.massKg });
    }
    expect(kinds.size).toBe(5);
    for (const [kind, k] of kinds) {
      const type = k.nonSpillable ? "non-spillable (UN2800)" : "flooded (UN2794)";
      expect(squash(text)).toContain(`${kind} ${type} ${fmt(k.count, 0)} ${fmt(k.kg)} kg ${fmt(k.kg / KG_PER_LB)} lb`);
    }
    const leadKg = input.units.reduce((s, u) => s + u.leadKg, 0);
    expect(squash(text)).toContain(`Estimated lead for settlement: ${fmt(leadKg)} kg (${fmt(leadKg / KG_PER_LB)} lb)`);
  });

  test("names shipper, consignee, carrier, vehicle, date and load reference; has three signature blocks", () => {
    const text = pages[0];
    for (const s of ["Bramblecourt Battery Yard", "EPA ID OHX000000123", "Greywater Lead Recovery", "Oxbow Freight Lines", "plate XQ-4417", "ship date 2025-03-05", "LD-2025-0042"]) {
      expect(text).toContain(s);
    }
    expect(squash(text)).toMatch(/Shipper Carrier Receiver \(receiving facility\)/);
    expect(text.match(/Signature/g)).toHaveLength(3);
    expect(text).not.toContain("not ready to ship");
  });

  test("lists every container with its unit count", () => {
    const all = squash(pages.join(" "));
    for (const c of input.containers) {
      const n = input.units.filter((u) => u.containerLabel === c.labelNumber).length;
      expect(all).toMatch(new RegExp(`${c.labelNumber} pallet UN2[0-9]{3}(, UN2800)? ${n} `));
    }
  });

  test('every page has "page n of m", the rulebook and version, and the caution (DESIGN.md §6)', () => {
    expect(pages.length).toBeGreaterThan(1);
    pages.forEach((p, i) => {
      expect(p).toContain(`page ${i + 1} of ${pages.length}`);
      expect(p).toContain("rulebook us-federal 2025.1");
      expect(squash(p)).toContain(CAUTION);
    });
  });

  test("is US Letter for a US rulebook, with the document dates taken from issuedAt", () => {
    const info = pdfInfo(pdf);
    expect(info["Page size"]).toMatch(/^612 x 792 pts \(letter\)/);
    expect(info.CreationDate).toBe("2025-03-04T14:05:00Z");
    expect(info.ModDate).toBe("2025-03-04T14:05:00Z");
    expect(Number(info.Pages)).toBe(pdfPages(pdf).length);
  });
});

describe("determinism", () => {
  test("the same input gives the same bytes; another seed or issue time does not", async () => {
    const input = sampleManifest();
    const [a, b] = await Promise.all([renderManifest(input), renderManifest(structuredClone(input))]);
    expect(sha256(a)).toBe(sha256(b));
    expect(a.equals(b)).toBe(true);
    expect(sha256(a)).toMatch(/^[0-9a-f]{64}$/);
    expect(sha256(await renderManifest({ ...input, documentSeed: "doc-sample-0002" }))).not.toBe(sha256(a));
    expect(sha256(await renderManifest({ ...input, issuedAt: "2025-03-04T14:06:00Z" }))).not.toBe(sha256(a));
  });
});

describe("a manifest with a unit schedule runs over many pages", () => {
  test('every unit is listed and every page says "page n of m"', async () => {
    const input = sampleManifest({ includeUnitSchedule: true });
    const pages = pdfPages(await renderManifest(input));
    expect(pages.length).toBeGreaterThan(20);
    pages.forEach((p, i) => expect(p).toContain(`page ${i + 1} of ${pages.length}`));
    const all = pages.join("\n");
    for (const u of [input.units[0], input.units[749], input.units[1499]]) expect(all).toContain(u.id!);
    expect(all.match(/^\s*\d+\s+U\d{5}\s/gm)).toHaveLength(1500);
  });
});

describe("other bases", () => {
  test("the 173.159(e) exception: a statement with the four conditions, and no hazmat certification (49 CFR 173.159(e))", async () => {
    const text = squash(pdfPages(await renderManifest(sampleManifest({ basis: "us-exception", checklist: EXCEPTION_ALL }))).join(" "));
    expect(text).toContain("Shipped by highway or rail under 49 CFR 173.159(e)");
    expect(text.match(/Confirmed: /g)).toHaveLength(4);
    expect(text).toContain("Confirmed: The vehicle carries nothing shipped by anyone other than the shipper of the batteries.");
    expect(text).toContain("This paper makes no hazardous materials certification");
    expect(text).not.toContain("This is to certify");
    expect(text).not.toContain(UN2794_172_101);
    expect(text).not.toContain("not ready to ship");
  });

  test("an unconfirmed condition prints as NOT CONFIRMED under a draft notice", async () => {
    const checklist = { ...EXCEPTION_ALL, "sole-shipper": false };
    const text = squash(pdfPages(await renderManifest(sampleManifest({ basis: "us-exception", checklist }))).join(" "));
    expect(text).toContain("Draft: this load is not ready to ship");
    expect(text).toContain("NOT CONFIRMED: The vehicle carries nothing shipped by anyone other than the shipper");
  });

  test("leaking units outside closed containers block the exception (PHMSA interpretations 06-0031, 09-0227)", async () => {
    const base = sampleManifest({ basis: "us-exception", checklist: EXCEPTION_ALL });
    const units = base.units.map((u, i) => (i === 3 ? { ...u, condition: "leaking" as const } : u));
    const text = squash(pdfPages(await renderManifest({ ...base, units })).join(" "));
    expect(text).toContain("Blocked: Leaking or damaged units rule out the highway exception");
    expect(text).toContain("leaking or damaged units, NOT closed");
  });

  test("full ADR: A4, the ADR description with tunnel code (E) and the waste code (ADR Table A; Decision 2000/532/EC)", async () => {
    const pdf = await renderManifest(sampleManifest({ basis: "eu-adr-full", rulebook: { id: "eu-adr", version: "2025" }, checklist: {} }));
    const pages = pdfPages(pdf);
    expect(pdfInfo(pdf)["Page size"]).toMatch(/\(A4\)/);
    const lines = pages[0].split("\n");
    // "WASTE" before the UN number: ADR 5.4.1.1.3, from memory
    expect(lines.some((l) => l.includes("WASTE UN 2794 BATTERIES, WET, FILLED WITH ACID, electric storage, 8, (E)"))).toBe(true);
    const text = squash(pages.join(" "));
    expect(text).toContain("Waste code: 16 06 01* lead batteries");
    expect(text).toContain("tunnel code (E)");
    expect(text).toContain("classification code C11");
    expect(text).not.toContain("This is to certify");
    expect(text).toContain("rulebook eu-adr 2025");
  });

  test("ADR special provision 598: a statement of its conditions and the waste code (ADR 3.3.1)", async () => {
    const checklist = { "cases-undamaged": true, secured: true, "no-acid-outside": true, "short-circuit": true, "waste-code": true };
    const text = squash(pdfPages(await renderManifest(sampleManifest({ basis: "eu-sp598", rulebook: { id: "eu-adr", version: "2025" }, checklist }))).join(" "));
    expect(text).toContain("Used batteries carried under ADR special provision 598");
    expect(text.match(/Confirmed: /g)).toHaveLength(5);
    expect(text).toContain("16 06 01*");
    expect(text).not.toContain("not ready to ship");
  });

  test("bad input is a field error", async () => {
    await expect(renderManifest(sampleManifest({ shipDate: "5 March" }))).rejects.toSatisfy(
      (e) => e instanceof AppError && e.issues.some((i) => i.field === "shipDate"),
    );
  });
});

// Page 1 against a committed image: `pdftoppm -r 50 -gray`, compared byte by byte with a small tolerance.
// Refresh after an intended layout change: UPDATE_REFERENCE_IMAGES=1 npx vitest run --project unit test/unit/papers
describe("page 1 against the committed reference image", () => {
  const reference = fileURLToPath(new URL("../../fixtures/papers/manifest-us-full-page1.pgm", import.meta.url));
  const MAX_DIFFERING_SHARE = 0.001; // 0.1 % of pixels may differ by more than 64 grey levels
  const MAX_MEAN_ABS_DIFF = 0.5;

  test("matches within tolerance", async () => {
    const pgm = pagePgm(await renderManifest(sampleManifest()), { page: 1, dpi: 50 });
    if (process.env.UPDATE_REFERENCE_IMAGES === "1") {
      mkdirSync(path.dirname(reference), { recursive: true });
      writeFileSync(reference, pgm);
    }
    expect(existsSync(reference), "no reference image: run with UPDATE_REFERENCE_IMAGES=1").toBe(true);
    const cmp = compareGray(parsePgm(pgm), parsePgm(readFileSync(reference)));
    expect(cmp.sameSize).toBe(true);
    expect(cmp.differingShare).toBeLessThanOrEqual(MAX_DIFFERING_SHARE);
    expect(cmp.meanAbsDiff).toBeLessThanOrEqual(MAX_MEAN_ABS_DIFF);
  });

  test("the comparison does notice a changed page (a different basis)", async () => {
    const pgm = pagePgm(await renderManifest(sampleManifest({ basis: "us-exception", checklist: EXCEPTION_ALL })), { page: 1, dpi: 50 });
    const cmp = compareGray(parsePgm(pgm), parsePgm(readFileSync(reference)));
    expect(cmp.differingShare).toBeGreaterThan(MAX_DIFFERING_SHARE);
  });
});
