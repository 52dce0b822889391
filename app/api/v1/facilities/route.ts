import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZFacilityCreate, createFacility, listFacilities } from "@/lib/db/facilities";

/** Receiving facilities of the organisation (secondary lead smelters and the like), by name. */
export const GET = withActor(async ({ actor }) => Response.json({ facilities: await listFacilities(actor) }));

export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZFacilityCreate, await readJson(request));
  return Response.json({ facility: await createFacility(actor, input) }, { status: 201 });
});
