/**
 * Reads a point-of-sale export of battery sales lines, streaming, and checks every line.
 *
 * The file: comma-separated, UTF-8 (a byte-order mark is fine), first line the column names, one sales
 * line per row. Columns (any order; the spellings in HEADER_ALIASES are accepted too):
 *
 *   date,sale_id,product,group_size,quantity,deposit
 *   2025-03-01,R-1001,Starter 12 V 60 Ah,24F,2,30.00
 *
 * `deposit` is the whole deposit taken on the line, in dollars (0.00 when a used battery was handed in);
 * `group_size` may be left out or blank. Each sale id may appear once in a file.
 *
 * All-or-nothing import — what the caller must do. `onBatch` gets only valid rows, in file order, and is
 * never called again once any error has been found; every line is still checked so all problems are
 * reported. Import only when the result has `isValid`. Either:
 *  1. two passes: a first call without `onBatch` (the preview: counts and errors only), then, when it is
 *     valid and the clerk confirms, a second call over the same bytes whose `onBatch` inserts. A request
 *     body can be read once, so keep the upload in a temporary file between the passes; or
 *  2. one pass inside one database transaction: `onBatch` inserts each batch, and the caller commits only
 *     when the result `isValid`, rolling back otherwise — and also when the call rejects (a failed read
 *     or an `onBatch` that threw).
 * Either way the database must refuse sale ids it already holds (unique site + sale id); each row keeps
 * its `line` so such a clash can be reported against the file.
 */
import { pipeline, Readable, Transform } from "node:stream";
import type { ReadableStream as NodeWebReadableStream } from "node:stream/web";
import Papa from "papaparse";
import { z } from "zod";
import type { TFieldIssue } from "@/lib/errors";
import { AppError } from "@/lib/errors";
import { isCalendarDay, type TCalendarDay } from "@/lib/deposits/calendar-day";
import { dollarsToCents } from "@/lib/deposits/cents";

export const SALES_CSV_COLUMNS = ["date", "sale_id", "product", "group_size", "quantity", "deposit"] as const;
export type TSalesCsvColumn = (typeof SALES_CSV_COLUMNS)[number];
const REQUIRED_COLUMNS: readonly TSalesCsvColumn[] = ["date", "sale_id", "product", "quantity", "deposit"];

/** Header spellings accepted, after normalising (lower case, runs of other characters to "_", "#" to "no"). */
export const HEADER_ALIASES: Readonly<Record<string, TSalesCsvColumn>> = Object.freeze({
  date: "date",
  sale_date: "date",
  sold_on: "date",
  date_sold: "date",
  sale_id: "sale_id",
  saleid: "sale_id",
  sale_no: "sale_id",
  sale_number: "sale_id",
  sale_ref: "sale_id",
  receipt: "sale_id",
  receipt_no: "sale_id",
  receipt_number: "sale_id",
  invoice: "sale_id",
  invoice_no: "sale_id",
  invoice_number: "sale_id",
  ticket_no: "sale_id",
  product: "product",
  item: "product",
  product_name: "product",
  description: "product",
  group_size: "group_size",
  group: "group_size",
  bci_group: "group_size",
  battery_group: "group_size",
  quantity: "quantity",
  qty: "quantity",
  count: "quantity",
  deposit: "deposit",
  deposit_charged: "deposit",
  deposit_usd: "deposit",
  core_charge: "deposit",
  core_deposit: "deposit",
});

export function normaliseHeader(name: string): string {
  return name
    .replace(/^\uFEFF/, "")
    .toLowerCase()
    .replaceAll("#", " no ")
    .replace(/[^a-z0-9]+/g, "_")
    .replace(/^_+|_+$/g, "");
}

const DATE_TEXT = /^\d{4}-\d{2}-\d{2}$/;
const QUANTITY_TEXT = /^(?:100|[1-9]\d?)$/;
// project choice: 0.00 to 1000.00 dollars a line, optional "$", at most two decimals
const DEPOSIT_TEXT = /^\$?(?:1000(?:\.0{1,2})?|\d{1,3}(?:\.\d{1,2})?)$/;
const MAX = { saleId: 64, product: 200, groupSize: 20 } as const;

/**
 * One sales line as text (trimmed cells by canonical column), with the messages a clerk sees. Every
 * check is a pattern so the row check stays cheap at 100 000 rows (a zod transform per cell cost about
 * four times as much); `saleLineFromText` then types the checked text.
 */
