import { describe, expect, test } from "vitest";
import { AppError } from "@/lib/errors";
import { TRANSPORT_BASIS_IDS, checkBasis, transportBasis, type TLoadFacts } from "@/lib/loads/transport-basis";

const intact: TLoadFacts = { hasLeakingOrDamaged: false, leakingAllInClosedContainers: true, hasEmergencyPhone: true, hasNonSpillable: true, unitCount: 40 };
const leakingLoose: TLoadFacts = { ...intact, hasLeakingOrDamaged: true, leakingAllInClosedContainers: false };
const leakingClosed: TLoadFacts = { ...intact, hasLeakingOrDamaged: true, leakingAllInClosedContainers: true };
const all = (basis: string, except: string[] = []) =>
  Object.fromEntries(transportBasis(basis).checklist.map((i) => [i.id, !except.includes(i.id)]));

describe("checkBasis: the gate before a load may be marked ready", () => {
  test.each([
    // [row name with its source, basis, checklist, load, expected missing ids, expected blocker citations]
    ["us-full, all confirmed (49 CFR 172.200–172.204)", "us-full", all("us-full"), intact, [], []],
    ["us-full, emergency line not confirmed (49 CFR 172.604(a))", "us-full", all("us-full", ["emergency-phone"]), intact, ["emergency-phone"], []],
    ["us-full, no telephone number on the paper (49 CFR 172.604(a))", "us-full", all("us-full"), { ...intact, hasEmergencyPhone: false }, [], ["49 CFR 172.604(a)"]],
    ["us-full, non-spillable marking asked when such units ship (49 CFR 173.159a)", "us-full", all("us-full", ["nonspillable-marked"]), intact, ["nonspillable-marked"], []],
    ["us-full, non-spillable marking not asked without such units (49 CFR 173.159a)", "us-full", all("us-full", ["nonspillable-marked"]), { ...intact, hasNonSpillable: false }, [], []],
    ["us-full, leaking units loose (40 CFR 273.33(a)(1))", "us-full", all("us-full"), leakingLoose, [], ["40 CFR 273.33(a)(1); 49 CFR 173.159(a)"]],
    ["us-exception, four conditions confirmed (49 CFR 173.159(e))", "us-exception", all("us-exception"), intact, [], []],
    ["us-exception, no telephone needed under the exception (49 CFR 173.159(e))", "us-exception", all("us-exception"), { ...intact, hasEmergencyPhone: false }, [], []],
    ["us-exception, sole shipper not confirmed (49 CFR 173.159(e); PHMSA 07-0026)", "us-exception", all("us-exception", ["sole-shipper"]), intact, ["sole-shipper"], []],
    ["us-exception, nothing confirmed (49 CFR 173.159(e))", "us-exception", {}, intact, ["no-other-hazmat", "loaded-braced", "other-cargo-secured", "sole-shipper"], []],
    ["us-exception, leaking units loose block it (PHMSA 06-0031, 09-0227)", "us-exception", all("us-exception"), leakingLoose, [], ["PHMSA interpretations 06-0031, 09-0227; 40 CFR 273.33(a)(1)"]],
    ["us-exception, leaking units in closed containers (40 CFR 273.33(a)(1))", "us-exception", all("us-exception"), leakingClosed, [], []],
    ["eu-adr-full, all confirmed (ADR 5.4.1, P801)", "eu-adr-full", all("eu-adr-full"), intact, [], []],
    ["eu-adr-full, tilt test not confirmed (ADR P801)", "eu-adr-full", all("eu-adr-full", ["tilt-test"]), intact, ["tilt-test"], []],
    ["eu-adr-full, leaking units loose (ADR P801)", "eu-adr-full", all("eu-adr-full"), leakingLoose, [], ["ADR P801"]],
    ["eu-sp598, all confirmed (ADR 3.3.1 SP 598)", "eu-sp598", all("eu-sp598"), intact, [], []],
    ["eu-sp598, damaged units even in closed containers (ADR 3.3.1 SP 598: cases undamaged)", "eu-sp598", all("eu-sp598"), leakingClosed, [], ["ADR 3.3.1, SP 598"]],
    ["eu-sp598, short circuits not confirmed (ADR 3.3.1 SP 598)", "eu-sp598", all("eu-sp598", ["short-circuit"]), intact, ["short-circuit"], []],
    ["an empty load (common practice)", "us-exception", all("us-exception"), { ...intact, unitCount: 0 }, [], ["common practice"]],
  ] as const)("%s", (_name, basis, checklist, load, missingIds, blockerCitations) => {
    const result = checkBasis({ basis, checklist, load });
    expect(result.missing.map((m) => m.id)).toEqual(missingIds);
    expect(result.blockers.map((b) => b.citation)).toEqual(blockerCitations);
    expect(result.isComplete).toBe(missingIds.length === 0);
    expect(result.isReady).toBe(missingIds.length === 0 && blockerCitations.length === 0);
  });

  test("a checklist item set to false counts as missing, like an absent one", () => {
    const checklist = { ...all("us-exception"), "loaded-braced": false };
    expect(checkBasis({ basis: "us-exception", checklist, load: intact }).missing).toEqual([
      { id: "loaded-braced", text: transportBasis("us-exception").checklist.find((i) => i.id === "loaded-braced")!.text },
    ]);
  });

  test("an unknown basis is a field error on basis", () => {
    expect(() => checkBasis({ basis: "us-anything", checklist: {}, load: intact })).toThrowError(AppError);
    try {
      transportBasis("us-anything");
    } catch (e) {
      expect((e as AppError).status).toBe(400);
      expect((e as AppError).issues[0].field).toBe("basis");
    }
  });

  test.each(TRANSPORT_BASIS_IDS)("every item of %s has plain text and a citation", (id) => {
    const basis = transportBasis(id);
    expect(basis.checklist.length).toBeGreaterThan(0);
    for (const item of basis.checklist) {
      expect(item.text).toMatch(/^[A-Z].{15,}\.$/);
      expect(item.citation).toMatch(/CFR|ADR|PHMSA|Decision/);
    }
    expect(new Set(basis.checklist.map((i) => i.id)).size).toBe(basis.checklist.length);
  });

  test("the exception lists exactly the four conditions of 49 CFR 173.159(e)", () => {
    expect(transportBasis("us-exception").checklist.map((i) => i.id)).toEqual(["no-other-hazmat", "loaded-braced", "other-cargo-secured", "sole-shipper"]);
  });
});
