import { withActor, parse, readJson, queryOf } from "@/lib/http/handle";
import { addPerson, listPeople, ZPeopleQuery, ZPersonCreate } from "@/lib/db/people";

export const GET = withActor(async ({ actor, request }) => {
  const q = parse(ZPeopleQuery, queryOf(request));
  return Response.json({ people: await listPeople(actor, { siteId: q.site }) });
});

/** Adds a person with a temporary password and a role at one or more sites. */
export const POST = withActor(async ({ actor, request }) => {
  const input = parse(ZPersonCreate, await readJson(request));
  return Response.json({ person: await addPerson(actor, input) }, { status: 201 });
});