export const ZSalesCsvRecord = z.object({
  date: z
    .string()
    .regex(DATE_TEXT, { error: "date must be YYYY-MM-DD", abort: true })
    .refine(isCalendarDay, { error: (issue) => `date ${String(issue.input)} is not a real calendar date` }),
  sale_id: z.string().min(1, { error: "sale id is missing" }).max(MAX.saleId, { error: `sale id must be at most ${MAX.saleId} characters` }),
  product: z.string().min(1, { error: "product is missing" }).max(MAX.product, { error: `product must be at most ${MAX.product} characters` }),
  group_size: z.string().max(MAX.groupSize, { error: `group size must be at most ${MAX.groupSize} characters` }),
  quantity: z.string().regex(QUANTITY_TEXT, { error: "quantity must be a whole number from 1 to 100" }),
  deposit: z.string().regex(DEPOSIT_TEXT, { error: "deposit must be a dollar amount like 15.00, from 0.00 to 1000.00" }),
});

/**
 * The same checks as ZSalesCsvRecord, without words: true exactly when the schema accepts the record. A clean
 * line, the common case, skips zod (a third of the parser's time at 100 000 lines); a line that fails is
 * checked again by the schema for its messages.
 */
export function isCleanSalesRecord(r: TSalesCsvRecord): boolean {
  return (
    DATE_TEXT.test(r.date) &&
    isCalendarDay(r.date) &&
    r.sale_id.length >= 1 &&
    r.sale_id.length <= MAX.saleId &&
    r.product.length >= 1 &&
    r.product.length <= MAX.product &&
    r.group_size.length <= MAX.groupSize &&
    QUANTITY_TEXT.test(r.quantity) &&
    DEPOSIT_TEXT.test(r.deposit)
  );
}
export type TSalesCsvRecord = z.infer<typeof ZSalesCsvRecord>;

/** A valid sales line; `line` is its line number in the file (the header is line 1). */
export type TSaleLine = {
  line: number;
  soldOn: TCalendarDay;
  saleRef: string;
  product: string;
  groupSize: string;
  quantity: number;
  /** The whole deposit taken on the line, in cents. */
  depositCents: number;
};

/** Types a record that passed ZSalesCsvRecord. */
export function saleLineFromText(record: TSalesCsvRecord, line: number): TSaleLine {
  return {
    line,
    soldOn: record.date,
    saleRef: record.sale_id,
    product: record.product,
    groupSize: record.group_size,
    quantity: Number(record.quantity),
    depositCents: dollarsToCents(record.deposit)!,
  };
}

export type TImportIssue = TFieldIssue & { line: number };

export type TParseSalesCsvInput = {
  stream: NodeJS.ReadableStream | ReadableStream<Uint8Array>;
  /** Receives valid rows in batches; the parser is paused until the promise settles. */
  onBatch?: (rows: TSaleLine[]) => Promise<void> | void;
  batchSize?: number;
  /** Bytes read and data rows read so far; called after each piece of the file. */
  onProgress?: (bytes: number, rows: number) => void;
  /** Problems kept in `errors`; `errorCount` keeps counting past it. Default 1 000. */
  maxErrors?: number;
};

export type TParseSalesCsvResult = {
  /** Valid sales lines. */
  rows: number;
  /** Rows handed to `onBatch`. */
  rowsDelivered: number;
  /** In file order, at most `maxErrors`. */
  errors: TImportIssue[];
  errorCount: number;
  /** No errors and at least one sales line: safe to import. */
  isValid: boolean;
  /** Number of the last line with content. */
  lines: number;
  bytes: number;
  /** How each column is spelt in the file's header. */
  columns: Partial<Record<TSalesCsvColumn, string>>;
  /** Header names that are not ours and were skipped. */
  ignoredColumns: string[];
};

const LF = 0x0a;
const FIRST_CHUNK_MAX_BYTES = 64 * 1024;

function toNodeReadable(stream: TParseSalesCsvInput["stream"]): NodeJS.ReadableStream {
  if (typeof (stream as ReadableStream).getReader === "function") {
    return Readable.fromWeb(stream as unknown as NodeWebReadableStream<Uint8Array>);
  }
  return stream as NodeJS.ReadableStream;
}

/**
 * Counts bytes and holds back the start of the file until its first line is complete: papaparse guesses
 * the line ending from its first piece, and a piece cut before the first "\n" makes it guess wrong.
 */
