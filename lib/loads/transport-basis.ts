import { AppError } from "@/lib/errors";

/**
 * The rules a load is shipped under, each with the checklist a person confirms before the load may be
 * marked ready. Citations are to REFERENCES.md (Transport, Storage, International); paragraph letters
 * of 49 CFR 173.159 have moved between editions, so the citation names the paragraph as REFERENCES.md does.
 */
export const TRANSPORT_BASIS_IDS = ["us-full", "us-exception", "eu-adr-full", "eu-sp598"] as const;
export type TTransportBasisId = (typeof TRANSPORT_BASIS_IDS)[number];

/** Facts of the load that decide whether an item applies or whether the basis is blocked. */
export type TLoadFacts = {
  hasLeakingOrDamaged: boolean;
  /** every leaking or damaged unit is in a closed, compatible, leak-free container (vacuously true when none) */
  leakingAllInClosedContainers: boolean;
  hasEmergencyPhone: boolean;
  /** when not given, items about non-spillable units are asked for (the conservative choice) */
  hasNonSpillable?: boolean;
  /** when given and 0, the load is blocked: there is nothing to ship */
  unitCount?: number;
};

export type TChecklistItem = {
  id: string;
  /** what the person confirms, in plain words */
  text: string;
  citation: string;
  /** the item applies only when this fact of the load is true */
  onlyWhen?: "hasNonSpillable";
};

export type TTransportBasis = {
  id: TTransportBasisId;
  title: string;
  region: "us" | "eu";
  citation: string;
  /** one sentence for the paper, saying what the basis is */
  statement: string;
  checklist: TChecklistItem[];
};

const CFR_173_159E = "49 CFR 173.159(e); PHMSA interpretations 07-0026, 14-0003";

const BASES: Record<TTransportBasisId, TTransportBasis> = {
  "us-full": {
    id: "us-full",
    title: "Full hazardous materials shipping paper",
    region: "us",
    citation: "49 CFR 172.200–172.204",
    statement: "Shipped as hazardous materials with a full shipping paper and the shipper's certification.",
    checklist: [
      { id: "packages-marked-labelled", text: "Each package carries the class 8 (corrosive) label and is marked with its UN number and proper shipping name.", citation: "49 CFR 172.101 (label 8)" },
      { id: "nonspillable-marked", text: 'Each package of non-spillable units is marked "NONSPILLABLE" or "NONSPILLABLE BATTERY".', citation: "49 CFR 173.159a", onlyWhen: "hasNonSpillable" },
      { id: "short-circuit", text: "Every battery is fully protected against short circuits.", citation: "49 CFR 173.159(a)" },
      { id: "pallet-stacks", text: "Pallet stacks are no higher than 1.5 times the pallet width, can bear twice their own weight stacked on them, and no terminal carries a load.", citation: "49 CFR 173.159 (pallet paragraph)" },
      { id: "emergency-phone", text: "The emergency response telephone number is monitored at all times while the load is in transport, by a person who knows the material.", citation: "49 CFR 172.604(a)" },
      { id: "certification-signed", text: "The shipper's certification on the paper is signed.", citation: "49 CFR 172.204(a)(1)" },
    ],
  },
  "us-exception": {
    id: "us-exception",
    title: "Highway or rail exception for batteries",
    region: "us",
    citation: CFR_173_159E,
    statement:
      "Shipped by highway or rail under 49 CFR 173.159(e): the batteries are not subject to the other requirements of the Hazardous Materials Regulations because all of the conditions below are met.",
    // The four conditions of 173.159(e), in its order.
    checklist: [
      { id: "no-other-hazmat", text: "No other hazardous material is on the vehicle, not even an excepted one.", citation: CFR_173_159E },
      { id: "loaded-braced", text: "The batteries are loaded or braced so that they cannot be damaged or short-circuited in transport.", citation: "49 CFR 173.159(e)" },
      { id: "other-cargo-secured", text: "Any other cargo on the vehicle is blocked, braced or secured so that it cannot touch or damage the batteries.", citation: "49 CFR 173.159(e)" },
      { id: "sole-shipper", text: "The vehicle carries nothing shipped by anyone other than the shipper of the batteries.", citation: CFR_173_159E },
    ],
  },
  "eu-adr-full": {
    id: "eu-adr-full",
    title: "Full ADR transport document",
    region: "eu",
    citation: "ADR 5.4.1; ADR Table A (UN 2794)",
    statement: "Carried as dangerous goods under ADR with a full transport document: UN 2794, class 8, tunnel code (E).",
    checklist: [
      { id: "p801-packing", text: "Packed to P801: rigid outer packagings, crates or pallets; loose used batteries only in stainless steel or plastic battery boxes that hold free liquid.", citation: "ADR P801" },
      { id: "p801-tiers", text: "Tiers are separated by a non-conductive layer and no terminal bears the weight of other items.", citation: "ADR P801" },
      { id: "tilt-test", text: "The packages pass a 45° tilt test without spilling.", citation: "ADR P801 (UN 2794)" },
      { id: "labels-8", text: "Each package carries label 8.", citation: "ADR Table A (UN 2794)" },
      { id: "waste-code", text: "The waste code 16 06 01* (lead batteries) goes with the load.", citation: "Decision 2000/532/EC (List of Waste)" },
    ],
  },
  "eu-sp598": {
    id: "eu-sp598",
    title: "Used batteries under ADR special provision 598",
    region: "eu",
    citation: "ADR 3.3.1, special provision 598",
    statement:
      "Used batteries carried under ADR special provision 598: not subject to ADR because all of the conditions below are met.",
    checklist: [
      { id: "cases-undamaged", text: "Every battery case is undamaged.", citation: "ADR 3.3.1, SP 598" },
      { id: "secured", text: "The batteries are secured against leaking, slipping, falling or damage, for example stacked on pallets.", citation: "ADR 3.3.1, SP 598" },
      { id: "no-acid-outside", text: "No dangerous traces of acid are on the outside of the batteries.", citation: "ADR 3.3.1, SP 598" },
      { id: "short-circuit", text: "The batteries are protected against short circuits.", citation: "ADR 3.3.1, SP 598" },
      { id: "waste-code", text: "The waste code 16 06 01* (lead batteries) goes with the load.", citation: "Decision 2000/532/EC (List of Waste)" },
    ],
  },
};

