import { describe, expect, test } from "vitest";
import { CAUTION } from "@/lib/papers/pdf-base";
import { LEAKING_HANDLING_NOTE, renderContainerLabel } from "@/lib/papers/render-container-label";
import { decodeBarcodes, pdfPages, squash } from "./pdf-tools";
import { sampleLabel } from "./sample-inputs";

describe("container label", () => {
  test.each(["BRK-P0007", "YARD-2025-000123", "D 17/b"])("the Code 128 barcode decodes to the label number %s (zbarimg, pdftoppm -r 200)", async (labelNumber) => {
    const pdf = await renderContainerLabel(sampleLabel({ labelNumber }));
    expect(decodeBarcodes(pdf, { dpi: 200 })).toEqual([labelNumber]);
    expect(pdfPages(pdf)[0]).toContain(labelNumber);
  });

  test("shows the rulebook wording, the accumulation start date, the site and the caution (40 CFR 273.14(a), 273.34(a); DESIGN.md §6)", async () => {
    const [page] = pdfPages(await renderContainerLabel(sampleLabel()));
    expect(page).toContain("Universal Waste—Batteries");
    expect(page).toContain("ACCUMULATION START DATE");
    expect(page).toContain("2025-02-10");
    expect(page).toContain("Ship by 2026-02-10");
    expect(page).toContain("Bramblecourt Battery Yard");
    expect(page).toContain("page 1 of 1");
    expect(squash(page)).toContain(CAUTION);
  });

  test.each([
    [true, true],
    [false, false],
  ])("holds leaking or damaged units = %s → handling note shown = %s (DESIGN.md §6; 40 CFR 273.33(a)(1))", async (holdsLeakingOrDamaged, shown) => {
    const text = squash(pdfPages(await renderContainerLabel(sampleLabel({ holdsLeakingOrDamaged })))[0]);
    expect(text.includes(LEAKING_HANDLING_NOTE)).toBe(shown);
    expect(text.includes("acid-resistant gloves")).toBe(shown);
  });

  test("an empty container says so instead of a date", async () => {
    const [page] = pdfPages(await renderContainerLabel(sampleLabel({ accumulationStart: null, keepUntil: undefined })));
    expect(page).toContain("not started (empty)");
    expect(page).not.toContain("Ship by");
  });

  test("a label number outside printable ASCII is refused", async () => {
    await expect(renderContainerLabel(sampleLabel({ labelNumber: "P—1" }))).rejects.toThrow(/not valid/);
  });
});