function byteCounter(): Transform & { bytes: number } {
  let head: Buffer[] | null = [];
  let headBytes = 0;
  const counter = new Transform({
    transform(chunk: Buffer | string, _encoding, done) {
      const buffer = typeof chunk === "string" ? Buffer.from(chunk) : chunk;
      counter.bytes += buffer.length;
      if (head === null) return done(null, buffer);
      head.push(buffer);
      headBytes += buffer.length;
      if (buffer.includes(LF) || headBytes >= FIRST_CHUNK_MAX_BYTES) {
        const all = Buffer.concat(head);
        head = null;
        return done(null, all);
      }
      done();
    },
    flush(done) {
      if (head !== null && headBytes > 0) this.push(Buffer.concat(head));
      head = null;
      done();
    },
  }) as Transform & { bytes: number };
  counter.bytes = 0;
  // Text for papaparse, decoded by Node so a character split across two pieces stays whole.
  counter.setEncoding("utf8");
  return counter;
}

function countLineBreaks(row: readonly string[], linebreak: string): number {
  let count = 0;
  const mark = linebreak === "\r" ? "\r" : "\n";
  for (const cell of row) for (let i = cell.indexOf(mark); i !== -1; i = cell.indexOf(mark, i + 1)) count++;
  return count;
}

const columnList = SALES_CSV_COLUMNS.join(", ");

/**
 * Streams a sales CSV through papaparse, typing and checking each cell itself (no dynamic typing), and
 * reports each problem with its line number. Never holds more of the file than the parser's current
 * piece, one batch of rows and the set of sale ids seen (for duplicates).
 */
