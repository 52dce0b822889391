import { withActor, parse, readJson } from "@/lib/http/handle";
import { ZCustomRule } from "@/lib/rules/rule";
import { addCustomRule, listCustomRules } from "@/lib/db/limits";

type TParams = { params: Promise<{ id: string }> };

export const GET = withActor(async ({ actor }, { params }: TParams) => {
  const { id } = await params;
  return Response.json({ rules: await listCustomRules(actor, id) });
});

export const POST = withActor(async ({ actor, request }, { params }: TParams) => {
  const { id } = await params;
  const input = parse(ZCustomRule, await readJson(request));
  return Response.json({ rule: await addCustomRule(actor, id, input) }, { status: 201 });
});
