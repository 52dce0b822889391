import { describe, expect, test } from "vitest";
import { DENSITY_TABLE_20C, GROUP_WEIGHTS, KIND_IDS, KIND_TABLE, KINDS, type TCitedRange } from "@/lib/chemistry";
import { KIND_MODEL } from "@/lib/chemistry/kind-model";
import { PB_SHARE } from "@/lib/chemistry";

const isCited = (source: string) => /REFERENCES\.md/.test(source) || source.startsWith("project estimate");

describe("every number in the kind table carries a citation or a project-estimate tag", () => {
  const rows = KIND_IDS.flatMap((kind) =>
    Object.entries(KIND_TABLE[kind])
      .filter((entry): entry is [string, TCitedRange] => typeof entry[1] === "object")
      .map(([field, r]) => [kind, field, r] as const),
  );
  test.each(rows)("%s.%s", (_kind, _field, r) => {
    expect(isCited(r.source)).toBe(true);
    expect(r.low).toBeLessThanOrEqual(r.value);
    expect(r.value).toBeLessThanOrEqual(r.high);
    expect(r.low).toBeGreaterThan(0);
  });

  test("every group weight is tagged as a project estimate (no published source held)", () => {
    for (const g of GROUP_WEIGHTS) {
      expect(g.source.startsWith("project estimate")).toBe(true);
      expect(g.lowKg).toBeLessThanOrEqual(g.valueKg);
      expect(g.valueKg).toBeLessThanOrEqual(g.highKg);
    }
  });

  test("every density point names REFERENCES.md or says it is from memory", () => {
    for (const p of DENSITY_TABLE_20C) expect(/REFERENCES\.md|from memory/.test(p.source)).toBe(true);
  });
});

describe("flooded starting figures are the published ones", () => {
  test.each<["leadBearingFraction" | "electrolyteFraction" | "chargedSpecificGravity", number, number, string]>([
    ["leadBearingFraction", 0.65, 0.75, "Basel technical guidelines, lead (metal and compounds) 65–75 wt%, REFERENCES.md V2"],
    ["electrolyteFraction", 0.15, 0.25, "Basel technical guidelines, electrolyte 15–25 wt%, REFERENCES.md V2"],
    ["chargedSpecificGravity", 1.26, 1.3, "battery service references, 1.260–1.280 (1.265–1.300 also cited), REFERENCES.md V2"],
  ])("%s spans %f–%f (%s)", (field, low, high) => {
    expect(KIND_TABLE.flooded[field].low).toBe(low);
    expect(KIND_TABLE.flooded[field].high).toBe(high);
  });
});

describe.each(KIND_IDS)("the parts of a %s unit add up to the whole", (kind) => {
  const t = KIND_TABLE[kind];
  const m = KIND_MODEL[kind];

  test("the four table values add up to 1", () => {
    const sum = t.leadBearingFraction.value + t.electrolyteFraction.value + t.polymerFraction.value + t.miscFraction.value;
    expect(sum).toBeCloseTo(1, 12);
  });

  test("the derived fractions (lead as Pb) add up to 1, and 1 lies within the sum of lows and the sum of highs", () => {
    const parts = [m.lead, m.electrolyte, m.polymer, m.other];
    expect(parts.reduce((s, p) => s + p.value, 0)).toBeCloseTo(1, 12);
    expect(parts.reduce((s, p) => s + p.low, 0)).toBeLessThanOrEqual(1);
    expect(parts.reduce((s, p) => s + p.high, 0)).toBeGreaterThanOrEqual(1);
    for (const p of parts) {
      expect(p.low).toBeLessThanOrEqual(p.value);
      expect(p.value).toBeLessThanOrEqual(p.high);
    }
  });

  test("lead as Pb lies between the lead-bearing mass all as PbSO4 and all as metal (molar masses, REFERENCES.md C)", () => {
    expect(m.lead.low).toBeGreaterThanOrEqual(t.leadBearingFraction.low * PB_SHARE.PbSO4);
    expect(m.lead.high).toBeLessThanOrEqual(t.leadBearingFraction.high);
    expect(m.lead.value).toBeLessThan(t.leadBearingFraction.value);
  });
});

describe("KINDS: labels and transport class", () => {
  test.each([
    ["flooded", "Flooded starting", false, "UN2794"],
    ["efb", "EFB", false, "UN2794"],
    ["agm", "AGM", true, "UN2800"],
    ["gel", "Gel", true, "UN2800"],
    ["powersport", "Motorcycle / powersport", false, "UN2794"],
    ["deep-cycle", "Deep-cycle", false, "UN2794"],
    ["traction", "Traction cell", false, "UN2794"],
    ["stationary", "Stationary sealed", true, "UN2800"],
  ] as const)("%s: %s, non-spillable %s, %s (49 CFR 172.101, 173.159a, REFERENCES.md V/V2)", (id, label, isNonSpillable, unNumber) => {
    const k = KINDS.find((x) => x.id === id);
    expect(k).toMatchObject({ label, isNonSpillable, unNumber });
  });

  test("the list covers every kind once", () => {
    expect(KINDS.map((k) => k.id).sort()).toEqual([...KIND_IDS].sort());
  });

  test("powersport is flooded by project choice, and says so", () => {
    expect(KINDS.find((k) => k.id === "powersport")?.note).toMatch(/project choice/);
  });
});
