// Types shared by the job queue, the registry and the handlers.

export type JobRecord = {
  id: string;
  kind: string;
  payload: unknown;
  attempts: number;
  maxAttempts: number;
  /** What the previous attempt saved with ctx.checkpoint(), or null on a fresh start. */
  checkpoint: unknown;
};

export type JobContext = {
  /** Report progress: fraction 0…1 and a short stage label ("kriging δ18O, month 3"). */
  progress(fraction: number, stage?: string): Promise<void>;
  /** Save work done so far; a worker that takes the job over receives it as job.checkpoint. */
  checkpoint(data: unknown): Promise<void>;
  /** Renew the lease now (it is also renewed automatically while the handler runs). */
  heartbeat(): Promise<void>;
  /** Aborted when a cancel is requested or this worker lost the lease; stop promptly. */
  signal: AbortSignal;
  /** Id of the worker running the job. */
  workerId: string;
};

/** A job handler: returns a JSON-serialisable result, throws to fail (retried up to maxAttempts). */
export type JobHandler<P = unknown> = (job: JobRecord & { payload: P }, ctx: JobContext) => Promise<unknown>;

/** Thrown by a handler for failures that retrying cannot fix (bad payload, missing row). */
export class PermanentJobError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "PermanentJobError";
  }
}
