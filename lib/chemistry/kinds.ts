export const KIND_IDS = ["flooded", "efb", "agm", "gel", "powersport", "deep-cycle", "traction", "stationary"] as const;

export type TBatteryKind = (typeof KIND_IDS)[number];

export type TKindInfo = {
  readonly id: TBatteryKind;
  readonly label: string;
  /** The default transport class of the kind: UN2800 when true, UN2794 when false. */
  readonly isNonSpillable: boolean;
  readonly unNumber: "UN2794" | "UN2800";
  readonly note?: string;
};

/**
 * The kinds a unit can be logged as. The UN number is a default for the kind (49 CFR 172.101; REFERENCES.md
 * "Transport"): a unit ships as UN2800 only if it meets the non-spillable tests of 49 CFR 173.159a and is
 * marked as such, so the marking on the unit decides. See NON_SPILLABLE_CAUTION.
 */
export const KINDS: readonly TKindInfo[] = [
  { id: "flooded", label: "Flooded starting", isNonSpillable: false, unNumber: "UN2794" },
  { id: "efb", label: "EFB", isNonSpillable: false, unNumber: "UN2794" },
  { id: "agm", label: "AGM", isNonSpillable: true, unNumber: "UN2800" },
  { id: "gel", label: "Gel", isNonSpillable: true, unNumber: "UN2800" },
  {
    id: "powersport",
    label: "Motorcycle / powersport",
    isNonSpillable: false,
    unNumber: "UN2794",
    note: "Treated as flooded (UN2794) by project choice; a sealed powersport unit marked non-spillable ships as UN2800.",
  },
  { id: "deep-cycle", label: "Deep-cycle", isNonSpillable: false, unNumber: "UN2794" },
  { id: "traction", label: "Traction cell", isNonSpillable: false, unNumber: "UN2794" },
  { id: "stationary", label: "Stationary sealed", isNonSpillable: true, unNumber: "UN2800" },
];

export const NON_SPILLABLE_CAUTION =
  "A unit ships as UN2800 only if it passes the non-spillable tests of 49 CFR 173.159a and is marked NONSPILLABLE; otherwise it is UN2794. Local, state and national rules may be stricter; confirm with the authority having jurisdiction.";

const BY_ID: ReadonlyMap<string, TKindInfo> = new Map(KINDS.map((k) => [k.id, k]));

export const isBatteryKind = (value: unknown): value is TBatteryKind => typeof value === "string" && BY_ID.has(value);

export function kindInfo(kind: TBatteryKind): TKindInfo {
  return BY_ID.get(kind) as TKindInfo;
}
