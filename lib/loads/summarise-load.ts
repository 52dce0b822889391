import { z } from "zod";
import { kgToLb } from "@/lib/units";
import { hazmatDescription, unNumberOf } from "@/lib/papers/hazmat-description";

export const ZUnitCondition = z.enum(["intact", "leaking", "cracked", "bulged"]);
export const ZContainerKind = z.enum(["pallet", "box", "tote", "drum"]);

/**
 * One entry on a load: a single battery, or a weighed lot counted but not itemised (`count` > 1, with
 * `massKg` and `leadKg` the totals of the entry).
 */
export const ZLoadUnit = z.object({
  id: z.string().optional(),
  kind: z.string().min(1, "kind is required"),
  isNonSpillable: z.boolean(),
  containerLabel: z.string().min(1, "every unit on a load sits in a container"),
  count: z.number().int().positive().default(1),
  massKg: z.number().positive("mass must be above 0 kg"),
  leadKg: z.number().nonnegative(),
  leadKgLow: z.number().nonnegative().optional(),
  leadKgHigh: z.number().nonnegative().optional(),
  condition: ZUnitCondition.default("intact"),
});
export type TLoadUnit = z.input<typeof ZLoadUnit>;

export const ZLoadContainer = z.object({
  labelNumber: z.string().min(1),
  kind: ZContainerKind,
  /** closed, structurally sound, compatible and free of leaks (40 CFR 273.13(a)(1), 273.33(a)(1)) */
  isClosed: z.boolean().default(false),
});
export type TLoadContainer = z.input<typeof ZLoadContainer>;

type TMass = { count: number; massKg: number; massLb: number; leadKg: number };

export type TKindLine = TMass & { kind: string; isNonSpillable: boolean; description: string };
export type TPackageCount = { kind: string; count: number };
export type TDescriptionLine = TMass & {
  unNumber: "UN2794" | "UN2800";
  isNonSpillable: boolean;
  description: string;
  packages: TPackageCount[];
  /** e.g. "24 pallets, 2 drums" (49 CFR 172.202(a): number and type of packages) */
  packagesText: string;
  containerLabels: string[];
};
export type TContainerLine = TMass & {
  labelNumber: string;
  kind: string;
  isClosed: boolean;
  unNumbers: string[];
  hasLeakingOrDamaged: boolean;
};

export type TLoadSummary = TMass & {
  leadKgLow: number;
  leadKgHigh: number;
  leadLb: number;
  byKind: TKindLine[];
  byDescription: TDescriptionLine[];
  byContainer: TContainerLine[];
  packagesText: string;
  hasNonSpillable: boolean;
  hasLeakingOrDamaged: boolean;
  /** true when every leaking or damaged unit is in a container marked closed (vacuously true when none) */
  leakingAllInClosedContainers: boolean;
  /** plain-word remarks for the paper, e.g. a container holding both flooded and non-spillable units */
  remarks: string[];
};

const PLURAL: Record<string, string> = { pallet: "pallets", box: "boxes", tote: "totes", drum: "drums", package: "packages" };
const ORDER = ["pallet", "box", "tote", "drum", "package"];

export function packagesText(packages: TPackageCount[]): string {
  return packages.map((p) => `${p.count} ${p.count === 1 ? p.kind : (PLURAL[p.kind] ?? `${p.kind}s`)}`).join(", ");
}

function countPackages(labels: Iterable<string>, kindOf: Map<string, string>): TPackageCount[] {
  const counts = new Map<string, number>();
  for (const label of labels) {
    const kind = kindOf.get(label) ?? "package";
    counts.set(kind, (counts.get(kind) ?? 0) + 1);
  }
  return [...counts]
    .map(([kind, count]) => ({ kind, count }))
    .sort((a, b) => ORDER.indexOf(a.kind) - ORDER.indexOf(b.kind));
}

const emptyMass = (): TMass => ({ count: 0, massKg: 0, massLb: 0, leadKg: 0 });
function add(into: TMass, count: number, massKg: number, leadKg: number) {
  into.count += count;
  into.massKg += massKg;
  into.leadKg += leadKg;
}

/**
 * Count and mass by kind, by hazardous-materials description (flooded and non-spillable apart) and by
 * container, with the estimated lead for settlement (DESIGN.md §5.5). Lines keep first-seen order for
 * kinds and containers; UN2794 comes before UN2800.
 */
