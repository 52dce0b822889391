/**
 * Speed of estimateComposition: target 1 000 000 estimates in at most 1 s on one core.
 * Printed beside a baseline measured in the same run: a loop doing only the Faraday arithmetic and
 * allocating a result of the same shape (nine objects and arrays), which is about the least any estimate
 * returning that shape can cost on this machine right now.
 *   npm run bench:chemistry
 */
import { estimateComposition, FLOOR_KG_PER_AH_CELL, KIND_IDS, type TComposition, type TCompositionInput } from "@/lib/chemistry";

const N = 1_000_000;
const ROUNDS = 5;
const TARGET_MS = 1000;

/**
 * Deterministic mix like the intake's: every kind and method; weights near what the capacity implies, with
 * one in 32 far too light (floor warnings); a measured SG on one in three, many of them discharged.
 */
function inputs(count: number): TCompositionInput[] {
  let seed = 12345;
  const next = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
  const voltages = [2, 6, 12, 12, 12, 12, 24, 48];
  const groups = ["24F", "H6", "31", "group 65", "unknown"];
  const list: TCompositionInput[] = [];
  for (let i = 0; i < count; i++) {
    const kind = KIND_IDS[i % KIND_IDS.length];
    const nominalVoltage = voltages[Math.floor(next() * voltages.length)];
    const capacityAh = Math.round(nominalVoltage <= 12 ? 20 + next() * 180 : 100 + next() * 800);
    const typicalKg = (capacityAh * nominalVoltage) / 35;
    const weightKg = i % 32 === 0 ? 0.5 + next() * 2 : Math.min(3000, Math.max(0.5, typicalKg * (0.7 + next() * 0.7)));
    const mode = i % 4;
    list.push({
      kind,
      nominalVoltage,
      capacityAh: mode === 0 || mode === 1 ? capacityAh : undefined,
      weightKg: mode === 0 || mode === 2 ? weightKg : undefined,
      groupSize: mode === 3 || i % 7 === 0 ? groups[i % groups.length] : undefined,
      specificGravity: i % 3 === 0 ? 1.1 + next() * 0.2 : undefined,
      electrolyteTempC: i % 6 === 0 ? -10 + next() * 40 : undefined,
    });
  }
  return list;
}

const INPUTS = inputs(1024);
const MASK = INPUTS.length - 1;
/** Results are kept in rings so that neither loop's allocations can be optimised away. */
const KEEP: TComposition[] = new Array(INPUTS.length);
const KEEP_BASELINE: TComposition[] = new Array(INPUTS.length);

function runEstimates(n: number): number {
  let sink = 0;
  for (let i = 0; i < n; i++) {
    const c = estimateComposition(INPUTS[i & MASK]);
    KEEP[i & MASK] = c;
    sink += c.leadKg.value + c.warnings.length;
  }
  return sink;
}

/** Only the Faraday arithmetic and a result of the same shape. */
function runBaseline(n: number): number {
  let sink = 0;
  for (let i = 0; i < n; i++) {
    const input = INPUTS[i & MASK];
    const ahCells = (input.capacityAh ?? 0) * (input.nominalVoltage / 2);
    const lead = ahCells * FLOOR_KG_PER_AH_CELL.lead;
    const acid = ahCells * FLOOR_KG_PER_AH_CELL.sulfuricAcid;
    const battery = ahCells * FLOOR_KG_PER_AH_CELL.reactants;
    const c: TComposition = {
      cells: input.nominalVoltage / 2,
      method: "from-capacity",
      batteryKg: { value: battery, low: battery, high: battery },
      leadKg: { value: lead, low: lead, high: lead },
      electrolyteKg: { value: acid, low: acid, high: acid },
      sulfuricAcidKg: { value: acid, low: acid, high: acid },
      polymerKg: { value: 0, low: 0, high: 0 },
      otherKg: { value: battery - lead - acid, low: 0, high: 0 },
      notes: [],
      warnings: [],
    };
    KEEP_BASELINE[i & MASK] = c;
    sink += c.leadKg.value + c.warnings.length;
  }
  return sink;
}

function time(run: (n: number) => number): { ms: number; sink: number } {
  const start = process.hrtime.bigint();
  const sink = run(N);
  return { ms: Number(process.hrtime.bigint() - start) / 1e6, sink };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

runEstimates(200_000);
runBaseline(200_000);
const estimateMs: number[] = [];
const baselineMs: number[] = [];
let sink = 0;
for (let r = 0; r < ROUNDS; r++) {
  const b = time(runBaseline);
  const e = time(runEstimates);
  baselineMs.push(b.ms);
  estimateMs.push(e.ms);
  sink += b.sink + e.sink;
}

const eMed = median(estimateMs);
const bMed = median(baselineMs);
const isMet = eMed <= TARGET_MS;
const f = (ms: number) => `${ms.toFixed(0).padStart(5)} ms  (${((ms * 1e6) / N).toFixed(0).padStart(4)} ns each)`;
console.log(`chemistry bench: ${N.toLocaleString("en-US")} calls, median of ${ROUNDS} rounds, one thread (Node ${process.version})`);
console.log(`  baseline (Faraday arithmetic + same result shape)  ${f(bMed)}   best ${Math.min(...baselineMs).toFixed(0)} ms`);
console.log(`  estimateComposition                                ${f(eMed)}   best ${Math.min(...estimateMs).toFixed(0)} ms`);
console.log(`  ratio to baseline: ${(eMed / bMed).toFixed(1)} ×`);
console.log(`  target: ${N.toLocaleString("en-US")} estimates in ≤ ${TARGET_MS} ms — ${isMet ? "MET" : "NOT MET"}`);
console.log(`  (checksum ${sink.toExponential(6)})`);
if (!isMet) process.exitCode = 1;
