import { describe, expect, test } from "vitest";
import { summariseLoad, type TLoadContainer, type TLoadUnit } from "@/lib/loads/summarise-load";
import { UN2794_DESCRIPTION, UN2800_DESCRIPTION } from "@/lib/papers/hazmat-description";

const KG_PER_LB = 0.45359237; // exact, international yard and pound agreement (REFERENCES.md, Unit conversions)

const containers: TLoadContainer[] = [
  { labelNumber: "P1", kind: "pallet" },
  { labelNumber: "P2", kind: "pallet" },
  { labelNumber: "D1", kind: "drum", isClosed: true },
];
const units: TLoadUnit[] = [
  { kind: "car starter", isNonSpillable: false, containerLabel: "P1", massKg: 18, leadKg: 12, leadKgLow: 11, leadKgHigh: 13 },
  { kind: "car starter", isNonSpillable: false, containerLabel: "P1", massKg: 20, leadKg: 13.5 },
  { kind: "AGM starter", isNonSpillable: true, containerLabel: "P2", massKg: 22, leadKg: 14 },
  { kind: "car starter", isNonSpillable: false, containerLabel: "D1", massKg: 19, leadKg: 12.8, condition: "cracked" },
  // a weighed lot counted but not itemised
  { kind: "motorcycle", isNonSpillable: false, containerLabel: "P1", count: 10, massKg: 45, leadKg: 30 },
];

describe("summariseLoad", () => {
  const s = summariseLoad(units, containers);

  test("totals: count, mass in kg and lb, lead", () => {
    expect(s.count).toBe(14);
    expect(s.massKg).toBeCloseTo(124, 9);
    expect(s.massLb).toBeCloseTo(124 / KG_PER_LB, 9);
    expect(s.leadKg).toBeCloseTo(82.3, 9);
    expect(s.leadLb).toBeCloseTo(82.3 / KG_PER_LB, 9);
    // the range falls back to the point estimate for units without one
    expect(s.leadKgLow).toBeCloseTo(81.3, 9);
    expect(s.leadKgHigh).toBeCloseTo(83.3, 9);
  });

  test("flooded and non-spillable on separate description lines, 49 CFR 172.101 descriptions, UN2794 first", () => {
    expect(s.byDescription.map((d) => [d.description, d.count, d.massKg, d.packagesText])).toEqual([
      [UN2794_DESCRIPTION, 13, 102, "1 pallet, 1 drum"],
      [UN2800_DESCRIPTION, 1, 22, "1 pallet"],
    ]);
    expect(s.packagesText).toBe("2 pallets, 1 drum");
  });

  test.each([
    ["car starter", false, 3, 57],
    ["AGM starter", true, 1, 22],
    ["motorcycle", false, 10, 45],
  ] as const)("by kind: %s", (kind, isNonSpillable, count, massKg) => {
    const line = s.byKind.find((k) => k.kind === kind && k.isNonSpillable === isNonSpillable)!;
    expect([line.count, line.massKg]).toEqual([count, massKg]);
    expect(line.massLb).toBeCloseTo(massKg / KG_PER_LB, 9);
  });

  test("a kind shipped both flooded and non-spillable splits into two kind lines", () => {
    const both = summariseLoad([
      { kind: "starter", isNonSpillable: false, containerLabel: "P1", massKg: 18, leadKg: 12 },
      { kind: "starter", isNonSpillable: true, containerLabel: "P1", massKg: 20, leadKg: 13 },
    ]);
    expect(both.byKind.map((k) => [k.kind, k.isNonSpillable])).toEqual([["starter", false], ["starter", true]]);
    expect(both.remarks).toEqual(["Container P1 holds both flooded and non-spillable units and is counted on both description lines."]);
  });

  test("leaking or damaged units: found, and all in closed containers (40 CFR 273.33(a)(1))", () => {
    expect(s.hasLeakingOrDamaged).toBe(true);
    expect(s.leakingAllInClosedContainers).toBe(true);
    expect(s.byContainer.find((c) => c.labelNumber === "D1")).toMatchObject({ hasLeakingOrDamaged: true, isClosed: true, count: 1 });
    const loose = summariseLoad(units.map((u) => (u.condition ? { ...u, containerLabel: "P2" } : u)), containers);
    expect(loose.leakingAllInClosedContainers).toBe(false);
  });

  test("a load of intact units has no leaking ones, vacuously all closed", () => {
    const intact = summariseLoad(units.filter((u) => !u.condition), containers);
    expect([intact.hasLeakingOrDamaged, intact.leakingAllInClosedContainers, intact.hasNonSpillable]).toEqual([false, true, true]);
  });
});
