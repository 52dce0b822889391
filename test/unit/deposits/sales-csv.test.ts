import { createReadStream, readFileSync } from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { isCleanSalesRecord, parseSalesCsv, ZSalesCsvRecord, type TSaleLine, type TSalesCsvRecord } from "@/lib/deposits/sales-csv";

const FIXTURES = path.resolve(import.meta.dirname, "../../fixtures/sales");
const fixture = (name: string) => createReadStream(path.join(FIXTURES, name));

/** A stream that hands the bytes over in pieces of `size` bytes, to cut lines, quotes and characters apart. */
const inPieces = (bytes: Buffer, size: number) => {
  const pieces: Buffer[] = [];
  for (let i = 0; i < bytes.length; i += size) pieces.push(bytes.subarray(i, i + size));
  return Readable.from(pieces);
};
const fromText = (text: string) => Readable.from([Buffer.from(text)]);

async function collect(stream: NodeJS.ReadableStream | ReadableStream<Uint8Array>, batchSize = 1_000) {
  const batches: TSaleLine[][] = [];
  const result = await parseSalesCsv({ stream, batchSize, onBatch: async (rows) => void batches.push(rows) });
  return { result, batches, rows: batches.flat() };
}

describe("a clean file", () => {
  test("every line is typed: calendar date kept as text, quantity a number, deposit in cents", async () => {
    const { result, rows } = await collect(fixture("good.csv"));
    expect(result).toMatchObject({ rows: 5, rowsDelivered: 5, errorCount: 0, isValid: true, lines: 6, ignoredColumns: [] });
    expect(rows[1]).toEqual({ line: 3, soldOn: "2025-03-01", saleRef: "R-1002", product: "Starter 12 V, heavy duty", groupSize: "65", quantity: 1, depositCents: 1_500 });
    expect(rows.map((r) => [r.line, r.groupSize, r.depositCents])).toEqual([
      [2, "24F", 3_000],
      [3, "65", 1_500],
      [4, "", 1_500],
      [5, "H6", 0],
      [6, "", 6_000],
    ]);
    expect(result.bytes).toBe(readFileSync(path.join(FIXTURES, "good.csv")).length);
  });

  test("batches come in the size asked for, in file order", async () => {
    const { batches } = await collect(fixture("good.csv"), 2);
    expect(batches.map((b) => b.map((r) => r.saleRef))).toEqual([["R-1001", "R-1002"], ["R-1003", "R-1004"], ["R-1005"]]);
  });

  test("a web ReadableStream (a request body) reads the same", async () => {
    const web = Readable.toWeb(fixture("good.csv")) as unknown as ReadableStream<Uint8Array>;
    const { result, rows } = await collect(web);
    expect(result.rows).toBe(5);
    expect(rows[0]!.saleRef).toBe("R-1001");
  });

  test("without onBatch the file is only checked (the preview pass)", async () => {
    const result = await parseSalesCsv({ stream: fixture("good.csv") });
    expect(result).toMatchObject({ rows: 5, rowsDelivered: 0, isValid: true });
  });

  test("progress reports bytes and rows as it goes", async () => {
    const seen: Array<[number, number]> = [];
    await parseSalesCsv({ stream: fixture("good.csv"), onProgress: (bytes, rows) => void seen.push([bytes, rows]) });
    expect(seen.at(-1)).toEqual([readFileSync(path.join(FIXTURES, "good.csv")).length, 5]);
  });
});

describe("header spellings", () => {
  test("spaces, capitals, a byte-order mark, CRLF line ends, '$' and a quoted line break", async () => {
    const text = "\uFEFFDate,Sale ID,Product,Group Size,Qty.,Deposit ($)\r\n2025-04-01,T-1,Starter 12 V,24F,1,$15.00\r\n2025-04-02,T-2,\"Deep cycle\r\n12 V\",27,2,30.00\r\n2025-04-03,T-3,Starter,,1,15.00\r\n";
    const { result, rows } = await collect(fromText(text));
    expect(result.errors).toEqual([]);
    expect(result.columns).toEqual({ date: "Date", sale_id: "Sale ID", product: "Product", group_size: "Group Size", quantity: "Qty.", deposit: "Deposit ($)" });
    expect(rows.map((r) => [r.line, r.saleRef, r.product, r.depositCents])).toEqual([
      [2, "T-1", "Starter 12 V", 1_500],
      [3, "T-2", "Deep cycle\r\n12 V", 3_000],
      [5, "T-3", "Starter", 1_500],
    ]);
  });

  test("other names in another order, with a column of ours ignored", async () => {
    const { result, rows } = await collect(fixture("header-receipt-order.csv"));
    expect(result.ignoredColumns).toEqual(["Clerk"]);
    expect(result.columns).toMatchObject({ sale_id: "Receipt #", date: "Sale Date", product: "Item", group_size: "BCI Group", deposit: "Core Charge" });
    expect(rows.map((r) => [r.saleRef, r.soldOn, r.groupSize, r.quantity, r.depositCents])).toEqual([
      ["A-77", "2025-05-01", "35", 1, 1_500],
      ["A-78", "2025-05-01", "24F", 3, 4_500],
    ]);
  });

  test("a missing column stops the import at line 1", async () => {
    const { result, rows } = await collect(fixture("header-missing.csv"));
    expect(rows).toEqual([]);
    expect(result.isValid).toBe(false);
    expect(result.errors).toEqual([
      {
        line: 1,
        field: "header",
        message: "the first line must name the columns (date, sale_id, product, group_size, quantity, deposit); missing: deposit",
      },
    ]);
  });

  test("two columns that mean the same thing are refused", async () => {
    const { result } = await collect(fixture("header-twice.csv"));
    expect(result.errors).toEqual([{ line: 1, field: "header", message: 'two columns both mean quantity: "qty" and "quantity"; keep one' }]);
  });

  test("an empty file and a file with only the header", async () => {
    expect((await collect(fromText(""))).result.errors).toEqual([
      { line: 1, field: "header", message: "the file is empty; the first line must name the columns (date, sale_id, product, group_size, quantity, deposit)" },
    ]);
    expect((await collect(fromText("date,sale_id,product,group_size,quantity,deposit\n"))).result.errors).toEqual([
      { line: 2, field: "line", message: "the file has no sales lines after the first line" },
    ]);
  });
});

