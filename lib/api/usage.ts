import "server-only";
import { and, eq, gte, inArray, lte } from "drizzle-orm";
import { getClient, getDb } from "@/db";
import { apiUsage } from "@/db/schema";
import { env } from "@/lib/env";
import { utcDay } from "./quota";

// Usage counting for the public API: one row per subject and UTC day in
// api_usage (`anon:<address>`, `user:<id>`, `org:<id>`, `lookups:<subject>`,
// `key:<id>`).
//
// Why in memory first: a write transaction on the embedded database costs
// ~4 ms (it waits for the disk), and it blocks the event loop, so writing
// every request through would cap the API at a few hundred requests a
// second. Instead each process keeps the counts it has read (`base`) and the
// units it has granted since its last write (`pending`), and writes all
// pending units in one transaction every API_USAGE_FLUSH_MS (default 500 ms)
// with `count = count + pending … RETURNING count`, which also refreshes
// `base` with what other app instances counted meanwhile. A counter that has
// not been refreshed for a flush interval is read again before it decides.
//
// What this gives up: with several app instances, each decides on a view at
// most one interval old, so a caller can overshoot a quota by what the
// other instances granted in that interval; a crash loses at most one
// interval's counts. API_USAGE_FLUSH_MS=0 writes every request through.

export type Charge = {
  /** api_usage.subject. */
  subject: string;
  /** Units to add (≥ 0). */
  cost: number;
  /** The most this subject may count today; null = count without a cap. */
  limit: number | null;
};

export type ConsumeResult = {
  /** True when every charge fitted and all were counted; false = nothing was counted. */
  ok: boolean;
  /** Count of each charge's subject today, after this request when ok. */
  used: number[];
  /** Indexes of the charges that did not fit. */
  refused: number[];
};

type Counter = { subject: string; day: string; base: number; pending: number; readAt: number; loading: Promise<void> | null };

type State = {
  counters: Map<string, Counter>;
  lastUsed: Map<string, number>;
  timer: ReturnType<typeof setTimeout> | null;
  flushing: Promise<void> | null;
};

const globalForUsage = globalThis as unknown as { __rainprintApiUsage?: State };

function state(): State {
  return (globalForUsage.__rainprintApiUsage ??= { counters: new Map(), lastUsed: new Map(), timer: null, flushing: null });
}

function flushMs(): number {
  return env().API_USAGE_FLUSH_MS;
}

/** Forget in-memory counts without writing them (tests only). */
export function resetUsageMemory(): void {
  const s = state();
  if (s.timer) clearTimeout(s.timer);
  globalForUsage.__rainprintApiUsage = undefined;
}

async function counterFor(subject: string, day: string, nowMs: number): Promise<Counter> {
  const s = state();
  const id = `${day}|${subject}`;
  let c = s.counters.get(id);
  if (!c) {
    c = { subject, day, base: 0, pending: 0, readAt: -Infinity, loading: null };
    s.counters.set(id, c);
  }
  const stale = c.pending === 0 && nowMs - c.readAt >= flushMs();
  if (stale && !c.loading) {
    const counter = c;
    counter.loading = (async () => {
      const row = await getDb()
        .select({ count: apiUsage.count })
        .from(apiUsage)
        .where(and(eq(apiUsage.subject, subject), eq(apiUsage.day, day)))
        .get();
      counter.base = row?.count ?? 0;
      counter.readAt = Date.now();
    })().finally(() => {
      counter.loading = null;
    });
  }
  if (c.loading) await c.loading;
  return c;
}

/**
 * Count `charges` for today if every capped one fits (count + cost ≤ limit), else
 * count nothing. All-or-nothing within this process.
 */
export async function consumeUsage(charges: readonly Charge[], now: Date = new Date()): Promise<ConsumeResult> {
  const day = utcDay(now);
  const counters = await Promise.all(charges.map((ch) => counterFor(ch.subject, day, now.getTime())));
  // Decide and count synchronously, so concurrent requests in this process cannot both take the last unit.
  const refused: number[] = [];
  charges.forEach((ch, i) => {
    const c = counters[i];
    if (ch.limit !== null && c.base + c.pending + ch.cost > ch.limit) refused.push(i);
  });
  if (refused.length) return { ok: false, used: counters.map((c) => c.base + c.pending), refused };
  charges.forEach((ch, i) => {
    counters[i].pending += ch.cost;
  });
  const used = counters.map((c) => c.base + c.pending);
  if (charges.some((ch) => ch.cost > 0)) await scheduleFlush();
  return { ok: true, used, refused: [] };
}

