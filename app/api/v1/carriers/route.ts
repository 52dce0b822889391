import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZCarrierCreate, createCarrier, listCarriers } from "@/lib/db/facilities";

/** Carriers of the organisation, by name. */
export const GET = withActor(async ({ actor }) => Response.json({ carriers: await listCarriers(actor) }));

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZCarrierCreate, await readJson(request));
  return Response.json({ carrier: await createCarrier(actor, input) }, { status: 201 });
});
