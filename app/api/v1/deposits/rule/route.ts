import { withActor, parse, readJson } from "@/lib/http/handle";
import { setDepositRule, ZDepositRuleChoice } from "@/lib/db/deposits";
import { listDepositRules } from "@/lib/deposits/rules";
import { GENERAL_CAUTION } from "@/lib/cautions";

/** The built-in deposit rules, each with its citation. */
export const GET = withActor(async () => Response.json({ rules: listDepositRules(), caution: GENERAL_CAUTION }));

/** Chooses a store's rule: a built-in id, a custom rule, or null for its jurisdiction's. */
export const PUT = withActor(async ({ actor, request }) => {
  const input = parse(ZDepositRuleChoice, await readJson(request));
  return Response.json(await setDepositRule(actor, input));
});
