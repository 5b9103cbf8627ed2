import "server-only";
import { appendFileSync } from "node:fs";
import { setTimeout as sleep } from "node:timers/promises";
import { z } from "zod";
import { PermanentJobError, type JobHandler } from "../types";

// A job kind for tests only (registered when RAINPRINT_TEST=1): it works in
// `steps` steps of `stepMs` each, appends one line per finished step and one
// "finished" line to `file`, and checkpoints after every step, so a test can
// kill its worker mid-way and check that another worker resumes it and that
// it finishes exactly once.

const payload = z.object({ file: z.string().min(1), steps: z.number().int().min(1).max(100), stepMs: z.number().int().min(0).max(60_000) });

export const testStepsJob: JobHandler<unknown> = async (job, ctx) => {
  const p = payload.safeParse(job.payload);
  if (!p.success) throw new PermanentJobError("test-steps needs { file, steps, stepMs }");
  const { file, steps, stepMs } = p.data;
  const start = (job.checkpoint as { done?: number } | null)?.done ?? 0;
  for (let i = start + 1; i <= steps; i++) {
    await sleep(stepMs, undefined, { signal: ctx.signal });
    appendFileSync(file, `step ${i} by ${ctx.workerId}\n`);
    await ctx.checkpoint({ done: i });
    await ctx.progress(i / steps, `step ${i} of ${steps}`);
  }
  appendFileSync(file, `finished by ${ctx.workerId}\n`);
  return { steps, resumedFrom: start };
};
