import { createReadStream } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { Transform } from "node:stream";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { parseSalesCsv } from "@/lib/deposits/sales-csv";
import { writeSalesFile } from "./generate-sales";

// Speed is measured in test/bench/deposits-parse.bench.ts; here only counts, streaming and memory.
const ROWS = 100_000;
const MIB = 1024 * 1024;
let dir = "";
let file = "";
let fileBytes = 0;

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), "leadger-sales-"));
  file = path.join(dir, "sales-100k.csv");
  fileBytes = await writeSalesFile(file, ROWS);
});
afterAll(async () => {
  await rm(dir, { recursive: true, force: true });
});

describe(`a generated file of ${ROWS.toLocaleString("en-US")} sales lines`, () => {
  test("every line arrives once, in order, in batches of 1 000, while the file is still being read", async () => {
    let expectedLine = 2;
    let isInOrder = true;
    let batchCount = 0;
    let bytesAtFirstBatch = -1;
    let bytesRead = 0;
    const rssBefore = process.memoryUsage().rss;
    let rssPeak = rssBefore;
    const result = await parseSalesCsv({
      stream: createReadStream(file),
      onProgress: (bytes) => {
        bytesRead = bytes;
        rssPeak = Math.max(rssPeak, process.memoryUsage().rss);
      },
      onBatch: async (rows) => {
        if (bytesAtFirstBatch < 0) bytesAtFirstBatch = bytesRead;
        batchCount++;
        for (const row of rows) {
          if (row.line !== expectedLine) isInOrder = false;
          expectedLine++;
        }
      },
    });
    expect(result).toMatchObject({ rows: ROWS, rowsDelivered: ROWS, errorCount: 0, isValid: true, lines: ROWS + 1, bytes: fileBytes });
    expect(batchCount).toBe(ROWS / 1_000);
    expect(isInOrder).toBe(true);
    // Streaming: the first batch is handed on after a small part of the file has been read.
    expect(bytesAtFirstBatch).toBeGreaterThan(0);
    expect(bytesAtFirstBatch).toBeLessThan(fileBytes / 10);
    const growthMiB = (rssPeak - rssBefore) / MIB;
    console.info(`sales CSV, ${ROWS} rows, ${(fileBytes / MIB).toFixed(1)} MiB file: peak RSS growth ${growthMiB.toFixed(1)} MiB`);
    expect(growthMiB).toBeLessThan(150);
  });

  test("while onBatch is busy the parser stays paused: the file is not read ahead", async () => {
    // Counts what the parser pulls from the file, ahead of the parser's own buffers.
    let bytesPulled = 0;
    const tap = new Transform({
      transform(chunk: Buffer, _encoding, done) {
        bytesPulled += chunk.length;
        done(null, chunk);
      },
    });
    const source = createReadStream(file, { highWaterMark: 16 * 1024 }).pipe(tap);
    let batchCount = 0;
    let worstReadAheadBytes = 0;
    await parseSalesCsv({
      stream: source,
      onBatch: async () => {
        batchCount++;
        if (batchCount > 10) return;
        const before = bytesPulled;
        await new Promise((resolve) => setTimeout(resolve, 25));
        worstReadAheadBytes = Math.max(worstReadAheadBytes, bytesPulled - before);
      },
    });
    expect(batchCount).toBe(ROWS / 1_000);
    // A few stream buffers (16 KiB each) may fill while paused; an unpaused parser reads on through the file.
    expect(worstReadAheadBytes).toBeLessThan(256 * 1024);
  });
});
