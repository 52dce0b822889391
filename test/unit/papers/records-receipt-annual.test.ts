import Papa from "papaparse";
import { describe, expect, test } from "vitest";
import { CAUTION } from "@/lib/papers/pdf-base";
import { renderAnnualWorksheet } from "@/lib/papers/render-annual-worksheet";
import { renderReceiptForm } from "@/lib/papers/render-receipt-form";
import { renderShipmentRecords, shipmentRecordsCsv } from "@/lib/papers/render-shipment-records";
import { fmt, pdfPages, squash } from "./pdf-tools";
import { sampleAnnual, sampleReceiptForm, sampleRecords } from "./sample-inputs";

const KG_PER_LB = 0.45359237; // exact (REFERENCES.md, Unit conversions)

describe("receipt form", () => {
  test("shows what was shipped, the tolerance band and blanks to fill in", async () => {
    const input = sampleReceiptForm();
    const pages = pdfPages(await renderReceiptForm(input));
    const text = squash(pages.join(" "));
    const kg = input.units.reduce((s, u) => s + u.massKg, 0);
    expect(text).toContain("LD-2025-0042");
    expect(text).toContain(`Total 26 pallets 1,500 ${fmt(kg)} kg ${fmt(kg / KG_PER_LB)} lb`);
    expect(text).toContain(`Within tolerance of the estimate: ${fmt(kg * 0.98)} kg to ${fmt(kg * 1.02)} kg`);
    expect(text).toContain("exactly 2 % is within tolerance");
    for (const blank of ["Scale ticket number", "Date received (YYYY-MM-DD)", "Gross (kg)", "Tare (kg)", "Net received (kg)", "Signature"]) {
      expect(text).toContain(blank);
    }
    pages.forEach((p, i) => {
      expect(p).toContain(`page ${i + 1} of ${pages.length}`);
      expect(squash(p)).toContain(CAUTION);
    });
  });
});

describe("shipment records (40 CFR 273.39)", () => {
  const input = sampleRecords();

  test("the PDF lists received and sent shipments in the period with origin, destination, type and date", async () => {
    const pages = pdfPages(await renderShipmentRecords(input));
    const lines = pages.join("\n").split("\n").map(squash);
    // each row: date, name and type on one line, the address on the next
    const row = (start: string) => lines.findIndex((l) => l.startsWith(start));
    const kestrel = row("2025-01-09 Kestrel Fleet Depot lead-acid batteries, flooded 120 3,410.2 kg 7,518.2 lb T-20250109-1");
    expect(kestrel).toBeGreaterThan(-1);
    expect(lines[kestrel + 1]).toBe("900 Yardline Road, Pell, OH 45991");
    expect(row("2025-02-14 Harrow Lane Tyre & Battery lead-acid batteries, non-spillable 6 121.0 kg")).toBeGreaterThan(-1);
    const sent = row("2025-03-05 Greywater Lead Recovery lead-acid batteries, flooded 1,215 24,885.7 kg");
    expect(lines[sent + 1]).toBe("2 Slagbank Road, Temperance, PA 17999");
    expect(row("2025-01-09")).toBeLessThan(row("2025-02-14"));
    const text = squash(pages.join(" "));
    expect(text).toContain("Date left");
    expect(text).not.toContain("Outside the period");
    expect(text).toContain("at least 3 years");
    expect(text).toContain(`Total 168 ${fmt(3_410.2 + 781.5 + 121.0)} kg`);
  });

  test("the CSV has one row per shipment and type, in date order, and parses back", () => {
    const csv = shipmentRecordsCsv(input);
    expect(csv.endsWith("\r\n")).toBe(true);
    const parsed = Papa.parse<Record<string, string>>(csv.trim(), { header: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(["direction", "date", "counterpart_name", "counterpart_address", "type", "count", "mass_kg", "mass_lb", "reference"]);
    expect(parsed.data.map((r) => [r.direction, r.date, r.count])).toEqual([
      ["received", "2025-01-09", "120"],
      ["received", "2025-02-14", "42"],
      ["received", "2025-02-14", "6"],
      ["sent", "2025-03-05", "1215"],
      ["sent", "2025-03-05", "285"],
    ]);
    expect(parsed.data[0].counterpart_address).toBe("900 Yardline Road, Pell, OH 45991");
    expect(Number(parsed.data[3].mass_lb)).toBeCloseTo(24_885.7 / KG_PER_LB, 1);
  });

  test("a period ending before it starts is refused", () => {
    expect(() => shipmentRecordsCsv({ ...input, from: "2025-04-01", to: "2025-03-01" })).toThrow(/not valid/);
  });
});

describe("annual figures worksheet", () => {
  test("each substance shows max and average daily amounts in lb and kg with range codes, days on site, and a chart with the threshold", async () => {
    const input = sampleAnnual();
    const pages = pdfPages(await renderAnnualWorksheet(input));
    const text = squash(pages.join(" "));
    // the sample's amounts and their range codes read off the 40 CFR 370.43(a) table by hand
    const codes: Record<string, [string, string]> = {
      "Sulfuric acid": ["03", "02"], // max 708.6 lb in 500–999; average 369.8 lb in 100–499
      Lead: ["05", "04"], // 9,264.7 lb in 5 000–9 999; 4,836.0 lb in 1 000–4 999
      "Battery mass (as a mixture)": ["06", "05"], // 13,624.6 lb in 10 000–24 999; 7,111.8 lb in 5 000–9 999
    };
    for (const s of input.substances) {
      expect(text).toContain(s.name);
      const [maxCode, avgCode] = codes[s.name];
      const max = `Maximum daily amount ${fmt(s.maxDailyKg / KG_PER_LB)} lb ${fmt(s.maxDailyKg)} kg ${maxCode}`;
      const avg = `Average daily amount ${fmt(s.averageDailyKg / KG_PER_LB)} lb ${fmt(s.averageDailyKg)} kg ${avgCode}`;
      expect(text).toContain(max);
      expect(text).toContain(avg);
      expect(text).toContain(`Days on site ${s.daysOnSite} days`);
    }
    // the sample's acid peaks above 500 lb: range code 03 (40 CFR 370.43(a)), threshold 500 lb (40 CFR 370.10(a)(1))
    expect(text).toContain("Sulfuric acid (CAS 7664-93-9)");
    expect(text).toContain("threshold 500 lb");
    expect(text).toContain("threshold 10,000 lb");
    expect(text).toMatch(/Jan.*Jun.*Dec/);
    pages.forEach((p, i) => expect(p).toContain(`page ${i + 1} of ${pages.length}`));
  });
});
