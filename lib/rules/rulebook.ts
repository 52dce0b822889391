import { z } from "zod";
import { ZRule } from "./rule";

export const ZWasteCode = z.object({ code: z.string().min(1), title: z.string().min(1), citation: z.string().min(1) });
export type TWasteCode = z.output<typeof ZWasteCode>;

/** A versioned set of rules for a jurisdiction, with the wording its container labels carry. */
export const ZRulebook = z.object({
  id: z.string().min(1),
  title: z.string().min(1),
  /** Year and edition, e.g. "2026.1": printed on every paper made with the rulebook. */
  version: z.string().regex(/^\d{4}\.\d+$/),
  jurisdiction: z.string().min(1),
  labelWording: z.string().min(1),
  labelCitation: z.string().min(1),
  wasteCodes: z.array(ZWasteCode),
  rules: z.array(ZRule),
});
export type TRulebook = z.output<typeof ZRulebook>;