// The expected list is written out by hand from test/fixtures/sales/malformed.csv (line 1 is the header).
const MALFORMED_ERRORS = [
  [3, "date", "date must be YYYY-MM-DD"],
  [4, "date", "date 2025-02-30 is not a real calendar date"],
  [5, "sale_id", "sale id is missing"],
  [6, "product", "product is missing"],
  [7, "quantity", "quantity must be a whole number from 1 to 100"],
  [8, "quantity", "quantity must be a whole number from 1 to 100"],
  [9, "quantity", "quantity must be a whole number from 1 to 100"],
  [11, "deposit", "deposit must be a dollar amount like 15.00, from 0.00 to 1000.00"],
  [12, "deposit", "deposit must be a dollar amount like 15.00, from 0.00 to 1000.00"],
  [13, "deposit", "deposit must be a dollar amount like 15.00, from 0.00 to 1000.00"],
  [14, "line", "this line has 5 values but the first line names 6 columns"],
  [16, "line", "this line has 7 values but the first line names 6 columns"],
  [20, "quantity", "quantity must be a whole number from 1 to 100"],
  [20, "deposit", "deposit must be a dollar amount like 15.00, from 0.00 to 1000.00"],
  [21, "group_size", "group size must be at most 20 characters"],
  [22, "line", 'a quote mark is out of place: wrap a value in double quotes and double any " inside it'],
];

describe("a malformed file", () => {
  test("every bad line is reported with its line number in the file, and nothing is handed on", async () => {
    const { result, rows } = await collect(fixture("malformed.csv"), 1);
    expect(result.errors.map((e) => [e.line, e.field, e.message])).toEqual(MALFORMED_ERRORS);
    expect(result).toMatchObject({ errorCount: MALFORMED_ERRORS.length, rows: 4, isValid: false, lines: 22 });
    // Only a good line before the first error (line 3) can reach onBatch, never one after it.
    expect(rows.filter((r) => r.line > 3)).toEqual([]);
  });

  test("the same problems at the same lines however the file is cut into pieces", async () => {
    const bytes = readFileSync(path.join(FIXTURES, "malformed.csv"));
    for (const size of [1, 2, 3, 5, 8, 13, 64]) {
      const { result, rows } = await collect(inPieces(bytes, size), 1);
      expect(result.errors.map((e) => [e.line, e.field, e.message]), `pieces of ${size} bytes`).toEqual(MALFORMED_ERRORS);
      expect(result.rows).toBe(4);
      expect(rows.filter((r) => r.line > 3)).toEqual([]);
    }
  });

  test("errors kept are capped; the count goes on", async () => {
    const result = await parseSalesCsv({ stream: fixture("malformed.csv"), maxErrors: 3 });
    expect(result.errors.map((e) => e.line)).toEqual([3, 4, 5]);
    expect(result.errorCount).toBe(MALFORMED_ERRORS.length);
  });
});

describe("duplicate sale ids", () => {
  test("a sale id used twice is reported at the second line, naming the first; case counts", async () => {
    const { result } = await collect(fixture("duplicates.csv"));
    expect(result.errors).toEqual([
      { line: 4, field: "sale_id", message: "sale id D-1 is already used on line 2" },
      { line: 6, field: "quantity", message: "quantity must be a whole number from 1 to 100" },
      { line: 6, field: "sale_id", message: "sale id D-2 is already used on line 3" },
    ]);
    expect(result.rows).toBe(4); // D-1, D-2, D-3 and d-3
  });

  test("a duplicate is found even when the first use was on a line with another problem", async () => {
    const text = "date,sale_id,product,group_size,quantity,deposit\n2025-01-01,X-1,Starter,,0,15.00\n2025-01-02,X-1,Starter,,1,15.00\n";
    const result = await parseSalesCsv({ stream: fromText(text) });
    expect(result.errors.map((e) => [e.line, e.field])).toEqual([[2, "quantity"], [3, "sale_id"]]);
  });
});

