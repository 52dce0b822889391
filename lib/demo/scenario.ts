/**
 * The demo scenario: an invented town (Quarry Bend) with two stores and a collection yard, invented people,
 * and a few hundred units of mixed kinds. Every name here is made up; none of it is used by domain tests.
 */
export const DEMO_ORG = { name: "Quarry Bend Battery Return", emergencyPhone: "+1-555-0142 (demo number)" };

export const DEMO_SITES = [
  { key: "harbor", name: "Millrace Auto Parts — Harbor Street", kind: "store", address: "14 Harbor Street, Quarry Bend", unitSystem: "lb" },
  { key: "kiln", name: "Millrace Auto Parts — Kiln Road", kind: "store", address: "302 Kiln Road, Quarry Bend", unitSystem: "lb" },
  { key: "yard", name: "Quarry Bend Collection Yard", kind: "yard", address: "9 Slag Lane, Quarry Bend", unitSystem: "kg" },
] as const;

export type TDemoSiteKey = (typeof DEMO_SITES)[number]["key"];

/** One person per role; passwords are for the demo only and printed by `npm start`. */
export const DEMO_PEOPLE = [
  { email: "clerk@quarrybend.example", name: "Priya Okafor", role: "clerk", password: "demo-clerk-2026", sites: ["harbor"] },
  { email: "yard@quarrybend.example", name: "Tomas Reyes", role: "yard", password: "demo-yard-2026", sites: ["yard", "kiln"] },
  { email: "compliance@quarrybend.example", name: "Lena Marsh", role: "compliance", password: "demo-compliance-2026", sites: ["harbor", "kiln", "yard"] },
  { email: "admin@quarrybend.example", name: "Dev Anand", role: "admin", password: "demo-admin-2026", sites: ["harbor", "kiln", "yard"] },
] as const;

/** A small deterministic generator so the demo is the same on every machine. */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Typical units seen across a counter; capacity in Ah and weight in kg are plausible invented values. */
export const DEMO_UNIT_MIX = [
  { weight: 30, kind: "flooded", nominalVoltage: 12, capacityAh: [45, 60, 70, 80], groupSize: ["24F", "35", "65", "H6"] },
  { weight: 12, kind: "efb", nominalVoltage: 12, capacityAh: [60, 70], groupSize: ["H6", "H7"] },
  { weight: 12, kind: "agm", nominalVoltage: 12, capacityAh: [60, 70, 80, 95], groupSize: ["H6", "H7", "H8"] },
  { weight: 6, kind: "powersport", nominalVoltage: 12, capacityAh: [8, 12, 18], groupSize: [] },
  { weight: 8, kind: "deep-cycle", nominalVoltage: 12, capacityAh: [100, 105], groupSize: ["27", "31"] },
  { weight: 4, kind: "deep-cycle", nominalVoltage: 6, capacityAh: [225], groupSize: ["GC2"] },
  { weight: 3, kind: "gel", nominalVoltage: 12, capacityAh: [55, 100], groupSize: [] },
  { weight: 2, kind: "stationary", nominalVoltage: 12, capacityAh: [7, 18, 100], groupSize: [] },
] as const;
