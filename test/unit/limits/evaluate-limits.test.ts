import { describe, expect, test } from "vitest";
import {
  evaluateLimits,
  type TContainerInput,
  type TEvaluateLimitsInput,
  type TLimitsReport,
  type TTotals,
} from "@/lib/limits/evaluate-limits";
import { CAUTION } from "@/lib/rules/caution";
import type { TSiteRule } from "@/lib/rules/rule";
import { getRulebook } from "@/lib/rules/rulebooks";
import { lbToKg } from "@/lib/units";

const ZERO: TTotals = { unitCount: 0, batteryKg: 0, leadKg: 0, electrolyteKg: 0, acidKg: 0 };
const us = getRulebook("us-federal");

type TOverrides = Partial<Omit<TEvaluateLimitsInput, "totals" | "site" | "history">> & {
  totals?: Partial<TTotals>;
  net?: Partial<TTotals>;
  daysCovered?: number;
  site?: Partial<TEvaluateLimitsInput["site"]>;
};

const evaluate = ({ totals, net, daysCovered, site, ...rest }: TOverrides = {}): TLimitsReport =>
  evaluateLimits({
    rulebook: us,
    containers: [],
    asOf: new Date("2026-06-15T12:00:00Z"),
    ...rest,
    totals: { ...ZERO, ...totals },
    history: { netChangeLast28Days: { ...ZERO, ...net }, daysCovered },
    site: { isConsumerExempt: false, peakYear: 2026, peakBatteryKg: 0, ...site },
  });

const ruleOf = (report: TLimitsReport, id: string) => {
  const found = report.rules.find((r) => r.ruleId === id);
  if (!found) throw new Error(`no result for ${id}`);
  return found;
};
const isoDate = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : null);

const container = (over: Partial<TContainerInput> & { id: string }): TContainerInput => ({
  labelNumber: over.id.toUpperCase(),
  accumulationStart: null,
  state: "open",
  isClosed: false,
  hasLeaking: false,
  ...over,
});

describe("large quantity handler of universal waste: 5 000 kg (40 CFR 273.9)", () => {
  test.each([
    // [battery kg on hand, status] — warning at 80 % = 4 000 kg
    [3999.99, "ok"],
    [4000, "approaching"],
    [4999.99, "approaching"],
    [4999.999, "approaching"], // 1 g under is still under
    [5000 - 1e-10, "exceeded"], // float residue of a sum that is 5 000 kg in truth (lib/limits/reaches.ts)
    [5000, "exceeded"], // "5 000 kilograms or more"
    [5000.01, "exceeded"],
  ])("%f kg on hand is %s", (batteryKg, status) => {
    const r = ruleOf(evaluate({ totals: { batteryKg } }), "us-uw-large-quantity-handler");
    expect(r.status).toBe(status);
    expect(r.value).toBe(batteryKg);
    expect(r.margin).toBeCloseTo(5000 - batteryKg, 9);
    expect(r.percent).toBeCloseTo(batteryKg / 50, 9);
    expect(r.citation).toContain("40 CFR 273.9");
  });

  test("other universal waste on site counts toward the 5 000 kg (40 CFR 273.9: all categories together)", () => {
    const r = ruleOf(evaluate({ totals: { batteryKg: 4600 }, site: { otherUniversalWasteKg: 400 } }), "us-uw-large-quantity-handler");
    expect(r.status).toBe("exceeded");
    expect(r.value).toBe(5000);
    expect(r.detail).toContain("other universal waste");
  });

  test.each([
    // [case, asOf, peakYear, peak kg, kg on hand now, status] — 40 CFR 273.9: the status holds to the end of the calendar year
    ["fell back below 5 000 kg: still a large quantity handler on 31 December", "2026-12-31T23:59:59.999Z", 2026, 5200, 3000, "exceeded"],
    ["resets on 1 January", "2027-01-01T00:00:00.000Z", 2026, 5200, 3000, "ok"],
    ["on 1 January with 5 000 kg still on hand it is reached again", "2027-01-01T00:00:00.000Z", 2026, 5200, 5000, "exceeded"],
    ["peak exactly 5 000 kg earlier this year", "2026-06-15T12:00:00Z", 2026, 5000, 4100, "exceeded"],
    ["peak 4 999.99 kg: never reached, only the current amount counts", "2026-06-15T12:00:00Z", 2026, 4999.99, 3000, "ok"],
    ["last year's peak does not carry over", "2026-06-15T12:00:00Z", 2025, 9000, 100, "ok"],
  ])("%s", (_case, asOf, peakYear, peakBatteryKg, batteryKg, status) => {
    const r = ruleOf(
      evaluate({ asOf: new Date(asOf), totals: { batteryKg }, site: { peakYear, peakBatteryKg }, net: { batteryKg: 500 } }),
      "us-uw-large-quantity-handler",
    );
    expect(r.status).toBe(status);
    expect(r.value).toBe(batteryKg); // the value is what is on hand now, not the peak
    if (status === "exceeded") expect(r.forecastDate).toBeNull();
  });

  test("a held category says why and until when, and keeps the current margin", () => {
    const r = ruleOf(
      evaluate({ asOf: new Date("2026-09-01T08:00:00Z"), totals: { batteryKg: 3000 }, site: { peakYear: 2026, peakBatteryKg: 5200 } }),
      "us-uw-large-quantity-handler",
    );
    expect(r.margin).toBe(2000);
    expect(r.detail).toContain("5,200.0 kg was on hand earlier in 2026");
    expect(r.detail).toContain("until 31 December 2026");
  });
});

