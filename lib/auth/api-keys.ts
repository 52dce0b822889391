import { createHash, randomBytes } from "node:crypto";

/** API keys are 32 random bytes; a fast hash suffices for such high-entropy secrets (no salt or stretching needed). */
export function newApiKey(): { key: string; prefix: string; hash: string } {
  const key = `ldg_${randomBytes(32).toString("base64url")}`;
  return { key, prefix: key.slice(0, 12), hash: hashApiKey(key) };
}

export const hashApiKey = (key: string): string => createHash("sha256").update(key, "utf8").digest("hex");
