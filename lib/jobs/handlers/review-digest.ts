import "server-only";
import { and, eq, inArray, isNull } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { users } from "@/db/schema";
import { queueStats } from "@/lib/intake/review";
import { queueMail } from "@/lib/mail";
import { enqueueJob } from "../index";
import type { JobHandler } from "../types";

// The moderators' daily digest of the review desk. Each run mails every enabled moderator
// and admin (when anything is waiting) and queues the next run for 07:00 UTC the next day,
// so one queued job keeps the digest going. `ensureReviewDigestScheduled()` (called when the
// worker starts) queues the first one if none is waiting.

export const REVIEW_DIGEST_KIND = "review-digest";
export const DIGEST_HOUR_UTC = 7;

export function nextDigestAt(now: Date): Date {
  const next = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate(), DIGEST_HOUR_UTC));
  if (next.getTime() <= now.getTime()) next.setUTCDate(next.getUTCDate() + 1);
  return next;
}

export const reviewDigestJob: JobHandler<unknown> = async (job) => {
  const payload = (job.payload ?? {}) as { reschedule?: boolean };
  const stats = await queueStats();
  const day = new Date().toISOString().slice(0, 10);
  const db = getDb();
  const sent = await db.transaction(async (tx) => {
    let n = 0;
    const waiting = stats.pendingSamples + stats.pendingStations > 0;
    if (waiting) {
      const mods = await tx
        .select({ email: users.email, name: users.name })
        .from(users)
        .where(and(inArray(users.role, ["moderator", "admin"]), isNull(users.disabledAt), eq(users.isDemo, false)))
        .all();
      for (const m of mods) {
        await queueMail({ to: m.email, template: "review-digest", data: { name: m.name, day, ...stats } }, tx as unknown as Db);
        n++;
      }
    }
    if (payload.reschedule !== false) await enqueueJob({ kind: REVIEW_DIGEST_KIND, payload: { reschedule: true }, runAfter: nextDigestAt(new Date()) }, tx);
    return n;
  });
  return { sent, ...stats };
};

/** Queue the next digest unless one is already waiting. */
export async function ensureReviewDigestScheduled(): Promise<void> {
  const { jobs } = await import("@/db/schema");
  const db = getDb();
  const waiting = await db.select({ id: jobs.id }).from(jobs).where(and(eq(jobs.kind, REVIEW_DIGEST_KIND), inArray(jobs.status, ["queued", "running"]))).get();
  if (!waiting) await enqueueJob({ kind: REVIEW_DIGEST_KIND, payload: { reschedule: true }, runAfter: nextDigestAt(new Date()) });
}
