import { describe, expect, test } from "vitest";
import { accumulationStartAfter, earliestDate, itemAccumulationDate } from "@/lib/yard/earliest-date";
import { nextLabelNumber } from "@/lib/yard/next-label-number";
import { totalsDrift } from "@/lib/yard/totals-drift";
import { ageBar } from "@/lib/yard/age-bar";

const d = (iso: string) => new Date(iso);

describe("accumulation start date (40 CFR 273.15(c)(1): the earliest date any of the waste was received)", () => {
  test.each([
    ["empty container takes the incoming date", null, ["2026-03-01"], "2026-03-01"],
    ["newer units do not move the date", "2026-01-10", ["2026-02-01", "2026-03-01"], "2026-01-10"],
    ["older units move it back: the earlier of the two", "2026-02-01", ["2026-03-01", "2025-12-24"], "2025-12-24"],
    ["nothing coming in leaves it", "2026-02-01", [], "2026-02-01"],
    ["empty and nothing coming in: no date", null, [], null],
  ])("%s", (_case, current, incoming, expected) => {
    const start = accumulationStartAfter({ current: current ? d(current) : null, incoming: incoming.map(d) });
    expect(start?.toISOString().slice(0, 10) ?? null).toBe(expected);
  });

  test.each([
    ["a loose unit brings its receipt date", "2026-02-03", null, "2026-02-03"],
    ["a unit from a container brings that container's earlier date", "2026-02-03", "2026-01-05", "2026-01-05"],
    ["never younger than its receipt, even from a newer container", "2026-01-05", "2026-02-03", "2026-01-05"],
  ])("%s", (_case, receivedAt, containerStart, expected) => {
    expect(itemAccumulationDate({ receivedAt: d(receivedAt), containerStart: containerStart ? d(containerStart) : null }).toISOString().slice(0, 10)).toBe(expected);
  });

  test("earliestDate keeps either when the other is missing", () => {
    expect(earliestDate(null, undefined)).toBeNull();
    expect(earliestDate(d("2026-01-01"), null)?.toISOString()).toBe("2026-01-01T00:00:00.000Z");
  });
});

describe("next label number (project convention)", () => {
  test.each([
    ["first pallet at a site", "pallet", [], "PAL-0001"],
    ["continues the highest number, keeping prefix and padding", "pallet", ["YD-PAL-001", "YD-PAL-004", "YD-TOTE-1"], "YD-PAL-005"],
    ["other kinds do not count", "drum", ["YD-PAL-004"], "DRUM-0001"],
    ["keeps the spelling of the highest label", "tote", ["TOTE-0001", "tote-0002"], "tote-0003"],
    ["a gap in the numbers is not filled: always after the highest", "box", ["BOX-0001", "BOX-0009"], "BOX-0010"],
  ] as const)("%s", (_case, kind, existing, expected) => {
    expect(nextLabelNumber({ kind, existing })).toBe(expected);
  });
});

describe("drift between a running total and a recount", () => {
  const base = { unitCount: 10, batteryKg: 180, leadKg: 115, electrolyteKg: 43, acidKg: 16 };
  test.each([
    ["identical", {}, []],
    ["float noise of a long sum is not drift (1e-10 kg)", { batteryKg: 180 + 1e-10 }, []],
    ["a missing unit is drift", { unitCount: 9 }, ["unitCount"]],
    ["a gram is drift", { leadKg: 115.001 }, ["leadKg"]],
    ["NaN is drift", { acidKg: Number.NaN }, ["acidKg"]],
  ])("%s", (_case, change, fields) => {
    expect(totalsDrift({ ...base, ...change }, base).map((f) => f.field)).toEqual(fields);
  });
});

describe("age bar on the Yard (40 CFR 273.15(a): one year, counted as 365 days)", () => {
  test.each([
    ["empty container", null, 365, "ok", 0, "empty: no start date yet"],
    ["half the year", 182, 365, "ok", (182 / 365) * 100, "day 182 of 365"],
    ["over is capped at a full bar, the label says how far", 400, 365, "exceeded", 100, "day 400 of 365: 35 over"],
  ] as const)("%s", (_case, ageDays, limitDays, status, percent, label) => {
    const bar = ageBar({ ageDays, limitDays, status });
    expect(bar.percent).toBeCloseTo(percent, 9);
    expect(bar.label).toBe(label);
  });
});