describe("Tier II thresholds, given in lb and compared in kg by the exact factor", () => {
  test.each([
    // [rule, lb on hand, status] — sulfuric acid 500 lb (40 CFR 370.10(a)(1)), lead 10 000 lb (40 CFR 370.10(a)); warning at 80 %
    ["us-tier2-sulfuric-acid", "acidKg", 399.9, "ok"],
    ["us-tier2-sulfuric-acid", "acidKg", 400, "approaching"],
    ["us-tier2-sulfuric-acid", "acidKg", 499.9, "approaching"],
    ["us-tier2-sulfuric-acid", "acidKg", 500, "exceeded"], // "equal to or greater than"
    ["us-tier2-lead", "leadKg", 7999.9, "ok"],
    ["us-tier2-lead", "leadKg", 9999.9, "approaching"],
    ["us-tier2-lead", "leadKg", 10_000, "exceeded"],
  ] as const)("%s with %f lb is %s", (id, key, lb, status) => {
    const r = ruleOf(evaluate({ totals: { [key]: lbToKg(lb) } }), id);
    expect(r.status).toBe(status);
    expect(r.unit).toBe("lb");
    expect(r.value).toBeCloseTo(lb, 9);
    expect(r.margin).toBeCloseTo(r.threshold - lb, 9);
  });

  test("499.9 lb of acid leaves a margin of 0.1 lb", () => {
    expect(ruleOf(evaluate({ totals: { acidKg: lbToKg(499.9) } }), "us-tier2-sulfuric-acid").margin).toBeCloseTo(0.1, 9);
  });

  test("226.796 kg of acid (1 g under 500 lb = 226.796185 kg) is not yet over", () => {
    expect(ruleOf(evaluate({ totals: { acidKg: 226.795185 } }), "us-tier2-sulfuric-acid").status).toBe("approaching");
    expect(ruleOf(evaluate({ totals: { acidKg: 226.796185 } }), "us-tier2-sulfuric-acid").status).toBe("exceeded");
  });

  test("consumer-product exemption switch (EPA EPCRA FAQs): Tier II rules not applied, the handler rule still is", () => {
    const report = evaluate({ totals: { acidKg: lbToKg(600), leadKg: lbToKg(12_000), batteryKg: 6000 }, site: { isConsumerExempt: true }, net: { acidKg: 10 } });
    for (const id of ["us-tier2-sulfuric-acid", "us-tier2-lead"]) {
      const r = ruleOf(report, id);
      expect([r.status, r.isExempt, r.forecastDate]).toEqual(["ok", true, null]);
      expect(r.detail).toContain("Spent batteries do not qualify");
      expect(r.value).toBeGreaterThan(r.threshold);
    }
    expect(ruleOf(report, "us-uw-large-quantity-handler").status).toBe("exceeded");
  });

  test("with the exemption off (spent units) the same amounts are over", () => {
    const report = evaluate({ totals: { acidKg: lbToKg(600), leadKg: lbToKg(12_000) } });
    expect(ruleOf(report, "us-tier2-sulfuric-acid").isExempt).toBe(false);
    expect(ruleOf(report, "us-tier2-lead").status).toBe("exceeded");
  });
});

