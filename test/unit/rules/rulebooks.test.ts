import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { CAUTION, LEAK_HANDLING } from "@/lib/rules/caution";
import { thresholdInBase, ruleTrigger, type TRule } from "@/lib/rules/rule";
import { ZRulebook } from "@/lib/rules/rulebook";
import { getRulebook, listRulebooks, RULEBOOK_IDS } from "@/lib/rules/rulebooks";

const rule = (rulebookId: string, ruleId: string): TRule => {
  const found = getRulebook(rulebookId).rules.find((r) => r.id === ruleId);
  if (!found) throw new Error(`no rule ${ruleId}`);
  return found;
};

describe("shipped rulebooks", () => {
  test.each(listRulebooks().map((r) => [r.id, r] as const))("%s is a valid rulebook", (_id, rulebook) => {
    expect(ZRulebook.safeParse(rulebook).success).toBe(true);
  });

  test("lists us-federal, eu-adr and custom, each found by id", () => {
    expect(listRulebooks().map((r) => r.id)).toEqual([...RULEBOOK_IDS]);
    for (const id of RULEBOOK_IDS) expect(getRulebook(id).id).toBe(id);
  });

  test("an unknown rulebook is a not-found error naming the known ones", () => {
    expect(() => getRulebook("mars")).toThrow(AppError);
    try {
      getRulebook("mars");
    } catch (error) {
      expect((error as AppError).code).toBe("not_found");
      expect((error as AppError).message).toContain("us-federal");
    }
  });

  test("rulebooks are frozen: a caller cannot change a threshold for everyone", () => {
    const r = rule("us-federal", "us-uw-large-quantity-handler");
    expect(() => {
      (r as { threshold: number }).threshold = 1;
    }).toThrow(TypeError);
    expect(r.threshold).toBe(5000);
  });

  test("custom is empty", () => {
    expect(getRulebook("custom").rules).toEqual([]);
  });
});

describe("US federal rules, each with its citation", () => {
  // Values from REFERENCES.md, "Storage (US federal)" and "Community right-to-know (Tier II)".
  test.each([
    // [rule id, metric, threshold, unit, trigger, citation must contain, source]
    ["us-uw-large-quantity-handler", "battery-kg", 5000, "kg", "at-or-above", "40 CFR 273.9", "40 CFR 273.9"],
    ["us-uw-one-year", "container-age-days", 365, "days", "above", "273.35(a)", "40 CFR 273.15, 273.35"],
    ["us-tier2-sulfuric-acid", "acid-kg", 500, "lb", "at-or-above", "370.10(a)(1)", "40 CFR 370.10(a)(1)"],
    ["us-tier2-lead", "lead-kg", 10_000, "lb", "at-or-above", "370.10(a)", "40 CFR 370.10(a)"],
    ["us-uw-leaking-closed", "leaking-open-container", 0, "count", "above", "273.33(a)(1)", "40 CFR 273.13(a)(1), 273.33(a)(1)"],
  ] as const)("%s: %s at %d %s (%s), cites %s — %s", (id, metric, threshold, unit, trigger, citation, _source) => {
    const r = rule("us-federal", id);
    expect(r.metric).toBe(metric);
    expect(r.threshold).toBe(threshold);
    expect(r.unit).toBe(unit);
    expect(ruleTrigger(r)).toBe(trigger);
    expect(r.citation).toContain(citation);
    expect(r.caution.length).toBeGreaterThan(20);
  });

  test("the handler category holds for the calendar year and counts all universal waste (40 CFR 273.9)", () => {
    const r = rule("us-federal", "us-uw-large-quantity-handler");
    expect(r.sticky).toBe("calendar-year");
    expect(r.addsOtherUniversalWaste).toBe(true);
  });

  test("one-year rule warns 30 days before (40 CFR 273.15/273.35; 30 days from the brief)", () => {
    expect(rule("us-federal", "us-uw-one-year").warningMargin).toBe(30);
  });

  test("both Tier II rules honour the consumer-product exemption switch (EPA EPCRA FAQs)", () => {
    expect(rule("us-federal", "us-tier2-sulfuric-acid").isConsumerExemptible).toBe(true);
    expect(rule("us-federal", "us-tier2-lead").isConsumerExemptible).toBe(true);
    expect(rule("us-federal", "us-uw-large-quantity-handler").isConsumerExemptible).toBeUndefined();
  });

  test.each([
    // lb thresholds compare in kg by the exact factor 0.45359237 (REFERENCES.md, Unit conversions)
    ["us-tier2-sulfuric-acid", 226.796185],
    ["us-tier2-lead", 4535.9237],
  ])("%s threshold in kg is %f", (id, kg) => {
    expect(thresholdInBase(rule("us-federal", id))).toBeCloseTo(kg, 9);
  });

  test("label wording and waste codes (40 CFR 273.14(a), 273.34(a); EPA RCRA guidance)", () => {
    const us = getRulebook("us-federal");
    expect(us.labelWording).toBe("Universal Waste—Batteries");
    expect(us.labelCitation).toContain("273.14(a)");
    expect(us.labelCitation).toContain("273.34(a)");
    expect(us.wasteCodes.map((c) => c.code)).toEqual(["D002", "D008"]);
  });

  test("the leaking-units rule carries the handling guidance (DESIGN.md §6)", () => {
    expect(rule("us-federal", "us-uw-leaking-closed").caution).toContain(LEAK_HANDLING);
  });
});

describe("EU/ADR rules", () => {
  test("waste code 16 06 01* on the label and in the codes (Decision 2000/532/EC)", () => {
    const eu = getRulebook("eu-adr");
    expect(eu.labelWording).toContain("16 06 01*");
    expect(eu.wasteCodes.find((c) => c.code === "16 06 01*")?.citation).toContain("2000/532/EC");
    expect(eu.wasteCodes.find((c) => c.code === "A1160")?.citation).toContain("Basel");
  });

  test.each([
    // Not in REFERENCES.md, so it must say so: the one-year storage period is ours.
    ["eu-storage-one-year", "container-age-days", "Basel"],
    // ADR P801 and SP 598 (REFERENCES.md, International) are transport rules applied to storage: also marked.
    ["eu-leaking-closed", "leaking-open-container", "P801"],
  ])("%s (%s) cites %s and is marked as a project estimate", (id, metric, source) => {
    const r = rule("eu-adr", id);
    expect(r.metric).toBe(metric);
    expect(r.citation).toContain(source);
    expect(r.citation).toMatch(/project estimate — confirm locally/i);
  });
});

describe("caution", () => {
  test.each([
    ["estimates, not a replacement for a trained person", /estimates to help a trained person/],
    ["other rules may be stricter", /may be stricter/],
    ["confirm with the authority having jurisdiction", /authority having jurisdiction/],
  ])("says %s (DESIGN.md §6)", (_what, pattern) => {
    expect(CAUTION).toMatch(pattern);
  });
});
