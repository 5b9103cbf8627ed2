import "server-only";
import { eq, inArray, sql } from "drizzle-orm";
import { getDb } from "@/db";
import { authThrottle } from "@/db/schema";

// Failed sign-in throttling, kept in the auth_throttle table so it holds across
// app instances. Two keys per attempt: the e-mail (`email:<address>`, whether
// or not an account exists) and the client address (`ip:<address>`). A key
// that collects LIMIT failures within WINDOW is locked for LOCK.

export const THROTTLE = {
  email: { limit: 5, windowMs: 15 * 60_000, lockMs: 15 * 60_000 },
  ip: { limit: 30, windowMs: 15 * 60_000, lockMs: 15 * 60_000 },
} as const;

export type ThrottleKeys = { email: string; ip: string };

export function throttleKeys(email: string, ip: string): ThrottleKeys {
  return { email: `email:${email.trim().toLowerCase()}`, ip: `ip:${ip}` };
}

/** Seconds until the first of the keys unlocks, or 0 if none is locked. */
export async function lockedForSeconds(keys: ThrottleKeys, now = Date.now()): Promise<number> {
  const rows = await getDb()
    .select()
    .from(authThrottle)
    .where(inArray(authThrottle.key, [keys.email, keys.ip]))
    .all();
  let wait = 0;
  for (const r of rows) {
    const until = r.lockedUntil?.getTime() ?? 0;
    if (until > now) wait = Math.max(wait, Math.ceil((until - now) / 1000));
  }
  return wait;
}

/** Count one failure against both keys (one upsert each). */
export async function recordFailure(keys: ThrottleKeys, now = Date.now()): Promise<void> {
  const db = getDb();
  for (const [kind, key] of [["email", keys.email], ["ip", keys.ip]] as const) {
    const { limit, windowMs, lockMs } = THROTTLE[kind];
    const windowStartFloor = now - windowMs;
    // Start a new window when the old one ran out; lock when the count reaches the limit.
    await db.run(sql`
      INSERT INTO auth_throttle (key, failures, window_start, locked_until)
      VALUES (${key}, 1, ${now}, ${limit <= 1 ? now + lockMs : null})
      ON CONFLICT(key) DO UPDATE SET
        failures = CASE WHEN auth_throttle.window_start < ${windowStartFloor} THEN 1 ELSE auth_throttle.failures + 1 END,
        window_start = CASE WHEN auth_throttle.window_start < ${windowStartFloor} THEN ${now} ELSE auth_throttle.window_start END,
        locked_until = CASE
          WHEN auth_throttle.window_start >= ${windowStartFloor} AND auth_throttle.failures + 1 >= ${limit} THEN ${now + lockMs}
          ELSE auth_throttle.locked_until END
    `);
  }
}

/** A successful sign-in clears the e-mail key (the address key keeps counting). */
export async function clearFailures(keys: ThrottleKeys): Promise<void> {
  await getDb().delete(authThrottle).where(eq(authThrottle.key, keys.email));
}
