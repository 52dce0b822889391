import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import path from "node:path";

/** Where the signing secret lives when BETTER_AUTH_SECRET is not set: generated on first run, never committed. */
export const SECRET_FILE = path.resolve(process.env.LEADGER_DATA_DIR ?? "data", "auth-secret");

export function authSecret(): string {
  const fromEnv = process.env.BETTER_AUTH_SECRET;
  if (fromEnv) return fromEnv;
  if (existsSync(SECRET_FILE)) return readFileSync(SECRET_FILE, "utf8").trim();
  mkdirSync(path.dirname(SECRET_FILE), { recursive: true });
  const secret = randomBytes(32).toString("base64url");
  writeFileSync(SECRET_FILE, secret + "\n", { mode: 0o600, flag: "wx" });
  return secret;
}
