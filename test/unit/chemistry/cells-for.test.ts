import { expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { cellsFor } from "@/lib/chemistry";

test.each([
  // A 12 V battery is 6 cells in series (REFERENCES.md V2); the rest: common practice (cells of about 2 V)
  [12, 6, "REFERENCES.md V2: 6 cells in series"],
  [6, 3, "common practice"],
  [2, 1, "common practice: one traction or stationary cell"],
  [24, 12, "common practice"],
  [36, 18, "common practice"],
  [48, 24, "common practice"],
  [96, 48, "common practice"],
])("%d V → %d cells (%s)", (nominalVoltage, cells) => {
  expect(cellsFor({ nominalVoltage })).toBe(cells);
});

test.each([13, 7, 12.5, 1, 0, -12, Number.NaN, Number.POSITIVE_INFINITY])(
  "%f V is not a whole multiple of 2 V and is refused",
  (nominalVoltage) => {
    expect(() => cellsFor({ nominalVoltage })).toThrow(AppError);
    expect(() => cellsFor({ nominalVoltage })).toThrow(/multiple of 2 V/);
  },
);
