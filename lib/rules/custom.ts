import type { TRulebook } from "./rulebook";

/** No rules of its own: the site's rules (ZCustomRule) are all that apply. */
export const custom: TRulebook = {
  id: "custom",
  title: "Site rules only",
  version: "2026.1",
  jurisdiction: "any",
  labelWording: "Spent lead-acid batteries",
  labelCitation: "Project wording — use the wording your authority requires",
  wasteCodes: [],
  rules: [],
};
