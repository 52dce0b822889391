import { describe, expect, test } from "vitest";
import { fieldIssues } from "@/lib/errors";
import { ZCustomRule, ZRule } from "@/lib/rules/rule";

const valid = { title: "Fire-code cap", metric: "unit-count", threshold: 200, unit: "count", citation: "City fire code §5.3 (common practice: a local cap)" };

const issuesOf = (input: unknown) => {
  const result = ZCustomRule.safeParse(input);
  return result.success ? [] : fieldIssues(result.error.issues);
};

describe("ZCustomRule: a site's own rule", () => {
  test("a complete rule parses, with the warning level defaulting to 80 % and an empty caution", () => {
    expect(ZCustomRule.parse(valid)).toEqual({ ...valid, warningPct: 80, caution: "" });
  });

  test("a permit cap on lead mass in lb parses", () => {
    const rule = ZCustomRule.parse({ ...valid, title: "Permit lead cap", metric: "lead-kg", threshold: "2000", unit: "lb", citation: "Permit 12-345, condition 4" });
    expect(rule.threshold).toBe(2000);
  });

  test.each([
    ["missing", { ...valid, citation: undefined }],
    ["blank", { ...valid, citation: "   " }],
    ["empty", { ...valid, citation: "" }],
  ])("a %s citation is refused with a message that says what to give", (_case, input) => {
    expect(issuesOf(input)).toEqual([
      { field: "citation", message: "a site rule needs its source: give the permit, code section or document it comes from" },
    ]);
  });

  test.each([
    ["count rule in kg", { metric: "unit-count", unit: "kg" }, "unit", "a count rule must use the unit count"],
    ["mass rule in days", { metric: "battery-kg", unit: "days" }, "unit", "a mass rule must use the unit kg or lb"],
    ["age rule in count", { metric: "container-age-days", unit: "count" }, "unit", "a container age rule must use the unit days"],
    ["fractional days", { metric: "container-age-days", unit: "days", threshold: 90.5 }, "threshold", "a limit in days must be a whole number of days"],
    ["zero limit", { threshold: 0 }, "threshold", "the limit must be more than 0"],
    ["warning above 100 %", { warningPct: 120 }, "warningPct", "the warning level must be between 1 and 100 %"],
    ["no title", { title: " " }, "title", "give the rule a short title"],
  ])("%s is refused on %s", (_case, change, field, message) => {
    expect(issuesOf({ ...valid, ...change })).toContainEqual({ field, message });
  });

  test.each([["leaking-open-container"], ["volume"]])("metric %s is not offered to site rules", (metric) => {
    expect(issuesOf({ ...valid, metric }).map((i) => i.field)).toContain("metric");
  });

  test("a site rule cannot hold for the calendar year; a rulebook rule can only for battery mass", () => {
    expect(ZCustomRule.parse({ ...valid, sticky: "calendar-year" })).not.toHaveProperty("sticky");
    const base = { id: "x", title: "x", metric: "lead-kg", threshold: 1, unit: "kg", warningPct: 80, citation: "x", caution: "" };
    expect(ZRule.safeParse({ ...base, sticky: "calendar-year" }).success).toBe(false);
    expect(ZRule.safeParse({ ...base, metric: "battery-kg", sticky: "calendar-year" }).success).toBe(true);
  });
});
