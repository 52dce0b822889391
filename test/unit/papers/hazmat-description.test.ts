import { describe, expect, test } from "vitest";
import { ADR_UN2794, ERG_GUIDE, EU_WASTE_CODE, SHIPPER_CERTIFICATION, adrDescription, hazmatDescription } from "@/lib/papers/hazmat-description";

describe("fixed transport wording", () => {
  test.each([
    ["flooded: 49 CFR 172.101, in the 172.202(a) order", false, "UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III"],
    ["non-spillable: 49 CFR 172.101, 173.159a", true, "UN2800, Batteries, wet, non-spillable, electric storage, 8, PG III"],
  ])("%s", (_source, nonSpillable, expected) => {
    expect(hazmatDescription({ nonSpillable })).toBe(expected);
  });

  test("shipper's certification, word for word (49 CFR 172.204(a)(1))", () => {
    expect(SHIPPER_CERTIFICATION).toBe(
      "This is to certify that the above-named materials are properly classified, described, packaged, marked and labeled, and are in proper condition for transportation according to the applicable regulations of the Department of Transportation.",
    );
  });

  test("ERG guide 154 for UN2794 and UN2800 (Emergency Response Guidebook, from memory: REFERENCES.md status M)", () => {
    expect(ERG_GUIDE.number).toBe(154);
    expect(ERG_GUIDE.isFromMemory).toBe(true);
  });

  test("ADR UN 2794 particulars (ADR Table A, REFERENCES.md V2)", () => {
    expect(ADR_UN2794).toMatchObject({
      hazardClass: "8",
      classificationCode: "C11",
      labels: ["8"],
      specialProvisions: ["295", "598"],
      packingInstruction: "P801",
      transportCategory: "3",
      tunnelCode: "(E)",
      hazardIdentificationNumber: "80",
    });
  });

  test.each([
    // ADR 5.4.1.1.1 order (UN number, name, labels, tunnel code); "WASTE" first per 5.4.1.1.3 — both from memory
    ["UN 2794 as waste", { isWaste: true }, "WASTE UN 2794 BATTERIES, WET, FILLED WITH ACID, electric storage, 8, (E)"],
    ["UN 2794 not as waste", { isWaste: false }, "UN 2794 BATTERIES, WET, FILLED WITH ACID, electric storage, 8, (E)"],
    ["UN 2800 as waste", { nonSpillable: true, isWaste: true }, "WASTE UN 2800 BATTERIES, WET, NON-SPILLABLE, electric storage, 8, (E)"],
  ])("ADR description, %s (from memory)", (_name, args, expected) => {
    expect(adrDescription(args)).toBe(expected);
  });

  test("EU List of Waste code for lead batteries (Decision 2000/532/EC, REFERENCES.md V2)", () => {
    expect(EU_WASTE_CODE.code).toBe("16 06 01*");
  });
});