describe("forecast date at the trailing 28-day net intake rate", () => {
  test.each([
    // [case, kg on hand, net change over the window, days covered, forecast]
    // 1 000 kg to go at 280 kg / 28 d = 10 kg/d: 100 days after 2026-03-01 is 2026-06-09 (31 + 30 + 31 + 8 days)
    ["rising 10 kg a day", 4000, 280, undefined, "2026-06-09"],
    // 1 000 kg at 300/28 = 10.714 kg/d is 93.3 days: reached on day 94, 2026-06-03
    ["rising, fractional days round up", 4000, 300, undefined, "2026-06-03"],
    // a site 14 days old with +140 kg: 10 kg/d, same as the first row
    ["young site: rate over the days it has", 4000, 140, 14, "2026-06-09"],
    ["flat", 4000, 0, undefined, null],
    ["falling", 4000, -50, undefined, null],
    ["already over", 5100, 280, undefined, null],
    // 1 000 kg at 0.001 kg/d is a million days away: beyond the ten-year horizon
    ["too slow to matter", 4000, 0.028, undefined, null],
  ])("%s", (_case, batteryKg, netKg, daysCovered, expected) => {
    const r = ruleOf(
      evaluate({ asOf: new Date("2026-03-01T15:00:00Z"), totals: { batteryKg }, net: { batteryKg: netKg }, daysCovered, site: { peakYear: 2026, peakBatteryKg: batteryKg } }),
      "us-uw-large-quantity-handler",
    );
    expect(isoDate(r.forecastDate)).toBe(expected);
  });

  test("lb rule: 400 lb of acid rising 1 lb a day is over in 100 days", () => {
    const r = ruleOf(
      evaluate({ asOf: new Date("2026-03-01T15:00:00Z"), totals: { acidKg: lbToKg(400) }, net: { acidKg: lbToKg(28) } }),
      "us-tier2-sulfuric-acid",
    );
    expect(isoDate(r.forecastDate)).toBe("2026-06-09");
    expect(r.detail).toContain("1.0 lb a day");
  });

  test("a flat rate says so in the detail", () => {
    expect(ruleOf(evaluate({ totals: { batteryKg: 100 } }), "us-uw-large-quantity-handler").detail).toContain("flat or falling");
  });
});

describe("containers: one year each (40 CFR 273.15(a), 273.35(a)) and leaking units closed (40 CFR 273.13(a)(1), 273.33(a)(1))", () => {
  const asOf = new Date("2026-06-15T12:00:00Z");
  const containers = [
    container({ id: "p1", accumulationStart: new Date("2025-06-14T09:00:00Z") }), // day 366: over
    container({ id: "p2", accumulationStart: new Date("2025-07-01T09:00:00Z") }), // day 349: 16 days left
    container({ id: "p3", accumulationStart: null }), // empty
    container({ id: "p4", accumulationStart: new Date("2024-01-01"), state: "departed" }), // left the site
    container({ id: "p5", accumulationStart: new Date("2026-06-01"), state: "sealed", hasLeaking: true, isClosed: true }),
  ];

  test("each container on site gets its age, days left, deadline and status; departed ones are left out", () => {
    const report = evaluate({ asOf, containers });
    expect(report.containers.map((c) => [c.containerId, c.ageDays, c.daysLeft, isoDate(c.deadline), c.status])).toEqual([
      ["p1", 366, -1, "2026-06-14", "exceeded"],
      ["p2", 349, 16, "2026-07-01", "approaching"],
      ["p3", null, null, null, "ok"],
      ["p5", 14, 351, "2027-06-01", "ok"],
    ]);
    expect(report.status).toBe("exceeded");
  });

  test("the one-year rule reports the oldest container and how many are over", () => {
    const r = ruleOf(evaluate({ asOf, containers }), "us-uw-one-year");
    expect([r.status, r.value, r.margin, r.forecastDate]).toEqual(["exceeded", 366, -1, null]);
    expect(r.detail).toContain("P1");
    const next = ruleOf(evaluate({ asOf, containers: containers.slice(1) }), "us-uw-one-year");
    // not yet over: the forecast is the first day over, the day after the deadline
    expect([next.status, next.value, isoDate(next.forecastDate)]).toEqual(["approaching", 349, "2026-07-02"]);
  });

  test("a stricter site rule (a 180-day permit condition) gives the earlier deadline", () => {
    const permit: TSiteRule = { id: "site-180", title: "Permit storage period", metric: "container-age-days", threshold: 180, unit: "days", warningPct: 80, citation: "Permit 77-1, condition 9", caution: "" };
    const report = evaluate({ asOf, containers: [containers[1]], customRules: [permit] });
    expect(report.containers[0]).toMatchObject({ ruleId: "site-180", status: "exceeded", daysLeft: 180 - 349 });
    expect(ruleOf(report, "site-180")).toMatchObject({ source: "site", status: "exceeded", caution: CAUTION });
  });

  test.each([
    ["a leaking unit in an open container", [container({ id: "a", hasLeaking: true })], "exceeded", 1],
    ["a leaking unit in a closed container", [container({ id: "a", hasLeaking: true, isClosed: true })], "ok", 0],
    ["a departed open container with a leaking unit", [container({ id: "a", hasLeaking: true, state: "departed" })], "ok", 0],
    ["two open leaking containers", [container({ id: "a", hasLeaking: true }), container({ id: "b", hasLeaking: true, state: "loaded" })], "exceeded", 2],
    ["no leaking units", [container({ id: "a" })], "ok", 0],
  ])("%s: %s", (_case, list, status, value) => {
    const report = evaluate({ containers: list });
    const r = ruleOf(report, "us-uw-leaking-closed");
    expect([r.status, r.value, r.percent, r.forecastDate]).toEqual([status, value, null, null]);
    expect(report.containers.filter((c) => c.needsClosing).length).toBe(value);
    if (value === 2) expect(r.detail).toContain("A, B");
  });
});