describe("streaming edges", () => {
  test("a character cut between two pieces stays whole", async () => {
    const text = "date,sale_id,product,group_size,quantity,deposit\n2025-01-01,U-1,Batterie über 12 V — 60 Ah ✓,,1,15.00\n";
    const { rows } = await collect(inPieces(Buffer.from(text), 1));
    expect(rows[0]!.product).toBe("Batterie über 12 V — 60 Ah ✓");
  });

  test("an onBatch that fails makes the whole call fail (the caller rolls back)", async () => {
    const failure = new Error("database is locked");
    await expect(
      parseSalesCsv({ stream: fixture("good.csv"), batchSize: 2, onBatch: async () => Promise.reject(failure) }),
    ).rejects.toBe(failure);
  });

  test("a stream that breaks makes the call fail", async () => {
    const broken = new Readable({
      read() {
        this.push("date,sale_id,product,group_size,quantity,deposit\n2025-01-01,B-1,Starter,,1,15.00\n");
        this.destroy(new Error("connection reset"));
      },
    });
    await expect(parseSalesCsv({ stream: broken })).rejects.toThrow("connection reset");
  });

  test("a batch size out of range is refused", async () => {
    await expect(parseSalesCsv({ stream: fixture("good.csv"), batchSize: 0 })).rejects.toMatchObject({ code: "invalid_input" });
  });
});

describe("spreadsheet leftovers", () => {
  test("trailing commas after the header or a line are allowed; a value beyond the named columns is not", async () => {
    const text =
      "date,sale_id,product,group_size,quantity,deposit,,\n" +
      "2025-01-01,P-1,Starter,,1,15.00\n" +
      "2025-01-01,P-2,Starter,,1,15.00,,\n" +
      "2025-01-01,P-3,Starter,,1,15.00,,,\n" +
      "2025-01-01,P-4,Starter,,1,15.00,oops\n" +
      "2025-01-01,P-5,Starter,,1\n";
    const result = await parseSalesCsv({ stream: fromText(text) });
    expect(result.rows).toBe(3);
    expect(result.errors).toEqual([
      { line: 5, field: "line", message: "this line has 7 values but the first line names 6 columns" },
      { line: 6, field: "line", message: "this line has 5 values but the first line names 6 columns" },
    ]);
  });
});

describe("the quick check of a clean line agrees with the schema", () => {
  const clean: TSalesCsvRecord = { date: "2024-02-29", sale_id: "R-1", product: "Starter 12 V", group_size: "24F", quantity: "2", deposit: "30.00" };
  // Edge values of each column, read off ZSalesCsvRecord's own limits (project choices, no outside source).
  test.each([
    [{}],
    [{ date: "2023-02-29" }],
    [{ date: "2024-13-01" }],
    [{ date: "2024-2-1" }],
    [{ date: "" }],
    [{ sale_id: "" }],
    [{ sale_id: "x".repeat(64) }],
    [{ sale_id: "x".repeat(65) }],
    [{ product: "" }],
    [{ product: "p".repeat(200) }],
    [{ product: "p".repeat(201) }],
    [{ group_size: "" }],
    [{ group_size: "g".repeat(20) }],
    [{ group_size: "g".repeat(21) }],
    [{ quantity: "0" }],
    [{ quantity: "100" }],
    [{ quantity: "101" }],
    [{ quantity: "07" }],
    [{ deposit: "0" }],
    [{ deposit: "$1000.00" }],
    [{ deposit: "1000.01" }],
    [{ deposit: "15.005" }],
    [{ deposit: "-1.00" }],
  ] as Array<[Partial<TSalesCsvRecord>]>)("%o", (change) => {
    const record = { ...clean, ...change };
    expect(isCleanSalesRecord(record)).toBe(ZSalesCsvRecord.safeParse(record).success);
  });

  test("on generated records", () => {
    const digits = (min: number, max: number) => fc.stringMatching(new RegExp(`^[0-9]{${min},${max}}$`));
    const cell = fc.oneof(fc.string({ maxLength: 70 }), digits(1, 4));
    const record = fc.record({
      date: fc.oneof(fc.tuple(digits(4, 4), digits(1, 2), digits(1, 2)).map(([y, m, d]) => `${y}-${m}-${d}`), fc.string({ maxLength: 12 })),
      sale_id: cell,
      product: fc.string({ maxLength: 210 }),
      group_size: fc.string({ maxLength: 24 }),
      quantity: cell,
      deposit: fc.oneof(fc.tuple(fc.constantFrom("", "$"), digits(1, 5), fc.constantFrom("", ".", ".0", ".00", ".000")).map((p) => p.join("")), cell),
    });
    fc.assert(fc.property(record, (r) => isCleanSalesRecord(r) === ZSalesCsvRecord.safeParse(r).success), { numRuns: 2_000 });
  });
});