export function isTransportBasisId(id: string): id is TTransportBasisId {
  return (TRANSPORT_BASIS_IDS as readonly string[]).includes(id);
}

/** A basis by id; an unknown id is a field error on `basis`. */
export function transportBasis(id: string): TTransportBasis {
  if (!isTransportBasisId(id)) {
    throw new AppError("invalid_input", "unknown transport basis", [
      { field: "basis", message: `basis must be one of ${TRANSPORT_BASIS_IDS.join(", ")}` },
    ]);
  }
  return BASES[id];
}

/** The checklist items that apply to this load. */
export function applicableItems(basis: TTransportBasis, load: TLoadFacts): TChecklistItem[] {
  return basis.checklist.filter((item) => item.onlyWhen === undefined || load[item.onlyWhen] !== false);
}

export type TBasisBlocker = { message: string; citation: string };
export type TBasisCheck = {
  isComplete: boolean;
  missing: { id: string; text: string }[];
  blockers: TBasisBlocker[];
  /** complete with no blockers: the only state in which a load may be marked ready */
  isReady: boolean;
};

function blockersFor(id: TTransportBasisId, load: TLoadFacts): TBasisBlocker[] {
  const blockers: TBasisBlocker[] = [];
  if (load.unitCount === 0) blockers.push({ message: "The load holds no batteries.", citation: "common practice" });
  const looseDamaged = load.hasLeakingOrDamaged && !load.leakingAllInClosedContainers;
  switch (id) {
    case "us-full":
      if (!load.hasEmergencyPhone) blockers.push({ message: "An emergency response telephone number is needed on the paper.", citation: "49 CFR 172.604(a)" });
      if (looseDamaged) blockers.push({ message: "Leaking or damaged units must be in a closed, compatible container free of leaks.", citation: "40 CFR 273.33(a)(1); 49 CFR 173.159(a)" });
      break;
    case "us-exception":
      if (looseDamaged) {
        blockers.push({
          message: "Leaking or damaged units rule out the highway exception unless each is packed in a closed, compatible container free of leaks.",
          citation: "PHMSA interpretations 06-0031, 09-0227; 40 CFR 273.33(a)(1)",
        });
      }
      break;
    case "eu-adr-full":
      if (looseDamaged) blockers.push({ message: "Leaking or damaged units must be in a closed battery box able to hold free liquid.", citation: "ADR P801" });
      break;
    case "eu-sp598":
      // SP 598 covers only batteries whose cases are undamaged: a closed container does not cure it.
      if (load.hasLeakingOrDamaged) blockers.push({ message: "Special provision 598 covers only batteries with undamaged cases; ship leaking or damaged units under a full ADR transport document.", citation: "ADR 3.3.1, SP 598" });
      break;
  }
  return blockers;
}

/** Whether a load's checklist is complete for its basis, what is missing and what blocks it. */
export function checkBasis({
  basis,
  checklist,
  load,
}: {
  basis: TTransportBasisId | string;
  checklist: Record<string, boolean>;
  load: TLoadFacts;
}): TBasisCheck {
  const b = transportBasis(basis);
  const missing = applicableItems(b, load)
    .filter((item) => checklist[item.id] !== true)
    .map(({ id, text }) => ({ id, text }));
  const blockers = blockersFor(b.id, load);
  return { isComplete: missing.length === 0, missing, blockers, isReady: missing.length === 0 && blockers.length === 0 };
}

/** The facts `checkBasis` needs, from a load's summary and its emergency telephone number. */
export function loadFactsOf({
  summary,
  emergencyPhone,
}: {
  summary: { count: number; hasNonSpillable: boolean; hasLeakingOrDamaged: boolean; leakingAllInClosedContainers: boolean };
  emergencyPhone?: string | null;
}): TLoadFacts {
  return {
    unitCount: summary.count,
    hasNonSpillable: summary.hasNonSpillable,
    hasLeakingOrDamaged: summary.hasLeakingOrDamaged,
    leakingAllInClosedContainers: summary.leakingAllInClosedContainers,
    hasEmergencyPhone: (emergencyPhone ?? "").trim().length > 0,
  };
}
