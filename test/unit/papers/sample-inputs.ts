// Invented sample data for the paper tests and the benchmark. Names, places and numbers are made up.
import type { TLoadContainer, TLoadUnit } from "@/lib/loads/summarise-load";
import type { TAnnualWorksheetInput } from "@/lib/papers/render-annual-worksheet";
import type { TContainerLabelInput } from "@/lib/papers/render-container-label";
import type { TManifestInput } from "@/lib/papers/render-manifest";
import type { TReceiptFormInput } from "@/lib/papers/render-receipt-form";
import type { TShipmentRecordsInput } from "@/lib/papers/render-shipment-records";

/** A small deterministic generator (LCG, Numerical Recipes constants) so every run builds the same load. */
function lcg(seed: number) {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

const KINDS = [
  { kind: "car starter 12 V", isNonSpillable: false, minKg: 15, maxKg: 22, share: 0.55 },
  { kind: "truck starter 12 V", isNonSpillable: false, minKg: 27, maxKg: 34, share: 0.15 },
  { kind: "AGM starter 12 V", isNonSpillable: true, minKg: 18, maxKg: 25, share: 0.2 },
  { kind: "motorcycle 12 V", isNonSpillable: false, minKg: 3, maxKg: 6, share: 0.05 },
  { kind: "golf cart 8 V", isNonSpillable: false, minKg: 27, maxKg: 31, share: 0.05 },
];

/** Lead as a share of battery mass for the sample: inside the 65–75 wt % of the Basel technical guidelines. */
const LEAD_SHARE = 0.68;

export function sampleLoad({ pallets = 26, units = 1500, seed = 7 }: { pallets?: number; units?: number; seed?: number } = {}) {
  const rand = lcg(seed);
  const containers: TLoadContainer[] = Array.from({ length: pallets }, (_, i) => ({
    labelNumber: `BRK-P${String(i + 1).padStart(4, "0")}`,
    kind: "pallet",
    isClosed: false,
  }));
  const kinds = Array.from({ length: units }, () => {
    const r = rand();
    let acc = 0;
    return KINDS.find((x) => (acc += x.share) >= r) ?? KINDS[0];
  });
  // Non-spillable units go on pallets of their own, as a yard would stow them.
  kinds.sort((a, b) => Number(a.isNonSpillable) - Number(b.isNonSpillable));
  const list: TLoadUnit[] = [];
  for (let i = 0; i < units; i++) {
    const k = kinds[i];
    const massKg = Math.round((k.minKg + rand() * (k.maxKg - k.minKg)) * 10) / 10;
    const leadKg = Math.round(massKg * LEAD_SHARE * 100) / 100;
    list.push({
      id: `U${String(i + 1).padStart(5, "0")}`,
      kind: k.kind,
      isNonSpillable: k.isNonSpillable,
      containerLabel: containers[Math.floor((i * pallets) / units)].labelNumber,
      massKg,
      leadKg,
      leadKgLow: Math.round(massKg * 0.65 * 100) / 100,
      leadKgHigh: Math.round(massKg * 0.75 * 100) / 100,
      condition: "intact",
    });
  }
  return { containers, units: list };
}

export const SHIPPER = {
  name: "Bramblecourt Battery Yard",
  address: "18 Furnace Row\nAldwick, OH 45990",
  regulatoryIds: "EPA ID OHX000000123",
};
export const CONSIGNEE = {
  name: "Greywater Lead Recovery",
  address: "2 Slagbank Road\nTemperance, PA 17999",
  regulatoryIds: "EPA ID PAX000000456",
};
export const CARRIER = { name: "Oxbow Freight Lines", address: "77 Depot Street\nAldwick, OH 45990", regulatoryIds: "USDOT 0000001" };

export const US_FULL_CHECKLIST = {
  "packages-marked-labelled": true,
  "nonspillable-marked": true,
  "short-circuit": true,
  "pallet-stacks": true,
  "emergency-phone": true,
  "certification-signed": true,
};

export function sampleManifest(overrides: Partial<TManifestInput> = {}): TManifestInput {
  const { containers, units } = sampleLoad();
  return {
    issuedAt: "2025-03-04T14:05:00Z",
    rulebook: { id: "us-federal", version: "2025.1" },
    documentSeed: "doc-sample-0001",
    reference: "LD-2025-0042",
    shipDate: "2025-03-05",
    basis: "us-full",
    checklist: US_FULL_CHECKLIST,
    shipper: SHIPPER,
    consignee: CONSIGNEE,
    carrier: CARRIER,
    vehicle: "Tractor 14, trailer 9 (plate XQ-4417)",
    emergencyPhone: "+1 555 0142 (Bramblecourt duty desk)",
    containers,
    units,
    departureScaleKg: 30_450,
    ...overrides,
  };
}

export function sampleReceiptForm(): TReceiptFormInput {
  const m = sampleManifest();
  return {
    issuedAt: m.issuedAt,
    rulebook: m.rulebook,
    reference: m.reference,
    shipDate: m.shipDate,
    shipper: SHIPPER,
    consignee: CONSIGNEE,
    carrier: CARRIER,
    vehicle: m.vehicle,
    containers: m.containers,
    units: m.units,
    departureScaleKg: m.departureScaleKg,
    tolerancePct: 2,
  };
}

export function sampleLabel(overrides: Partial<TContainerLabelInput> = {}): TContainerLabelInput {
  return {
    issuedAt: "2025-02-10T08:30:00Z",
    rulebook: { id: "us-federal", version: "2025.1" },
    labelNumber: "BRK-P0007",
    wording: "Universal Waste—Batteries",
    wordingCitation: "40 CFR 273.14(a), 273.34(a)",
    accumulationStart: "2025-02-10",
    keepUntil: "2026-02-10",
    keepUntilCitation: "one-year limit, 40 CFR 273.15, 273.35",
    site: SHIPPER,
    containerKind: "pallet",
    bay: "B3",
    holdsLeakingOrDamaged: false,
    ...overrides,
  };
}

export function sampleRecords(): TShipmentRecordsInput {
  const q = (type: string, count: number, massKg: number) => ({ type, count, massKg });
  return {
    issuedAt: "2025-04-01T09:00:00Z",
    rulebook: { id: "us-federal", version: "2025.1" },
    handler: SHIPPER,
    from: "2025-01-01",
    to: "2025-03-31",
    received: [
      { date: "2025-02-14", counterpart: { name: "Harrow Lane Tyre & Battery", address: "5 Harrow Lane\nAldwick, OH 45990" }, quantities: [q("lead-acid batteries, flooded", 42, 781.5), q("lead-acid batteries, non-spillable", 6, 121.0)], reference: "T-20250214-3" },
      { date: "2025-01-09", counterpart: { name: "Kestrel Fleet Depot", address: "900 Yardline Road, Pell, OH 45991" }, quantities: [q("lead-acid batteries, flooded", 120, 3_410.2)], reference: "T-20250109-1" },
      { date: "2024-12-30", counterpart: { name: "Outside the period", address: "1 Nowhere" }, quantities: [q("lead-acid batteries, flooded", 1, 18)], reference: "T-OLD" },
    ],
    sent: [
      { date: "2025-03-05", counterpart: CONSIGNEE, quantities: [q("lead-acid batteries, flooded", 1_215, 24_885.7), q("lead-acid batteries, non-spillable", 285, 6_170.2)], reference: "LD-2025-0042" },
    ],
  };
}

/** A year of daily on-hand amounts: a steady intake, emptied by a load every 45 days (invented). */
export function sampleAnnual(): TAnnualWorksheetInput {
  const days = 365;
  const battery = Array.from({ length: days }, (_, d) => 400 + (d % 45) * 130 + Math.round(60 * Math.sin(d / 5)));
  const acid = battery.map((b) => Math.round(b * 0.052 * 10) / 10);
  const lead = battery.map((b) => Math.round(b * 0.68 * 10) / 10);
  const stats = (v: number[]) => ({ maxDailyKg: Math.max(...v), averageDailyKg: v.reduce((s, x) => s + x, 0) / v.length, daysOnSite: v.filter((x) => x > 0).length });
  return {
    issuedAt: "2026-01-20T10:00:00Z",
    rulebook: { id: "us-federal", version: "2025.1" },
    site: SHIPPER,
    year: 2025,
    chartUnit: "lb",
    substances: [
      { name: "Sulfuric acid", cas: "7664-93-9", ...stats(acid), thresholdKg: 500 * 0.45359237, thresholdCitation: "40 CFR 370.10(a)(1)", dailyKg: acid },
      { name: "Lead", cas: "7439-92-1", ...stats(lead), thresholdKg: 10_000 * 0.45359237, thresholdCitation: "40 CFR 370.10(a)", dailyKg: lead },
      { name: "Battery mass (as a mixture)", ...stats(battery), thresholdKg: 10_000 * 0.45359237, thresholdCitation: "40 CFR 370.10(a); EPA EPCRA FAQ on batteries", dailyKg: battery },
    ],
    notes: ["Acid counted at the charged-state concentration unless a specific gravity was measured.", "Consumer batteries held for sale are not counted (EPA EPCRA FAQ)."],
  };
}
