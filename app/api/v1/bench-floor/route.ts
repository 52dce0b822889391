import { rawIntake } from "@/lib/bench/raw-intake-db";

/**
 * The framework floor for `npm run bench:intake`: the same build, a bare handler doing only the raw insert
 * and total update. It exists only while the benchmark sets LEADGER_BENCH_FLOOR=1; otherwise it is a 404.
 */
export async function POST(request: Request): Promise<Response> {
  if (process.env.LEADGER_BENCH_FLOOR !== "1") return new Response("Not found", { status: 404 });
  const siteId = new URL(request.url).searchParams.get("site") ?? "";
  await rawIntake(siteId);
  return Response.json({ ok: true }, { status: 201 });
}
