/** A group size's typical weight. */
export type TGroupWeight = {
  readonly group: string;
  readonly nominalVoltage: number;
  readonly lowKg: number;
  readonly valueKg: number;
  readonly highKg: number;
  readonly source: string;
  /** Fixed messages, made once so the estimate formats nothing per call. */
  readonly text: { readonly fromGroup: string; readonly capacityMismatch: string; readonly weightMismatch: string; readonly notForThisUnit: string };
};

/*
 * We hold no published weights by group size, so every row is ours: typical catalogue weights of
 * flooded units as we recall them (unverified), widened by about 20 % each way to cover AGM and EFB
 * versions and the spread of capacities within one box size. BCI group numbers and the EN box codes that
 * share their dimensions are listed together.
 */
const SOURCE = "project estimate: typical catalogue weights recalled from memory, unverified; ranges about ±20 %";

const rows: ReadonlyArray<[aliases: string[], volts: number, low: number, value: number, high: number]> = [
  [["U1", "U1R"], 12, 6.5, 8.5, 11],
  [["51", "51R"], 12, 10, 12.5, 15],
  [["35"], 12, 14, 17, 20],
  [["47", "H5", "L2", "LN2"], 12, 14, 17, 20.5],
  [["34", "78", "34/78"], 12, 16, 19, 22.5],
  [["24", "24F"], 12, 16, 19.5, 23.5],
  [["48", "H6", "L3", "LN3"], 12, 17, 20, 24],
  [["65"], 12, 18, 21.5, 25],
  [["94R", "H7", "L4", "LN4"], 12, 19.5, 23, 27],
  [["27", "27F"], 12, 19, 23, 27.5],
  [["49", "H8", "L5", "LN5"], 12, 21, 25, 29],
  [["31"], 12, 23, 27, 32],
  [["GC2"], 6, 25, 28.5, 32],
];

export const GROUP_WEIGHTS: readonly TGroupWeight[] = rows.flatMap(([aliases, nominalVoltage, lowKg, valueKg, highKg]) =>
  aliases.map((group) => ({
    group,
    nominalVoltage,
    lowKg,
    valueKg,
    highKg,
    source: SOURCE,
    text: {
      fromGroup: `Battery mass: the typical weight of group ${group}, ${lowKg}–${highKg} kg (project estimate).`,
      capacityMismatch: `The mass estimated from the capacity is outside the typical ${lowKg}–${highKg} kg of group ${group}: check the capacity and the group size, or weigh the unit.`,
      weightMismatch: `The weight is far from the typical ${lowKg}–${highKg} kg of group ${group}: check the weight and the group size.`,
      notForThisUnit: `Group ${group} weights are for ${nominalVoltage} V car, truck and marine units, so they were not used for this one.`,
    },
  })),
);

const BY_GROUP: ReadonlyMap<string, TGroupWeight> = new Map(GROUP_WEIGHTS.map((g) => [g.group, g]));

/** "group 24f", "Group-24F" and " 24F " all name group 24F. */
export const normaliseGroupSize = (text: string): string =>
  text.toUpperCase().replace(/\s+/g, "").replace(/^GROUP-?/, "");

export function groupWeight(groupSize: string): TGroupWeight | undefined {
  return BY_GROUP.get(groupSize) ?? BY_GROUP.get(normaliseGroupSize(groupSize));
}
