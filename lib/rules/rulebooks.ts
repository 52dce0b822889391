import { AppError } from "@/lib/errors";
import { custom } from "./custom";
import { euAdr } from "./eu-adr";
import type { TRulebook } from "./rulebook";
import { usFederal } from "./us-federal";

// Shared constants: frozen so that no caller can change a threshold for everyone.
function deepFreeze<T>(value: T): T {
  if (value && typeof value === "object" && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const inner of Object.values(value)) deepFreeze(inner);
  }
  return value;
}

const RULEBOOKS: readonly TRulebook[] = deepFreeze([usFederal, euAdr, custom]);

export const RULEBOOK_IDS = ["us-federal", "eu-adr", "custom"] as const;
export type TRulebookId = (typeof RULEBOOK_IDS)[number];

export const listRulebooks = (): readonly TRulebook[] => RULEBOOKS;

export function getRulebook(id: string): TRulebook {
  const rulebook = RULEBOOKS.find((r) => r.id === id);
  if (!rulebook) throw new AppError("not_found", `No rulebook "${id}". Known: ${RULEBOOK_IDS.join(", ")}.`);
  return rulebook;
}
