import "server-only";
import { and, desc, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db";
import { getDb } from "@/db";
import { jobs } from "@/db/schema";

// The job queue's public face: enqueue, cancel, read. The worker side lives in
// runner.ts; handlers are listed in registry.ts.

export type EnqueueJob = {
  kind: string;
  payload: unknown;
  /** Attempts before the job is marked failed (default 3). */
  maxAttempts?: number;
  /** Do not start before this instant. */
  runAfter?: Date;
  createdBy?: string | null;
};

type Writer = Pick<Db, "insert">;

/** Add a job. Pass a transaction as `db` to enqueue together with the rows it works on. */
export async function enqueueJob(spec: EnqueueJob, db: Writer = getDb()): Promise<{ id: string }> {
  const row = await db
    .insert(jobs)
    .values({
      kind: spec.kind,
      payload: spec.payload ?? {},
      maxAttempts: spec.maxAttempts ?? 3,
      runAfter: spec.runAfter ?? new Date(),
      createdBy: spec.createdBy ?? null,
    })
    .returning({ id: jobs.id })
    .get();
  return row;
}

/**
 * Cancel a job. A queued job is cancelled at once; a running one gets
 * `cancel_requested` and its handler's ctx.signal aborts at the next heartbeat.
 * Returns the status afterwards, or null for an unknown id.
 */
export async function cancelJob(id: string, db: Db = getDb()): Promise<"cancelled" | "cancel-requested" | "finished" | null> {
  const now = new Date();
  const queued = await db
    .update(jobs)
    .set({ status: "cancelled", cancelRequested: true, finishedAt: now })
    .where(and(eq(jobs.id, id), eq(jobs.status, "queued")))
    .returning({ id: jobs.id })
    .get();
  if (queued) return "cancelled";
  const running = await db
    .update(jobs)
    .set({ cancelRequested: true })
    .where(and(eq(jobs.id, id), eq(jobs.status, "running")))
    .returning({ id: jobs.id })
    .get();
  if (running) return "cancel-requested";
  const exists = await db.select({ id: jobs.id }).from(jobs).where(eq(jobs.id, id)).get();
  return exists ? "finished" : null;
}

export async function getJob(id: string, db: Db = getDb()) {
  return db.select().from(jobs).where(eq(jobs.id, id)).get();
}

export const UNFINISHED_STATUSES = ["queued", "running"] as const;

export async function countUnfinished(db: Db = getDb()): Promise<number> {
  const rows = await db.select({ id: jobs.id }).from(jobs).where(inArray(jobs.status, [...UNFINISHED_STATUSES])).all();
  return rows.length;
}

/** The most recent jobs, newest first (for the jobs page). */
export async function listRecentJobs(limit = 100, db: Db = getDb()) {
  return db
    .select({
      id: jobs.id,
      kind: jobs.kind,
      status: jobs.status,
      progress: jobs.progress,
      stage: jobs.stage,
      attempts: jobs.attempts,
      maxAttempts: jobs.maxAttempts,
      error: jobs.error,
      createdAt: jobs.createdAt,
      finishedAt: jobs.finishedAt,
    })
    .from(jobs)
    .orderBy(desc(jobs.createdAt))
    .limit(limit)
    .all();
}
