import { withActor, parse, queryOf, toErrorResponse } from "@/lib/http/handle";
import { assertCanImportSales, importSales, ZSalesImportQuery, type TImportProgress, type TSalesImportResult } from "@/lib/db/sales-import";
import { AppError } from "@/lib/errors";
import { FOREIGN_ORIGIN_MESSAGE, isAllowedOrigin } from "@/lib/http/same-origin";

const NDJSON = "application/x-ndjson";

/** This route is left out of proxy.ts (it streams its body), so it applies the same CSRF rule itself. */
function assertSameOrigin(request: Request): void {
  if (!isAllowedOrigin(request)) throw new AppError("forbidden", FOREIGN_ORIGIN_MESSAGE);
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
