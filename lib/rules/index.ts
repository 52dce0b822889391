export { CAUTION, LEAK_HANDLING } from "./caution";
export * from "./rule";
export { ZRulebook, ZWasteCode, type TRulebook, type TWasteCode } from "./rulebook";
export { getRulebook, listRulebooks, RULEBOOK_IDS, type TRulebookId } from "./rulebooks";
export { TIER_TWO_ACID_THRESHOLD_LB, TIER_TWO_LEAD_THRESHOLD_LB } from "./us-federal";
