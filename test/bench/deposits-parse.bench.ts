/**
 * Speed and memory of parseSalesCsv on a generated 100 000-line sales file: target well under 2 s.
 * Printed beside a baseline measured in the same run on the same file: papaparse alone, streaming the
 * file in chunk mode and only counting rows (no typing, no checks), which is about the least a streaming
 * parse of this file can cost here right now. Each round runs in a fresh child process so its peak RSS is
 * its own; the child parses the file twice and reports the first ("cold": a fresh server's first import)
 * and the second ("warm") time.
 *   npx tsx test/bench/deposits-parse.bench.ts
 */
import { spawnSync } from "node:child_process";
import { createReadStream } from "node:fs";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import Papa from "papaparse";
import { parseSalesCsv } from "@/lib/deposits/sales-csv";
import { writeSalesFile } from "../unit/deposits/generate-sales";

const ROWS = 100_000;
const ROUNDS = 5;
const TARGET_MS = 2_000;
const MIB = 1024 * 1024;

type TRun = { ms: number; warmMs: number; rows: number; peakRssMiB: number; startRssMiB: number };

/** Data rows of the file (lines with more than one cell, less the header). */
async function parseOnce(kind: string, file: string): Promise<number> {
  if (kind === "papaparse") {
    let rows = -1;
    await new Promise<void>((resolve, reject) =>
      Papa.parse<string[]>(createReadStream(file) as unknown as File, {
        chunk: (results) => {
          for (const row of results.data) if (row.length > 1) rows++;
        },
        complete: () => resolve(),
        error: reject,
      }),
    );
    return rows;
  }
  const result = await parseSalesCsv({ stream: createReadStream(file), onBatch: async () => {} });
  if (!result.isValid) throw new Error(`the generated file did not parse: ${JSON.stringify(result.errors.slice(0, 3))}`);
  return result.rowsDelivered;
}

async function runCase(kind: string, file: string): Promise<TRun> {
  const startRssMiB = process.memoryUsage().rss / MIB;
  const timed = async () => {
    const start = process.hrtime.bigint();
    const rows = await parseOnce(kind, file);
    return { rows, ms: Number(process.hrtime.bigint() - start) / 1e6 };
  };
  const cold = await timed();
  const warm = await timed();
  // maxRSS is in KiB and covers the whole child process.
  return { ms: cold.ms, warmMs: warm.ms, rows: cold.rows, peakRssMiB: process.resourceUsage().maxRSS / 1024, startRssMiB };
}

const caseArg = process.argv.indexOf("--case");
if (caseArg !== -1) {
  const run = await runCase(process.argv[caseArg + 1]!, process.argv[caseArg + 2]!);
  process.stdout.write(JSON.stringify(run));
} else {
  const dir = mkdtempSync(path.join(os.tmpdir(), "leadger-bench-sales-"));
  try {
    const file = path.join(dir, "sales.csv");
    const bytes = await writeSalesFile(file, ROWS);
    const self = fileURLToPath(import.meta.url);
    const child = (kind: string): TRun => {
      const out = spawnSync(process.execPath, [...process.execArgv, self, "--case", kind, file], { encoding: "utf8" });
      if (out.status !== 0) throw new Error(`${kind} round failed: ${out.stderr}`);
      return JSON.parse(out.stdout) as TRun;
    };
    const runs: Record<string, TRun[]> = { papaparse: [], parseSalesCsv: [] };
    for (let r = 0; r < ROUNDS; r++) {
      runs.papaparse!.push(child("papaparse"));
      runs.parseSalesCsv!.push(child("parseSalesCsv"));
    }
    const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
    const summary = (list: TRun[]) => ({
      ms: median(list.map((x) => x.ms)),
      warm: median(list.map((x) => x.warmMs)),
      peak: median(list.map((x) => x.peakRssMiB)),
      growth: median(list.map((x) => x.peakRssMiB - x.startRssMiB)),
      rows: list[0]!.rows,
    });
    const base = summary(runs.papaparse!);
    const ours = summary(runs.parseSalesCsv!);
    const line = (name: string, s: ReturnType<typeof summary>) =>
      `  ${name.padEnd(50)} cold ${s.ms.toFixed(0).padStart(5)} ms  warm ${s.warm.toFixed(0).padStart(5)} ms   peak RSS ${s.peak.toFixed(0)} MiB (+${s.growth.toFixed(0)} over start)   ${s.rows} rows`;
    const isMet = ours.ms < TARGET_MS && ours.rows === ROWS;
    console.log(`deposits parse bench: ${ROWS.toLocaleString("en-US")} lines, ${(bytes / MIB).toFixed(1)} MiB, median of ${ROUNDS} rounds, one process each (Node ${process.version})`);
    console.log(line("baseline: papaparse alone (count rows)", base));
    console.log(line("parseSalesCsv (typed, checked, batches of 1 000)", ours));
    console.log(`  ratio to baseline: cold ${(ours.ms / base.ms).toFixed(1)} ×, warm ${(ours.warm / base.warm).toFixed(1)} × time; +${(ours.peak - base.peak).toFixed(0)} MiB peak RSS`);
    console.log(`  target: ${ROWS.toLocaleString("en-US")} lines in < ${TARGET_MS} ms, cold — ${isMet ? "MET" : "NOT MET"}`);
    if (!isMet) process.exitCode = 1;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
