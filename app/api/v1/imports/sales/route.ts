import { withActor, parse, queryOf, toErrorResponse } from "@/lib/http/handle";
import { assertCanImportSales, importSales, ZSalesImportQuery, type TImportProgress, type TSalesImportResult } from "@/lib/db/sales-import";
import { AppError } from "@/lib/errors";

const NDJSON = "application/x-ndjson";

/**
 * The same-origin rule of proxy.ts, kept here too: this route should be left out of the proxy's matcher,
 * because Next buffers (and past 10 MB cuts) the body of every request the proxy sees.
 */
function assertSameOrigin(request: Request): void {
  if (!request.headers.get("cookie")) return;
  const origin = request.headers.get("origin");
  const host = request.headers.get("host");
  if (origin && host && new URL(origin).host === host) return;
  throw new AppError("forbidden", "This request did not come from a Leadger page (Origin missing or foreign).");
}

function outcome(result: TSalesImportResult): { status: number; body: unknown } {
  if (result.errorCount > 0) {
    const lines = result.errorCount === 1 ? "1 problem" : `${result.errorCount} problems`;
    return {
      status: 400,
      body: { error: { code: "invalid_input", message: `The file has ${lines}; nothing was imported.`, issues: result.errors }, result },
    };
  }
  return { status: result.isImported ? 201 : 200, body: result };
}

/**
 * `POST /api/v1/imports/sales?site=…[&preview=1]`, the CSV file as the body. With `Accept:
 * application/x-ndjson` the answer streams one JSON line per few thousand rows (`{ type: "progress" }`)
 * and ends with `{ type: "result", status, body }`; otherwise one JSON answer at the end.
 */
export const POST = withActor(async ({ actor, request }) => {
  assertSameOrigin(request);
  const q = parse(ZSalesImportQuery, queryOf(request));
  if (!request.body) throw new AppError("invalid_input", "Send the sales file as the request body.", [{ field: "(body)", message: "the body is empty" }]);
  const length = request.headers.get("content-length");
  const expectedBytes = length && /^\d+$/.test(length) ? Number(length) : undefined;
  const args = { siteId: q.site, stream: request.body, isPreview: q.preview, expectedBytes };

  if (!(request.headers.get("accept") ?? "").includes(NDJSON)) {
    const { status, body } = outcome(await importSales(actor, args));
    return Response.json(body, { status });
  }

  await assertCanImportSales(actor, q.site);
  const encoder = new TextEncoder();
  const stream = new ReadableStream<Uint8Array>({
    async start(controller) {
      const send = (line: unknown) => controller.enqueue(encoder.encode(JSON.stringify(line) + "\n"));
      try {
        const result = await importSales(actor, { ...args, onProgress: (p: TImportProgress) => send({ type: "progress", ...p }) });
        send({ type: "result", ...outcome(result) });
      } catch (error) {
        const response = toErrorResponse(error);
        send({ type: "result", status: response.status, body: await response.json() });
      }
      controller.close();
    },
  });
  return new Response(stream, { headers: { "content-type": `${NDJSON}; charset=utf-8`, "cache-control": "no-store" } });
});
