import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { FARADAY_C_PER_MOL, faradayFloor, G_PER_AH_PER_CELL, MOLAR_MASS_G_PER_MOL } from "@/lib/chemistry";

describe("constants", () => {
  test("F = 96 485.332 12 C/mol = 26.801 481 A·h/mol (SI Brochure 9th ed. / CODATA 2018, REFERENCES.md V)", () => {
    expect(FARADAY_C_PER_MOL).toBe(96485.33212);
    expect(FARADAY_C_PER_MOL / 3600).toBeCloseTo(26.801481, 6);
  });

  test.each([
    ["Pb", 207.2],
    ["PbO2", 239.198],
    ["PbSO4", 303.256],
    ["H2SO4", 98.072],
    ["H2O", 18.015],
  ] as const)("molar mass of %s is %f g/mol (computed from IUPAC CIAAW atomic weights, REFERENCES.md C)", (name, gPerMol) => {
    expect(MOLAR_MASS_G_PER_MOL[name]).toBeCloseTo(gPerMol, 3);
  });
});

describe("grams per A·h per cell, from CODATA F and IUPAC atomic weights (REFERENCES.md, C)", () => {
  test.each([
    ["PbNegative", 3.8655],
    ["PbO2Positive", 4.4624],
    ["H2SO4", 3.6592],
    ["PbSO4Formed", 11.315],
    ["H2OFormed", 0.6722],
  ] as const)("%s: %f g", (name, grams) => {
    // Agrees to half a unit in the last published digit.
    const decimals = String(grams).split(".")[1].length;
    expect(Math.abs(G_PER_AH_PER_CELL[name] - grams)).toBeLessThanOrEqual(0.5 * 10 ** -decimals);
  });

  test("DESIGN.md §5: 3.866 g Pb at each plate (3.8655 rounded up) and 3.659 g H2SO4 per A·h per cell", () => {
    expect(Math.abs(G_PER_AH_PER_CELL.PbNegative - 3.866)).toBeLessThan(0.001);
    expect(Math.abs(G_PER_AH_PER_CELL.H2SO4 - 3.659)).toBeLessThan(0.001);
  });

  test("mass is conserved: Pb + PbO2 + 2 H2SO4 → 2 PbSO4 + 2 H2O (discharge reaction, REFERENCES.md V2)", () => {
    const g = G_PER_AH_PER_CELL;
    expect(g.PbNegative + g.PbO2Positive + g.H2SO4).toBeCloseTo(g.PbSO4Formed + g.H2OFormed, 9);
  });

  test("theoretical specific energy at 2.04 V is about 170 Wh/kg of reactants (standard potential, REFERENCES.md V2; 167–171 Wh/kg in textbooks, from memory)", () => {
    const g = G_PER_AH_PER_CELL;
    const whPerKg = (2.04 * 1000) / (g.PbNegative + g.PbO2Positive + g.H2SO4);
    expect(whPerKg).toBeGreaterThan(167);
    expect(whPerKg).toBeLessThan(172);
  });
});

describe("faradayFloor", () => {
  test.each([
    // [capacityAh, cells, leadKg, leadDioxideKg, sulfuricAcidKg]; per-Ah figures from REFERENCES.md (C)
    [1, 1, 2 * 3.8655e-3, 4.4624e-3, 3.6592e-3],
    [60, 6, 60 * 6 * 2 * 3.8655e-3, 60 * 6 * 4.4624e-3, 60 * 6 * 3.6592e-3],
    [100, 6, 100 * 6 * 2 * 3.8655e-3, 100 * 6 * 4.4624e-3, 100 * 6 * 3.6592e-3],
    [600, 24, 600 * 24 * 2 * 3.8655e-3, 600 * 24 * 4.4624e-3, 600 * 24 * 3.6592e-3],
  ])("%d Ah × %d cells", (capacityAh, cells, leadKg, leadDioxideKg, sulfuricAcidKg) => {
    const floor = faradayFloor({ capacityAh, cells });
    // Relative agreement to the 5 significant digits of the published per-Ah figures.
    expect(Math.abs(floor.leadKg / leadKg - 1)).toBeLessThan(5e-5);
    expect(Math.abs(floor.leadDioxideKg / leadDioxideKg - 1)).toBeLessThan(5e-5);
    expect(Math.abs(floor.sulfuricAcidKg / sulfuricAcidKg - 1)).toBeLessThan(5e-5);
  });

  test("lead counts both plates as Pb: the Pb in PbO2 equals the sponge lead (equal moles)", () => {
    const floor = faradayFloor({ capacityAh: 10, cells: 1 });
    const pbInDioxide = (floor.leadDioxideKg * MOLAR_MASS_G_PER_MOL.Pb) / MOLAR_MASS_G_PER_MOL.PbO2;
    expect(floor.leadKg - pbInDioxide).toBeCloseTo(pbInDioxide, 12);
  });

  test.each([
    [{ capacityAh: -1, cells: 6 }, "capacityAh"],
    [{ capacityAh: Number.NaN, cells: 6 }, "capacityAh"],
    [{ capacityAh: 60, cells: 0 }, "cells"],
    [{ capacityAh: 60, cells: 2.5 }, "cells"],
  ])("refuses %o", (input, field) => {
    expect(() => faradayFloor(input)).toThrow(AppError);
    try {
      faradayFloor(input);
    } catch (error) {
      expect((error as AppError).issues[0].field).toBe(field);
    }
  });
});
