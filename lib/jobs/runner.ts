import "server-only";
import { randomUUID } from "node:crypto";
import { hostname } from "node:os";
import type { InValue } from "@libsql/client";
import { getClient } from "@/db";
import { env } from "@/lib/env";
import { PermanentJobError, type JobContext, type JobHandler, type JobRecord } from "./types";

// The worker side of the job queue.
//
// Claim: one UPDATE … WHERE id = (SELECT … LIMIT 1) AND <still claimable>
// RETURNING, so two workers can never claim the same job: a job is claimable
// when it is queued and due, or running with an expired lease (its worker
// died) — the second case is the takeover. Every later write by the worker
// (heartbeat, progress, checkpoint, completion, failure) carries
// `lease_owner = me AND status = 'running'`, so a worker that lost its lease
// cannot complete the job a second time: its completion updates no row.

export type RunnerOptions = {
  registry: Record<string, JobHandler<never>>;
  workerId?: string;
  /** Lease length in ms (default JOB_LEASE_SECONDS). Renewed every third of it. */
  leaseMs?: number;
  /** Idle poll interval in ms. */
  pollMs?: number;
  log?: (msg: string) => void;
};

type Row = Record<string, unknown>;

const CLAIMABLE = `cancel_requested = 0 AND attempts < max_attempts AND kind IN (SELECT value FROM json_each(?4))
  AND ((status = 'queued' AND run_after <= ?3) OR (status = 'running' AND lease_expires_at < ?3))`;

/** Backoff before retry n (1-based): 2 s, 8 s, 32 s, … capped at 10 min, ±20 % jitter. */
export function retryDelayMs(attempt: number): number {
  const base = Math.min(2000 * 4 ** (attempt - 1), 600_000);
  return Math.round(base * (0.8 + 0.4 * Math.random()));
}

async function exec(sql: string, args: InValue[]): Promise<Row[]> {
  const rs = await getClient().execute({ sql, args });
  return rs.rows as unknown as Row[];
}

function parseJson(v: unknown): unknown {
  if (typeof v !== "string") return v ?? null;
  try {
    return JSON.parse(v);
  } catch {
    return v;
  }
}

/** Claim one due job of the given kinds for this worker, or null. */
export async function claimJob(workerId: string, kinds: string[], leaseMs: number, now = Date.now()): Promise<JobRecord | null> {
  const rows = await exec(
    `UPDATE jobs SET status = 'running', lease_owner = ?1, lease_expires_at = ?2, attempts = attempts + 1,
        started_at = COALESCE(started_at, ?3)
     WHERE id = (SELECT id FROM jobs WHERE ${CLAIMABLE} ORDER BY run_after, created_at LIMIT 1)
       AND ${CLAIMABLE}
     RETURNING id, kind, payload, attempts, max_attempts, checkpoint`,
    [workerId, now + leaseMs, now, JSON.stringify(kinds)],
  );
  const r = rows[0];
  if (!r) return null;
  return {
    id: String(r.id),
    kind: String(r.kind),
    payload: parseJson(r.payload),
    attempts: Number(r.attempts),
    maxAttempts: Number(r.max_attempts),
    checkpoint: parseJson(r.checkpoint),
  };
}

/**
 * Jobs whose worker died on their last attempt, or died after a cancel was
 * requested, are closed here (they are not claimable any more).
 */
export async function sweepAbandoned(now = Date.now()): Promise<number> {
  const failed = await exec(
    `UPDATE jobs SET status = CASE WHEN cancel_requested = 1 THEN 'cancelled' ELSE 'failed' END,
        error = CASE WHEN cancel_requested = 1 THEN error ELSE 'The worker running the last attempt stopped responding.' END,
        lease_owner = NULL, lease_expires_at = NULL, finished_at = ?1
     WHERE status = 'running' AND lease_expires_at < ?1 AND (attempts >= max_attempts OR cancel_requested = 1)
     RETURNING id`,
    [now],
  );
  return failed.length;
}

/** Renew the lease; returns "ok", "cancel" (cancel requested) or "lost" (someone else owns it now). */
async function renewLease(jobId: string, workerId: string, leaseMs: number): Promise<"ok" | "cancel" | "lost"> {
  const rows = await exec(
    `UPDATE jobs SET lease_expires_at = ?3 WHERE id = ?1 AND lease_owner = ?2 AND status = 'running' RETURNING cancel_requested`,
    [jobId, workerId, Date.now() + leaseMs],
  );
  if (!rows[0]) return "lost";
  return Number(rows[0].cancel_requested) ? "cancel" : "ok";
}

async function ownedUpdate(jobId: string, workerId: string, set: string, args: InValue[]): Promise<boolean> {
  const rows = await exec(
    `UPDATE jobs SET ${set} WHERE id = ?1 AND lease_owner = ?2 AND status = 'running' RETURNING id`,
    [jobId, workerId, ...args],
  );
  return rows.length > 0;
}

export type RunOutcome = "succeeded" | "retry" | "failed" | "cancelled" | "lost" | "released";