export function summariseLoad(unitsIn: TLoadUnit[], containersIn: TLoadContainer[] = []): TLoadSummary {
  const units = unitsIn.map((u) => ZLoadUnit.parse(u));
  const containers = containersIn.map((c) => ZLoadContainer.parse(c));
  const kindOf = new Map(containers.map((c) => [c.labelNumber, c.kind]));
  const closed = new Map(containers.map((c) => [c.labelNumber, c.isClosed]));

  const total = emptyMass();
  let leadKgLow = 0;
  let leadKgHigh = 0;
  const byKind = new Map<string, TKindLine>();
  const byDescription = new Map<boolean, TDescriptionLine & { labels: Set<string> }>();
  const byContainer = new Map<string, TContainerLine>();
  for (const c of containers) {
    byContainer.set(c.labelNumber, { ...emptyMass(), labelNumber: c.labelNumber, kind: c.kind, isClosed: c.isClosed, unNumbers: [], hasLeakingOrDamaged: false });
  }
  let hasLeakingOrDamaged = false;
  let leakingAllInClosedContainers = true;

  for (const u of units) {
    const nonSpillable = u.isNonSpillable;
    const description = hazmatDescription({ nonSpillable });
    add(total, u.count, u.massKg, u.leadKg);
    leadKgLow += u.leadKgLow ?? u.leadKg;
    leadKgHigh += u.leadKgHigh ?? u.leadKg;

    const kindKey = `${u.kind}\u0000${nonSpillable}`;
    let kindLine = byKind.get(kindKey);
    if (!kindLine) byKind.set(kindKey, (kindLine = { ...emptyMass(), kind: u.kind, isNonSpillable: nonSpillable, description }));
    add(kindLine, u.count, u.massKg, u.leadKg);

    let descLine = byDescription.get(nonSpillable);
    if (!descLine) {
      descLine = { ...emptyMass(), unNumber: unNumberOf({ nonSpillable }), isNonSpillable: nonSpillable, description, packages: [], packagesText: "", containerLabels: [], labels: new Set() };
      byDescription.set(nonSpillable, descLine);
    }
    add(descLine, u.count, u.massKg, u.leadKg);
    descLine.labels.add(u.containerLabel);

    let containerLine = byContainer.get(u.containerLabel);
    if (!containerLine) {
      containerLine = { ...emptyMass(), labelNumber: u.containerLabel, kind: "package", isClosed: false, unNumbers: [], hasLeakingOrDamaged: false };
      byContainer.set(u.containerLabel, containerLine);
    }
    add(containerLine, u.count, u.massKg, u.leadKg);
    const un = unNumberOf({ nonSpillable });
    if (!containerLine.unNumbers.includes(un)) containerLine.unNumbers.push(un);

    if (u.condition !== "intact") {
      hasLeakingOrDamaged = true;
      containerLine.hasLeakingOrDamaged = true;
      if (!closed.get(u.containerLabel)) leakingAllInClosedContainers = false;
    }
  }

  const withLb = <T extends TMass>(m: T): T => ({ ...m, massLb: kgToLb(m.massKg) });
  const descriptions = [false, true]
    .map((k) => byDescription.get(k))
    .filter((d): d is NonNullable<typeof d> => d !== undefined)
    .map(({ labels, ...d }) => {
      const packages = countPackages(labels, kindOf);
      return withLb({ ...d, packages, packagesText: packagesText(packages), containerLabels: [...labels] });
    });
  const containerLines = [...byContainer.values()].filter((c) => c.count > 0).map((c) => withLb({ ...c, unNumbers: c.unNumbers.sort() }));

  const remarks: string[] = [];
  const mixed = containerLines.filter((c) => c.unNumbers.length > 1).map((c) => c.labelNumber);
  if (mixed.length > 0) {
    remarks.push(`Container${mixed.length > 1 ? "s" : ""} ${mixed.join(", ")} hold${mixed.length > 1 ? "" : "s"} both flooded and non-spillable units and ${mixed.length > 1 ? "are" : "is"} counted on both description lines.`);
  }

  return {
    ...withLb(total),
    leadKgLow,
    leadKgHigh,
    leadLb: kgToLb(total.leadKg),
    byKind: [...byKind.values()].map(withLb),
    byDescription: descriptions,
    byContainer: containerLines,
    packagesText: packagesText(countPackages(containerLines.map((c) => c.labelNumber), kindOf)),
    hasNonSpillable: byDescription.has(true),
    hasLeakingOrDamaged,
    leakingAllInClosedContainers,
    remarks,
  };
}
