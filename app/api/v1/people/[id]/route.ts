import { withActor, parse, readJson } from "@/lib/http/handle";
import { getPerson, updatePerson, ZPersonPatch } from "@/lib/db/people";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json({ person: await getPerson(actor, id) });
});

/** `{ name }` renames; `{ password }` sets a new temporary password and ends the person's sessions. */
export const PATCH = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const patch = parse(ZPersonPatch, await readJson(request));
  return Response.json({ person: await updatePerson(actor, id, patch) });
});