/** Run one claimed job to its end and record the outcome (only while this worker owns the lease). */
export async function runClaimedJob(
  job: JobRecord,
  opts: { registry: RunnerOptions["registry"]; workerId: string; leaseMs: number; shutdown?: AbortSignal; log?: (m: string) => void },
): Promise<RunOutcome> {
  const { workerId, leaseMs } = opts;
  const log = opts.log ?? (() => {});
  const controller = new AbortController();
  let abortReason: "cancel" | "lost" | "shutdown" | null = null;
  const abort = (reason: "cancel" | "lost" | "shutdown") => {
    if (abortReason) return;
    abortReason = reason;
    controller.abort(new Error(`job ${reason}`));
  };
  const onShutdown = () => abort("shutdown");
  if (opts.shutdown?.aborted) onShutdown();
  opts.shutdown?.addEventListener("abort", onShutdown);

  const heartbeat = async () => {
    if (abortReason === "lost") return;
    const state = await renewLease(job.id, workerId, leaseMs);
    if (state !== "ok") abort(state);
  };
  const timer = setInterval(() => {
    heartbeat().catch((e) => log(`heartbeat failed for ${job.id}: ${String(e)}`));
  }, Math.max(200, Math.floor(leaseMs / 3)));

  const ctx: JobContext = {
    workerId,
    signal: controller.signal,
    heartbeat,
    async progress(fraction, stage) {
      const f = Math.min(1, Math.max(0, Number.isFinite(fraction) ? fraction : 0));
      if (!(await ownedUpdate(job.id, workerId, "progress = ?3, stage = ?4", [f, stage ?? null]))) abort("lost");
    },
    async checkpoint(data) {
      if (!(await ownedUpdate(job.id, workerId, "checkpoint = ?3", [JSON.stringify(data ?? null)]))) abort("lost");
      job.checkpoint = data;
    },
  };

  const handler = opts.registry[job.kind] as JobHandler | undefined;
  try {
    if (!handler) throw new PermanentJobError(`No handler is registered for job kind "${job.kind}".`);
    const result = await handler(job, ctx);
    if (abortReason === "lost") return "lost";
    const done = await ownedUpdate(
      job.id,
      workerId,
      "status = 'succeeded', progress = 1, result = ?3, error = NULL, lease_owner = NULL, lease_expires_at = NULL, finished_at = ?4",
      [JSON.stringify(result ?? null), Date.now()],
    );
    if (!done) {
      log(`job ${job.id} finished here but its lease had passed to another worker; result discarded`);
      return "lost";
    }
    return "succeeded";
  } catch (e) {
    const message = e instanceof Error ? e.message : String(e);
    if (abortReason === "lost") return "lost";
    if (abortReason === "cancel") {
      await ownedUpdate(job.id, workerId, "status = 'cancelled', lease_owner = NULL, lease_expires_at = NULL, finished_at = ?3", [Date.now()]);
      return "cancelled";
    }
    if (abortReason === "shutdown") {
      // Give the job back without counting this attempt; its checkpoint stays.
      await ownedUpdate(job.id, workerId, "status = 'queued', attempts = attempts - 1, lease_owner = NULL, lease_expires_at = NULL", []);
      return "released";
    }
    const permanent = e instanceof PermanentJobError;
    if (!permanent && job.attempts < job.maxAttempts) {
      await ownedUpdate(
        job.id,
        workerId,
        "status = 'queued', error = ?3, run_after = ?4, lease_owner = NULL, lease_expires_at = NULL",
        [message, Date.now() + retryDelayMs(job.attempts)],
      );
      log(`job ${job.id} (${job.kind}) attempt ${job.attempts} failed, will retry: ${message}`);
      return "retry";
    }
    await ownedUpdate(job.id, workerId, "status = 'failed', error = ?3, lease_owner = NULL, lease_expires_at = NULL, finished_at = ?4", [
      message,
      Date.now(),
    ]);
    log(`job ${job.id} (${job.kind}) failed: ${message}`);
    return "failed";
  } finally {
    clearInterval(timer);
    opts.shutdown?.removeEventListener("abort", onShutdown);
  }
}

/** The worker loop: claim, run, repeat; idle polls every pollMs. `stop()` finishes gracefully. */
export function startWorker(opts: RunnerOptions): { workerId: string; stop(): Promise<void>; done: Promise<void> } {
  const workerId = opts.workerId ?? `${hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`;
  const leaseMs = opts.leaseMs ?? env().JOB_LEASE_SECONDS * 1000;
  const pollMs = opts.pollMs ?? 500;
  const log = opts.log ?? ((m: string) => console.log(`[worker] ${m}`));
  const kinds = Object.keys(opts.registry);
  const shutdown = new AbortController();
  let wake: (() => void) | null = null;
  let lastSweep = 0;

  const done = (async () => {
    while (!shutdown.signal.aborted) {
      try {
        if (Date.now() - lastSweep > 5000) {
          lastSweep = Date.now();
          await sweepAbandoned();
        }
        const job = await claimJob(workerId, kinds, leaseMs);
        if (job) {
          log(`claimed ${job.kind} ${job.id} (attempt ${job.attempts}/${job.maxAttempts}${job.checkpoint ? ", resuming from checkpoint" : ""})`);
          const outcome = await runClaimedJob(job, { registry: opts.registry, workerId, leaseMs, shutdown: shutdown.signal, log });
          log(`${job.kind} ${job.id}: ${outcome}`);
          continue;
        }
      } catch (e) {
        log(`error in the worker loop: ${e instanceof Error ? e.message : String(e)}`);
      }
      await new Promise<void>((resolve) => {
        const t = setTimeout(resolve, pollMs);
        wake = () => {
          clearTimeout(t);
          resolve();
        };
      });
      wake = null;
    }
  })();

  return {
    workerId,
    done,
    async stop() {
      shutdown.abort();
      (wake as (() => void) | null)?.();
      await done;
    },
  };
}
