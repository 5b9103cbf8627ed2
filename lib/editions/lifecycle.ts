import "server-only";
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { editions, jobs } from "@/db/schema";
import { errors } from "@/lib/errors";
import { cancelJob, enqueueJob } from "@/lib/jobs";
import { checkBuildParameters, defaultBuildParameters, GLOBAL_EXTENT, type BuildParameters } from "./build/compute";
import { audit, nextEditionId, publishEdition } from "./build/pipeline";
import { activeElevationModelId } from "./elevation-models";

// Starting, cancelling, retrying and publishing edition builds (moderators). The build itself runs
// in the worker (job kind "build-edition", lib/jobs/handlers/build-edition.ts).

export const BUILD_JOB_KIND = "build-edition";

/** What a moderator may choose for a build; everything else takes its default (recorded in the parameters). */
export const startBuildInput = z
  .object({
    resolutionDeg: z.coerce.number().min(0.05, "At least 0.05°.").max(10, "At most 10°.").default(0.25),
    west: z.coerce.number().min(-180).max(180).default(GLOBAL_EXTENT.west),
    south: z.coerce.number().min(-90).max(90).default(GLOBAL_EXTENT.south),
    east: z.coerce.number().min(-180).max(180).default(GLOBAL_EXTENT.east),
    north: z.coerce.number().min(-90).max(90).default(GLOBAL_EXTENT.north),
    extrapolationKm: z.coerce.number().positive().max(20000).default(1000),
    maxNeighbors: z.coerce.number().int().min(4).max(200).default(24),
    publishWhenReady: z.boolean().default(false),
  })
  .strict();
export type StartBuildInput = z.infer<typeof startBuildInput>;

export interface BuildPayload {
  editionId: string;
  /** Publish as soon as the build is ready (demo seed); otherwise a moderator publishes. */
  publishWhenReady?: boolean;
  /** Tests only (RAINPRINT_TEST=1): pause after each period. */
  pauseAfterPeriodMs?: number;
}

/** Refuse a second build while one is running: one build at a time keeps the machine responsive. */
async function buildInProgress(): Promise<string | null> {
  const row = await getDb().select({ id: editions.id }).from(editions).where(eq(editions.status, "building")).get();
  return row?.id ?? null;
}

/** Create an edition row (building), its job and an audit entry in one transaction. */
export async function startEditionBuild(
  input: StartBuildInput,
  actorId: string | null,
  opts: { isDemo?: boolean; parameters?: BuildParameters; pauseAfterPeriodMs?: number; now?: Date } = {},
): Promise<{ editionId: string; jobId: string }> {
  const params =
    opts.parameters ??
    defaultBuildParameters({
      elevationModelId: await activeElevationModelId(),
      maxNeighbors: input.maxNeighbors,
      extrapolationKm: input.extrapolationKm,
      grid: { resolutionDeg: input.resolutionDeg, extent: { west: input.west, south: input.south, east: input.east, north: input.north }, landOnly: true },
    });
  const problems = checkBuildParameters(params);
  if (Object.keys(problems).length) throw errors.invalid("The build parameters are not usable.", Object.fromEntries(Object.entries(problems).map(([k, v]) => [k, [v]])));
  const running = await buildInProgress();
  if (running) throw errors.conflict(`Edition ${running} is still being built. Wait for it to finish or cancel it first.`);
  const editionId = await nextEditionId(opts.now);
  return getDb().transaction(async (tx) => {
    await tx.insert(editions).values({ id: editionId, status: "building", createdBy: actorId, parameters: params, isDemo: opts.isDemo ?? false });
    const payload: BuildPayload = { editionId, publishWhenReady: input.publishWhenReady, pauseAfterPeriodMs: opts.pauseAfterPeriodMs };
    const job = await enqueueJob({ kind: BUILD_JOB_KIND, payload, maxAttempts: 3, createdBy: actorId }, tx);
    await tx.update(editions).set({ jobId: job.id }).where(eq(editions.id, editionId));
    await audit(tx, { actorId, editionId, action: "build-start", after: { status: "building", parameters: params, jobId: job.id } });
    return { editionId, jobId: job.id };
  });
}

async function editionOr404(id: string) {
  const e = await getDb().select().from(editions).where(eq(editions.id, id)).get();
  if (!e) throw errors.notFound(`There is no edition ${id}.`);
  return e;
}

/** Cancel a build: its job is cancelled and the edition marked cancelled (the published edition is untouched). */
export async function cancelEditionBuild(id: string, actorId: string): Promise<void> {
  const e = await editionOr404(id);
  if (e.status !== "building") throw errors.conflict(`Edition ${id} is ${e.status}; only a build in progress can be cancelled.`);
  if (e.jobId) await cancelJob(e.jobId);
  await getDb().transaction(async (tx) => {
    const row = await tx
      .update(editions)
      .set({ status: "cancelled" })
      .where(and(eq(editions.id, id), eq(editions.status, "building")))
      .returning({ id: editions.id })
      .get();
    if (row) await audit(tx, { actorId, editionId: id, action: "build-cancel", before: { status: "building" }, after: { status: "cancelled" } });
  });
}

/**
 * Retry a failed or cancelled build: a new job for the same edition, which resumes from what the
 * database already holds (station means, finished periods).
 */
export async function retryEditionBuild(id: string, actorId: string): Promise<{ jobId: string }> {
  const e = await editionOr404(id);
  if (e.status !== "failed" && e.status !== "cancelled")
    throw errors.conflict(`Edition ${id} is ${e.status}; only a failed or cancelled build can be resumed.`);
  const running = await buildInProgress();
  if (running) throw errors.conflict(`Edition ${running} is still being built. Wait for it to finish or cancel it first.`);
  return getDb().transaction(async (tx) => {
    const payload: BuildPayload = { editionId: id };
    const job = await enqueueJob({ kind: BUILD_JOB_KIND, payload, maxAttempts: 3, createdBy: actorId }, tx);
    await tx.update(editions).set({ status: "building", jobId: job.id }).where(eq(editions.id, id));
    await audit(tx, { actorId, editionId: id, action: "build-resume", before: { status: e.status }, after: { status: "building", jobId: job.id } });
    return { jobId: job.id };
  });
}

/** Publish a ready edition (one transaction); 409 when it is not ready. */
export async function publishReadyEdition(id: string, actorId: string): Promise<void> {
  const e = await editionOr404(id);
  if (e.status !== "ready") throw errors.conflict(`Edition ${id} is ${e.status}; only a ready edition can be published.`);
  if (!(await publishEdition(id, actorId))) throw errors.conflict(`Edition ${id} changed meanwhile; reload and try again.`);
}

/** The build's job (progress, stage, error) for the moderators' page. */
export async function buildJobOf(jobId: string | null) {
  if (!jobId) return null;
  return (
    (await getDb()
      .select({ id: jobs.id, status: jobs.status, progress: jobs.progress, stage: jobs.stage, error: jobs.error, attempts: jobs.attempts, maxAttempts: jobs.maxAttempts })
      .from(jobs)
      .where(eq(jobs.id, jobId))
      .get()) ?? null
  );
}



export interface EditionBuildStatus {
  id: string;
  status: string;
  job: Awaited<ReturnType<typeof buildJobOf>>;
}

/** Status of an edition and its build job; 404 for an unknown id. */
export async function editionBuildStatus(id: string): Promise<EditionBuildStatus> {
  const e = await editionOr404(id);
  return { id: e.id, status: e.status, job: await buildJobOf(e.jobId) };
}
