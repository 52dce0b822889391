/**
 * Speed of the pure limit and annual computations, beside a floor measured in the same run.
 * Run: npx tsx test/bench/limits-pure.bench.ts
 *
 * Floor for annualFigures: sorting the same number of timestamps (Float64Array) and one summing pass over
 * the events — the least any sort-once, single-pass method can do. Target: 200 000 events well under 1 s.
 */
import { annualFigures, type TLevelEvent } from "@/lib/annual/annual-figures";
import { evaluateLimits, type TContainerInput } from "@/lib/limits/evaluate-limits";
import { getRulebook } from "@/lib/rules/rulebooks";

const N = 200_000;
const YEAR_START = Date.UTC(2025, 0, 1);
const YEAR_MS = 365 * 86_400_000;

// Invented history, deterministic (LCG): intakes and departures spread over the year, in random order.
let seed = 42;
const random = () => ((seed = (seed * 1_664_525 + 1_013_904_223) >>> 0) / 2 ** 32);
const shuffled: TLevelEvent[] = Array.from({ length: N }, () => {
  const n = random() < 0.7 ? 1 : -1;
  return { at: new Date(YEAR_START + Math.floor(random() * YEAR_MS)), unitCount: n, batteryKg: 18 * n, leadKg: 11.5 * n, acidKg: 2.9 * n };
});
const sorted = [...shuffled].sort((a, b) => a.at.getTime() - b.at.getTime());

const time = (label: string, runs: number, fn: () => unknown) => {
  fn(); // warm-up
  const samples: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    fn();
    samples.push(performance.now() - t0);
  }
  samples.sort((a, b) => a - b);
  return { label, medianMs: samples[Math.floor(runs / 2)], maxMs: samples[runs - 1] };
};

const floor = time("floor: sort 200k timestamps + one pass", 7, () => {
  const times = new Float64Array(N);
  for (let i = 0; i < N; i++) times[i] = shuffled[i].at.getTime();
  times.sort();
  let sum = 0;
  for (let i = 0; i < N; i++) sum += shuffled[i].acidKg;
  return sum;
});
const unsortedRun = time("annualFigures, 200k events in random order", 7, () => annualFigures({ events: shuffled, year: 2025, siteId: "bench" }));
const sortedRun = time("annualFigures, 200k events in time order", 7, () => annualFigures({ events: sorted, year: 2025, siteId: "bench" }));

const containers: TContainerInput[] = Array.from({ length: 500 }, (_, i) => ({
  id: `c${i}`,
  labelNumber: `P-${i}`,
  accumulationStart: new Date(YEAR_START + Math.floor(random() * YEAR_MS)),
  state: "open",
  isClosed: i % 7 === 0,
  hasLeaking: i % 11 === 0,
}));
const totals = { unitCount: 4000, batteryKg: 72_000, leadKg: 46_000, electrolyteKg: 15_000, acidKg: 5_000 };
const limitsRun = time("evaluateLimits, us-federal, 500 containers", 50, () =>
  evaluateLimits({
    rulebook: getRulebook("us-federal"),
    totals,
    containers,
    history: { netChangeLast28Days: { ...totals, batteryKg: 900 } },
    asOf: new Date(YEAR_START + YEAR_MS - 1),
    site: { isConsumerExempt: false, peakYear: 2025, peakBatteryKg: 72_000 },
  }),
);

for (const r of [floor, unsortedRun, sortedRun, limitsRun]) {
  const ratio = r === limitsRun ? "" : `  (${(r.medianMs / floor.medianMs).toFixed(2)} × floor)`;
  console.log(`${r.label.padEnd(48)} median ${r.medianMs.toFixed(1).padStart(7)} ms, max ${r.maxMs.toFixed(1).padStart(7)} ms${ratio}`);
}
