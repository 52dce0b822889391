/**
 * The fixed wording that transport papers for spent lead-acid batteries carry. Every string here is a
 * published text; the source is beside it. Values marked "from memory" were not read in the published
 * text (REFERENCES.md status M) and are to be checked against the current edition.
 */

/** 49 CFR 172.101 (Hazardous Materials Table), in the 172.202(a) order: ID number, proper shipping name, class, PG. */
export const UN2794_DESCRIPTION = "UN2794, Batteries, wet, filled with acid, electric storage, 8, PG III";
/** 49 CFR 172.101, 173.159a; same order. */
export const UN2800_DESCRIPTION = "UN2800, Batteries, wet, non-spillable, electric storage, 8, PG III";

/** The basic description of 49 CFR 172.202(a) for flooded or non-spillable units. */
export function hazmatDescription({ nonSpillable }: { nonSpillable: boolean }): string {
  return nonSpillable ? UN2800_DESCRIPTION : UN2794_DESCRIPTION;
}

export const unNumberOf = ({ nonSpillable }: { nonSpillable: boolean }): "UN2794" | "UN2800" =>
  nonSpillable ? "UN2800" : "UN2794";

/** 49 CFR 172.204(a)(1), word for word. */
export const SHIPPER_CERTIFICATION =
  "This is to certify that the above-named materials are properly classified, described, packaged, marked and labeled, and are in proper condition for transportation according to the applicable regulations of the Department of Transportation.";

/** Emergency Response Guidebook guide for UN2794 and UN2800 — from memory (REFERENCES.md status M). */
export const ERG_GUIDE = { number: 154, source: "Emergency Response Guidebook", isFromMemory: true } as const;

/** Marking for non-spillable units: 49 CFR 173.159a (REFERENCES.md, V2). */
export const NONSPILLABLE_MARKING = ["NONSPILLABLE", "NONSPILLABLE BATTERY"] as const;

/** ADR Table A, UN 2794 (REFERENCES.md, V2). */
export const ADR_UN2794 = {
  unNumber: "UN 2794",
  // proper shipping name as in the UN Model Regulations / ADR Table A column (2) — from memory
  properShippingName: "BATTERIES, WET, FILLED WITH ACID, electric storage",
  hazardClass: "8",
  classificationCode: "C11",
  labels: ["8"],
  specialProvisions: ["295", "598"],
  packingInstruction: "P801",
  transportCategory: "3",
  tunnelCode: "(E)",
  bulk: "VC1, VC2 with AP8",
  hazardIdentificationNumber: "80",
  source: "ADR Table A (UN 2794)",
} as const;

/** ADR Table A, UN 2800 — from memory; not in REFERENCES.md. */
export const ADR_UN2800 = {
  unNumber: "UN 2800",
  properShippingName: "BATTERIES, WET, NON-SPILLABLE, electric storage",
  hazardClass: "8",
  labels: ["8"],
  tunnelCode: "(E)",
  source: "ADR Table A (UN 2800), from memory",
} as const;

/**
 * The ADR transport-document entry: UN number, proper shipping name, label numbers, packing group where
 * assigned (none for UN 2794 in ADR), tunnel restriction code — ADR 5.4.1.1.1 (a)–(d), (k) order.
 * For waste, ADR 5.4.1.1.3 puts "WASTE" before the UN number (from memory: check the current edition).
 */
export function adrDescription({ nonSpillable = false, isWaste = true }: { nonSpillable?: boolean; isWaste?: boolean } = {}): string {
  const entry = nonSpillable ? ADR_UN2800 : ADR_UN2794;
  const text = `${entry.unNumber} ${entry.properShippingName}, ${entry.labels.join(", ")}, ${entry.tunnelCode}`;
  return isWaste ? `WASTE ${text}` : text;
}

/** EU List of Waste (Decision 2000/532/EC), REFERENCES.md V2; a revision of the battery codes is pending. */
export const EU_WASTE_CODE = { code: "16 06 01*", text: "lead batteries", source: "Decision 2000/532/EC (List of Waste)" } as const;

/** Basel Convention entries for cross-border movements (Annex VIII; REFERENCES.md V2). */
export const BASEL_ENTRY = { code: "A1160", text: "Waste lead-acid batteries, whole or crushed", source: "Basel Convention Annex VIII" } as const;
