import "server-only";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { editions } from "@/db/schema";
import { markEditionFailed, publishEdition, runEditionBuild } from "@/lib/editions/build/pipeline";
import { PermanentJobError, type JobHandler } from "../types";

// The edition build (see lib/editions/build/pipeline.ts). Resumable: the pipeline skips what the
// database already holds, so a worker that takes the job over — or a moderator's retry — carries
// on from the last finished period. A failed last attempt marks the edition failed; the published
// edition is never touched until the new one is published in one transaction.

const payload = z.object({
  editionId: z.string().min(1),
  publishWhenReady: z.boolean().optional(),
  pauseAfterPeriodMs: z.number().int().min(0).max(60_000).optional(),
});

export const buildEditionJob: JobHandler<unknown> = async (job, ctx) => {
  const p = payload.safeParse(job.payload);
  if (!p.success) throw new PermanentJobError("build-edition needs { editionId }");
  const { editionId, publishWhenReady, pauseAfterPeriodMs } = p.data;
  const e = await getDb().select({ status: editions.status }).from(editions).where(eq(editions.id, editionId)).get();
  if (!e) throw new PermanentJobError(`Edition ${editionId} does not exist.`);
  if (e.status !== "building") throw new PermanentJobError(`Edition ${editionId} is ${e.status}, not building.`);
  const resumedFrom = (job.checkpoint as { periods?: number[] } | null)?.periods ?? [];
  const periods = [...resumedFrom];
  try {
    const summary = await runEditionBuild(editionId, {
      signal: ctx.signal,
      pauseAfterPeriodMs,
      progress: ({ stage, fraction }) => ctx.progress(fraction, stage),
      periodDone: async (period) => {
        periods.push(period);
        await ctx.checkpoint({ periods });
      },
    });
    let published = false;
    if (publishWhenReady) published = await publishEdition(editionId, null);
    return { editionId, published, surfaces: summary.surfaces.length, resumedFrom, timings: summary.timings };
  } catch (err) {
    const message = err instanceof Error ? err.message : String(err);
    if (!ctx.signal.aborted && (err instanceof PermanentJobError || job.attempts >= job.maxAttempts)) await markEditionFailed(editionId, message);
    throw err;
  }
};
