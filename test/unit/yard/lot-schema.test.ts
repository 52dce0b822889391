import { describe, expect, test } from "vitest";
import { netKgOf, ZLotCreate, ZStow, ZContainerCreate, ZContainerPatch } from "@/lib/yard/schema";

const lot = (change: Record<string, unknown> = {}) => ({
  site: "s1",
  ticketNumber: "T-1001",
  grossKg: 2_400,
  tareKg: 1_400,
  unitCount: 50,
  mix: [{ kind: "flooded", nominalVoltage: 12, count: 50 }],
  ...change,
});

const issuesOf = (value: unknown) => {
  const r = ZLotCreate.safeParse(value);
  return r.success ? [] : r.error.issues.map((i) => ({ field: i.path.join("."), message: i.message }));
};

describe("net weight of a scale ticket", () => {
  test.each([
    // net = gross − tare: common practice for any scale ticket
    ["common practice: truck in full, out empty", 14_250.5, 9_810, 4_440.5],
    ["common practice: float noise is kept out (5000.99 − 1 gives 4999.990000000001 in floats)", 5_000.99, 1, 4_999.99],
    ["common practice: tare equal to gross is a zero net", 800, 800, 0],
    ["common practice: grams are kept", 1_000.0004, 0.0001, 1_000],
  ])("%s", (_source, gross, tare, net) => {
    expect(netKgOf(gross, tare)).toBe(net);
  });
});

describe("a lot from a scale ticket is refused with a field message", () => {
  test.each([
    ["tare above gross", { tareKg: 2_500 }, "tareKg", "more than gross"],
    ["no ticket number", { ticketNumber: "" }, "ticketNumber", "ticket number is required"],
    ["ticket number left out", { ticketNumber: undefined }, "ticketNumber", "ticket number is required"],
    ["blank ticket number", { ticketNumber: "   " }, "ticketNumber", "ticket number is required"],
    // 1–80 kg a unit: the brief's band (a car battery is 10–30 kg, a truck battery up to 70 kg: Basel technical guidelines)
    ["net ÷ count below 1 kg (0.99)", { grossKg: 1_449.5, tareKg: 1_400, unitCount: 50 }, "unitCount", "between 1 and 80 kg"],
    ["net ÷ count above 80 kg (80.02)", { grossKg: 5_401, tareKg: 1_400, unitCount: 50 }, "unitCount", "between 1 and 80 kg"],
    ["zero net", { grossKg: 1_400, tareKg: 1_400 }, "unitCount", "between 1 and 80 kg"],
    ["counts of the mix do not add up", { mix: [{ kind: "flooded", count: 30 }, { kind: "agm", count: 10 }] }, "mix", "add up to 40"],
    ["shares do not add up to 100 %", { mixBasis: "share", mix: [{ kind: "flooded", sharePct: 70 }, { kind: "agm", sharePct: 20 }] }, "mix", "add up to 90 %"],
    ["a row without its count", { mix: [{ kind: "flooded" }] }, "mix.0.count", "how many units"],
    ["an unknown kind", { mix: [{ kind: "lithium", count: 50 }] }, "mix.0.kind", "battery kind"],
    ["no mix", { mix: [] }, "mix", "at least one row"],
    ["a fractional count", { unitCount: 49.5 }, "unitCount", "whole number"],
  ])("%s", (_case, change, field, message) => {
    expect(issuesOf(lot(change))).toEqual(expect.arrayContaining([{ field, message: expect.stringContaining(message) }]));
  });

  test.each([
    ["exactly 1 kg a unit is accepted", { grossKg: 1_450, tareKg: 1_400, unitCount: 50 }],
    ["exactly 80 kg a unit is accepted", { grossKg: 5_400, tareKg: 1_400, unitCount: 50 }],
    ["shares within half a percent of 100 are accepted (rounded estimates)", { mixBasis: "share", mix: [{ kind: "flooded", sharePct: 66.7 }, { kind: "agm", sharePct: 33.4 }] }],
    ["voltage defaults to 12 V", { mix: [{ kind: "flooded", count: 50 }] }],
  ])("%s", (_case, change) => {
    expect(issuesOf(lot(change))).toEqual([]);
  });
});

describe("other yard inputs", () => {
  test.each([
    ["nothing to stow", {}, false],
    ["two things at once", { scan: "abc", lotId: "l1" }, false],
    ["a scanned code", { scan: " PAL-0001 " }, true],
    ["a list of unit ids", { unitIds: ["u1", "u2"] }, true],
    ["an empty list", { unitIds: [] }, false],
  ])("stow: %s", (_case, body, ok) => {
    expect(ZStow.safeParse(body).success).toBe(ok);
  });

  test.each([
    ["a plain label", "YD-PAL-001", true],
    ["spaces inside are fine", "BAY A 12", true],
    ["non-ASCII cannot go into Code 128", "PAL—1", false],
    ["too long", "X".repeat(41), false],
  ])("label number: %s", (_case, labelNumber, ok) => {
    expect(ZContainerCreate.safeParse({ site: "s1", kind: "pallet", labelNumber }).success).toBe(ok);
  });

  test.each([
    ["seal", { state: "sealed" }, true],
    ["move to a bay", { bayId: "b1" }, true],
    ["out of any bay", { bayId: null }, true],
    ["reopen is not a move the Yard makes", { state: "open" }, false],
    ["load is not a move the Yard makes", { state: "loaded" }, false],
    ["nothing to change", {}, false],
  ])("container change: %s", (_case, body, ok) => {
    expect(ZContainerPatch.safeParse(body).success).toBe(ok);
  });
});