/** Today's counts of `subjects`, without counting anything. */
export async function peekUsage(subjects: readonly string[], now: Date = new Date()): Promise<number[]> {
  const day = utcDay(now);
  const counters = await Promise.all(subjects.map((s) => counterFor(s, day, now.getTime())));
  return counters.map((c) => c.base + c.pending);
}

/** Remember that a key was used (written to api_keys.last_used_at with the next flush). */
export function noteKeyUse(keyId: string, at: Date = new Date()): void {
  const s = state();
  s.lastUsed.set(keyId, Math.max(s.lastUsed.get(keyId) ?? 0, at.getTime()));
}

async function scheduleFlush(): Promise<void> {
  const s = state();
  const ms = flushMs();
  if (ms === 0) return flushUsage();
  if (!s.timer) {
    s.timer = setTimeout(() => {
      s.timer = null;
      flushUsage().catch((e) => console.error("[rainprint] api usage flush failed; will retry", e));
    }, ms);
    // Do not keep a script or test process alive just to write counts.
    s.timer.unref?.();
  }
}

/** Write every pending count (and key last-use time) now. Pages that show usage call this first. */
export async function flushUsage(): Promise<void> {
  const s = state();
  // One flush at a time; a caller arriving during a flush waits for it and then writes what came since.
  while (s.flushing) await s.flushing;
  const work = (async () => {
    const batch = [...s.counters.values()].filter((c) => c.pending > 0).map((c) => ({ c, delta: c.pending }));
    const used = [...s.lastUsed.entries()];
    s.lastUsed.clear();
    if (!batch.length && !used.length) return;
    const stmts = [
      ...batch.map(({ c, delta }) => ({
        sql: "INSERT INTO api_usage (subject, day, count) VALUES (?, ?, ?) ON CONFLICT (subject, day) DO UPDATE SET count = count + excluded.count RETURNING count",
        args: [c.subject, c.day, delta],
      })),
      ...used.map(([id, at]) => ({
        sql: "UPDATE api_keys SET last_used_at = max(coalesce(last_used_at, 0), ?) WHERE id = ?",
        args: [at, id],
      })),
    ];
    try {
      const results = await getClient().batch(stmts, "write");
      const readAt = Date.now();
      batch.forEach(({ c, delta }, i) => {
        // The stored total now includes this delta and whatever other instances counted.
        c.pending -= delta;
        c.base = Number(results[i].rows[0]?.count ?? c.base + delta);
        c.readAt = readAt;
      });
    } catch (e) {
      // Keep the pending counts (and last-use times) for the next attempt.
      for (const [id, at] of used) noteKeyUse(id, new Date(at));
      throw e;
    }
    pruneCounters(s);
  })();
  s.flushing = work;
  try {
    await work;
  } finally {
    s.flushing = null;
    if ([...s.counters.values()].some((c) => c.pending > 0) && flushMs() > 0) void scheduleFlush();
  }
}

/** Drop counters of past days and idle ones (a busy day sees many anonymous addresses). */
function pruneCounters(s: State): void {
  const today = utcDay(new Date());
  const idleBefore = Date.now() - 10 * 60_000;
  for (const [id, c] of s.counters) {
    if (c.pending === 0 && !c.loading && (c.day !== today || c.readAt < idleBefore)) s.counters.delete(id);
  }
}

/** Stored counts per subject and day in [fromDay, toDay] (flush first to include the last moments). */
export async function usageRows(subjects: readonly string[], fromDay: string, toDay: string): Promise<{ subject: string; day: string; count: number }[]> {
  if (!subjects.length) return [];
  return getDb()
    .select({ subject: apiUsage.subject, day: apiUsage.day, count: apiUsage.count })
    .from(apiUsage)
    .where(and(inArray(apiUsage.subject, [...subjects]), gte(apiUsage.day, fromDay), lte(apiUsage.day, toDay)))
    .all();
}