describe("site rules and the other rulebooks", () => {
  const fireCap: TSiteRule = { id: "fire-200", title: "Fire-code cap", metric: "unit-count", threshold: 200, unit: "count", warningPct: 80, citation: "City fire code §5.3 (invented for the test)", caution: "Ask the fire marshal." };

  test.each([
    // a cap is reached at the cap ("at-or-above"), warning at 80 % = 160 units
    [159, "ok"],
    [160, "approaching"],
    [199, "approaching"],
    [200, "exceeded"],
  ])("a 200-unit cap with %d units is %s", (unitCount, status) => {
    const r = ruleOf(evaluate({ rulebook: getRulebook("custom"), customRules: [fireCap], totals: { unitCount } }), "fire-200");
    expect([r.status, r.value, r.margin, r.source]).toEqual([status, unitCount, 200 - unitCount, "site"]);
    expect(r.caution).toBe(`Ask the fire marshal. ${CAUTION}`);
  });

  test("a count rule forecasts from the unit rate: 150 units, +1 a day, cap 200 → day 50", () => {
    const r = ruleOf(
      evaluate({ rulebook: getRulebook("custom"), customRules: [fireCap], totals: { unitCount: 150 }, net: { unitCount: 28 }, asOf: new Date("2026-01-01T10:00:00Z") }),
      "fire-200",
    );
    expect(isoDate(r.forecastDate)).toBe("2026-02-20");
  });

  test("the empty custom rulebook with no site rules: nothing to check, containers get ages only", () => {
    const report = evaluate({ rulebook: getRulebook("custom"), containers: [container({ id: "x", accumulationStart: new Date("2020-01-01") })] });
    expect(report.rules).toEqual([]);
    expect(report.containers[0]).toMatchObject({ ageDays: 2357, daysLeft: null, deadline: null, status: "ok", ruleId: null });
    expect(report.status).toBe("ok");
  });

  test("EU/ADR: one-year storage estimate and leaking units, each with its citation", () => {
    const report = evaluate({
      rulebook: getRulebook("eu-adr"),
      containers: [container({ id: "e1", accumulationStart: new Date("2025-06-15"), hasLeaking: true })],
    });
    expect(report.rules.map((r) => [r.ruleId, r.status])).toEqual([
      ["eu-storage-one-year", "approaching"],
      ["eu-leaking-closed", "exceeded"],
    ]);
    expect(report.rulebookId).toBe("eu-adr");
  });

  test.each(us.rules.map((r) => [r.id, r.citation] as const))("%s carries its citation (%s) and the caution", (id, citation) => {
    const r = ruleOf(evaluate(), id);
    expect(r.citation).toBe(citation);
    expect(r.caution.endsWith(CAUTION)).toBe(true);
  });

  test("the report names its rulebook and version and carries the caution", () => {
    expect(evaluate()).toMatchObject({ rulebookId: "us-federal", rulebookVersion: us.version, caution: CAUTION, status: "ok" });
  });
});
