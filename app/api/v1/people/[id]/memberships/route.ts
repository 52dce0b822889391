import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { removeMembership, setMembership, ZMembership, ZPeopleQuery } from "@/lib/db/people";
import { AppError } from "@/lib/errors";

type TParams = { params: Promise<{ id: string }> };

/** `{ site, role }`: gives the person that role at the site, or changes it. */
export const PUT = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const input = parse(ZMembership, await readJson(request));
  return Response.json({ person: await setMembership(actor, id, input) });
});

/** `?site=<id>`: takes the person's role at that site away. */
export const DELETE = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const { site } = parse(ZPeopleQuery, queryOf(request));
  if (!site) throw new AppError("invalid_input", "Some fields need fixing.", [{ field: "site", message: "site is required" }]);
  return Response.json({ person: await removeMembership(actor, id, site) });
});
