import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, jobs, reviewEvents } from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { isAppError } from "@/lib/errors";
import { cancelEditionBuild, publishReadyEdition, retryEditionBuild, startBuildInput, startEditionBuild } from "@/lib/editions/lifecycle";
import { getCurrentEdition } from "@/lib/editions/queries";
import { getJob } from "@/lib/jobs";
import { jobRegistry } from "@/lib/jobs/registry";
import { claimJob, runClaimedJob } from "@/lib/jobs/runner";
import { countRows, freshDb } from "../helpers/db";

// Start, cancel, resume and publish, in this process (the job runs through the real runner).

let seeded: string;
let moderatorId: string;

beforeAll(async () => {
  await freshDb();
  await seedDemo({ profile: "test" });
  seeded = (await getCurrentEdition())!.id;
  moderatorId = (await getDb().query.users.findFirst({ where: (u, { eq }) => eq(u.role, "moderator") }))!.id;
}, 120_000);

const small = () => startBuildInput.parse({ resolutionDeg: 4, west: 0, south: 30, east: 40, north: 60 });

async function runNextJob() {
  const job = (await claimJob("test-worker", ["build-edition"], 30_000))!;
  return runClaimedJob(job, { registry: jobRegistry(), workerId: "test-worker", leaseMs: 30_000 });
}

async function conflictOf(p: Promise<unknown>): Promise<number | null> {
  try {
    await p;
    return null;
  } catch (e) {
    return isAppError(e) ? e.status : -1;
  }
}

describe("edition build lifecycle", () => {
  it("refuses unusable parameters and writes nothing", async () => {
    const before = [await countRows("editions"), await countRows("jobs")];
    const e = await startEditionBuild({ ...small(), resolutionDeg: 0.05, west: -180, east: 180, south: -90, north: 90 }, moderatorId).catch((x) => x);
    expect(isAppError(e) && e.status).toBe(400);
    expect(isAppError(e) && JSON.stringify(e.fields)).toContain("cells");
    expect([await countRows("editions"), await countRows("jobs")]).toEqual(before);
    expect(() => startBuildInput.parse({ resolutionDeg: 0 })).toThrow();
  });

  it("a cancelled build leaves the current edition; it can be resumed, then published in one step", async () => {
    const { editionId, jobId } = await startEditionBuild(small(), moderatorId);
    // one build at a time
    expect(await conflictOf(startEditionBuild(small(), moderatorId))).toBe(409);
    // cannot publish what is not ready
    expect(await conflictOf(publishReadyEdition(editionId, moderatorId))).toBe(409);
    await cancelEditionBuild(editionId, moderatorId);
    expect((await getJob(jobId))?.status).toBe("cancelled");
    expect((await getDb().select().from(editions).where(eq(editions.id, editionId)).get())?.status).toBe("cancelled");
    expect((await getCurrentEdition())?.id).toBe(seeded);

    const { jobId: again } = await retryEditionBuild(editionId, moderatorId);
    expect(await runNextJob()).toBe("succeeded");
    expect((await getJob(again))?.status).toBe("succeeded");
    expect((await getDb().select().from(editions).where(eq(editions.id, editionId)).get())?.status).toBe("ready");
    expect((await getCurrentEdition())?.id).toBe(seeded);

    await publishReadyEdition(editionId, moderatorId);
    expect((await getCurrentEdition())?.id).toBe(editionId);
    // the earlier edition stays published and browsable
    expect((await getDb().select().from(editions).where(eq(editions.id, seeded)).get())?.status).toBe("published");
    const actions = (await getDb().select().from(reviewEvents).where(eq(reviewEvents.entityId, editionId)).all()).map((r) => r.action);
    expect(actions).toEqual(["build-start", "build-cancel", "build-resume", "publish"]);
    expect(await conflictOf(publishReadyEdition(editionId, moderatorId))).toBe(409);
  }, 120_000);

  it("a build whose last attempt fails is marked failed and the current edition stays", async () => {
    const { editionId, jobId } = await startEditionBuild(small(), moderatorId);
    // Too few stations: coverage rules no station can meet (every build attempt fails the same way).
    const e = (await getDb().select().from(editions).where(eq(editions.id, editionId)).get())!;
    await getDb()
      .update(editions)
      .set({ parameters: { ...(e.parameters as object), stationMeanRules: { minYearsAnnual: 99, minYearsPerMonth: 99 } } })
      .where(eq(editions.id, editionId));
    await getDb().update(jobs).set({ maxAttempts: 1 }).where(eq(jobs.id, jobId));
    expect(await runNextJob()).toBe("failed");
    expect((await getDb().select().from(editions).where(eq(editions.id, editionId)).get())?.status).toBe("failed");
    expect((await getJob(jobId))?.error).toMatch(/stations pass the coverage rules/);
    expect((await getCurrentEdition())?.id).not.toBe(editionId);
  }, 120_000);
});
