import type { TDb } from "@/lib/db/client";

/**
 * Sign-in attempts per account and per client address, counted in the database so the limit holds across
 * app instances. A try is counted before it is checked (so parallel guesses cannot slip past) and given
 * back when it succeeds, so only failed tries use up the allowance.
 */
export const SIGN_IN_LIMIT = {
  max: Number(process.env.LEADGER_SIGNIN_MAX ?? 10),
  windowMs: Number(process.env.LEADGER_SIGNIN_WINDOW_S ?? 900) * 1000,
};

export const signInKeys = ({ email, ip }: { email: string; ip: string }) => [
  `signin:account:${email.trim().toLowerCase()}`,
  `signin:address:${ip}`,
];

/** Takes one try from each key; returns the seconds to wait when any key is used up (nothing is taken then). */
export async function takeSignInTry(db: TDb, keys: string[], now = Date.now()): Promise<{ isAllowed: boolean; retryAfterS: number }> {
  const taken: string[] = [];
  for (const key of keys) {
    const result = await takeOne(db, key, now);
    if (!result.isAllowed) {
      if (taken.length) await giveBackSignInTry(db, taken);
      return result;
    }
    taken.push(key);
  }
  return { isAllowed: true, retryAfterS: 0 };
}

export async function giveBackSignInTry(db: TDb, keys: string[]): Promise<void> {
  await db.rateLimit.updateMany({ where: { key: { in: keys }, count: { gt: 0 } }, data: { count: { decrement: 1 } } });
}

async function takeOne(db: TDb, key: string, now: number, attempt = 0): Promise<{ isAllowed: boolean; retryAfterS: number }> {
  const windowStart = BigInt(now - SIGN_IN_LIMIT.windowMs);
  // Each step is a single conditional statement, so two instances racing on one key cannot both win it.
  const inWindow = await db.rateLimit.updateMany({
    where: { key, lastRequest: { gt: windowStart }, count: { lt: SIGN_IN_LIMIT.max } },
    data: { count: { increment: 1 } },
  });
  if (inWindow.count === 1) return { isAllowed: true, retryAfterS: 0 };
  const restarted = await db.rateLimit.updateMany({
    where: { key, lastRequest: { lte: windowStart } },
    data: { count: 1, lastRequest: BigInt(now) },
  });
  if (restarted.count === 1) return { isAllowed: true, retryAfterS: 0 };
  const row = await db.rateLimit.findUnique({ where: { key } });
  if (row) {
    const retryAfterS = Math.max(1, Math.ceil((Number(row.lastRequest) + SIGN_IN_LIMIT.windowMs - now) / 1000));
    return { isAllowed: false, retryAfterS };
  }
  try {
    await db.rateLimit.create({ data: { id: key, key, count: 1, lastRequest: BigInt(now) } });
    return { isAllowed: true, retryAfterS: 0 };
  } catch (error) {
    if (attempt < 2) return takeOne(db, key, now, attempt + 1);
    throw error;
  }
}