export async function parseSalesCsv(input: TParseSalesCsvInput): Promise<TParseSalesCsvResult> {
  const { onBatch, onProgress, batchSize = 1_000, maxErrors = 1_000 } = input;
  if (!Number.isInteger(batchSize) || batchSize < 1 || batchSize > 100_000) {
    throw new AppError("invalid_input", "The batch size is not valid.", [
      { field: "batchSize", message: "batch size must be a whole number from 1 to 100000" },
    ]);
  }
  const source = toNodeReadable(input.stream);
  const counter = byteCounter();

  const errors: TImportIssue[] = [];
  let errorCount = 0;
  const addError = (line: number, field: string, message: string) => {
    errorCount++;
    if (errors.length < maxErrors) errors.push({ line, field, message });
  };

  /** Cell position of each of SALES_CSV_COLUMNS, -1 when absent; null until the header is read. */
  let cellIndex: number[] | null = null;
  const columns: Partial<Record<TSalesCsvColumn, string>> = {};
  const ignoredColumns: string[] = [];
  // Cells a line must have: the header's, less blank names at its end; more are fine only when blank
  // (a spreadsheet's trailing commas).
  let minWidth = 0;
  let isHeaderBroken = false;

  let nextLine = 1;
  let lastLine = 0;
  let rowsRead = 0;
  let rowsValid = 0;
  let rowsDelivered = 0;
  let pending: TSaleLine[] = [];
  const lineOfSaleRef = new Map<string, number>();

  const readHeader = (row: string[], line: number): void => {
    const at = SALES_CSV_COLUMNS.map(() => -1);
    row.forEach((raw, i) => {
      const name = raw.trim().replace(/^\uFEFF/, "");
      if (name === "") return;
      minWidth = i + 1;
      const column = HEADER_ALIASES[normaliseHeader(name)];
      if (!column) return void ignoredColumns.push(name);
      const k = SALES_CSV_COLUMNS.indexOf(column);
      if (at[k] !== -1) {
        isHeaderBroken = true;
        addError(line, "header", `two columns both mean ${column}: "${columns[column]}" and "${name}"; keep one`);
        return;
      }
      at[k] = i;
      columns[column] = name;
    });
    cellIndex = at;
    const missing = REQUIRED_COLUMNS.filter((c) => at[SALES_CSV_COLUMNS.indexOf(c)] === -1);
    if (missing.length > 0) {
      isHeaderBroken = true;
      addError(line, "header", `the first line must name the columns (${columnList}); missing: ${missing.join(", ")}`);
    }
  };

  const readRow = (row: string[], line: number, hasQuoteError: boolean): void => {
    rowsRead++;
    if (hasQuoteError) {
      addError(line, "line", 'a quote mark is out of place: wrap a value in double quotes and double any " inside it');
      return;
    }
    const isWidthOk = row.length === minWidth || (row.length > minWidth && row.slice(minWidth).every((c) => c.trim() === ""));
    if (!isWidthOk) {
      addError(line, "line", `this line has ${row.length} values but the first line names ${minWidth} columns`);
      return;
    }
    const at = cellIndex!;
    const record: TSalesCsvRecord = {
      date: row[at[0]]!.trim(),
      sale_id: row[at[1]]!.trim(),
      product: row[at[2]]!.trim(),
      group_size: at[3] < 0 ? "" : row[at[3]]!.trim(),
      quantity: row[at[4]]!.trim(),
      deposit: row[at[5]]!.trim(),
    };
    const issues = isCleanSalesRecord(record) ? null : (ZSalesCsvRecord.safeParse(record).error?.issues ?? null);
    if (issues) for (const issue of issues) addError(line, String(issue.path[0] ?? "line"), issue.message);
    // Every sale id counts for duplicates, even on a line with other problems.
    let isDuplicate = false;
    if (record.sale_id !== "") {
      const firstLine = lineOfSaleRef.get(record.sale_id);
      isDuplicate = firstLine !== undefined;
      if (isDuplicate) addError(line, "sale_id", `sale id ${record.sale_id} is already used on line ${firstLine}`);
      else lineOfSaleRef.set(record.sale_id, line);
    }
    if (issues || isDuplicate) return;
    rowsValid++;
    if (onBatch && errorCount === 0) pending.push(saleLineFromText(record, line));
  };

  const deliver = async (rows: TSaleLine[]): Promise<void> => {
    if (!onBatch || errorCount > 0 || rows.length === 0) return;
    await onBatch(rows);
    rowsDelivered += rows.length;
  };

  const deliverFullBatches = async (): Promise<void> => {
    while (pending.length >= batchSize && errorCount === 0) await deliver(pending.splice(0, batchSize));
  };

  return new Promise<TParseSalesCsvResult>((resolve, reject) => {
    let isSettled = false;
    const fail = (error: unknown) => {
      if (isSettled) return;
      isSettled = true;
      counter.destroy();
      reject(error);
    };
    const succeed = () => {
      if (isSettled) return;
      isSettled = true;
      resolve({
        rows: rowsValid,
        rowsDelivered,
        errors,
        errorCount,
        isValid: errorCount === 0 && rowsValid > 0,
        lines: lastLine,
        bytes: counter.bytes,
        columns,
        ignoredColumns,
      });
    };

    pipeline(source, counter, (error) => {
      if (error) fail(error);
    });

    Papa.parse<string[]>(counter as unknown as File, {
      header: false,
      dynamicTyping: false,
      delimiter: ",",
      skipEmptyLines: false,
      chunk(results, parser) {
        if (isSettled) return;
        const data = results.data;
        // A quote problem in the unfinished last row is reported again with the next piece: keep only rows of this piece.
        const quoteErrorRows = new Set(results.errors.filter((e) => e.row !== undefined && e.row < data.length).map((e) => e.row));
        for (let i = 0; i < data.length; i++) {
          const row = data[i]!;
          const line = nextLine;
          nextLine += 1 + countLineBreaks(row, results.meta.linebreak);
          if (row.length === 1 && row[0]!.trim() === "") continue; // blank line
          lastLine = line;
          if (cellIndex === null) {
            readHeader(row, line);
            if (isHeaderBroken) {
              parser.abort();
              return;
            }
          } else {
            readRow(row, line, quoteErrorRows.has(i));
          }
        }
        if (errorCount > 0) pending = [];
        onProgress?.(counter.bytes, rowsRead);
        if (pending.length >= batchSize) {
          parser.pause();
          counter.pause();
          deliverFullBatches().then(() => {
            if (isSettled) return;
            parser.resume();
            counter.resume();
          }, fail);
        }
      },
      complete() {
        if (isSettled) return;
        if (isHeaderBroken) {
          // Nothing past the header can be read: stop reading the rest of the file.
          counter.destroy();
          return succeed();
        }
        if (cellIndex === null) addError(1, "header", `the file is empty; the first line must name the columns (${columnList})`);
        else if (rowsRead === 0) addError(2, "line", "the file has no sales lines after the first line");
        deliver(pending.splice(0)).then(() => {
          onProgress?.(counter.bytes, rowsRead);
          succeed();
        }, fail);
      },
      error(error: Error) {
        fail(error);
      },
    });
  });
}
