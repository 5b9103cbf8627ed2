import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, reviewEvents, surfaces } from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { startEditionBuild, startBuildInput } from "@/lib/editions/lifecycle";
import { runEditionBuild } from "@/lib/editions/build/pipeline";
import { getCurrentEdition } from "@/lib/editions/queries";
import { getJob } from "@/lib/jobs";
import { readSurfacePlaneData } from "@/lib/surfaces/store";
import type { SurfaceGridSpec } from "@/lib/editions/types";
import { freshDb } from "../helpers/db";

// A build-edition job whose worker is killed mid-build: the published edition stays current, a
// second worker takes the job over after the lease, resumes from the finished periods and
// publishes exactly once — with the same planes as an uninterrupted build.

const LEASE_MS = 5000;
const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));
const children: ChildProcess[] = [];
let seeded: string;

beforeAll(async () => {
  await freshDb();
  await seedDemo({ profile: "test" });
  seeded = (await getCurrentEdition())!.id;
}, 120_000);

afterAll(() => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
});

function startWorker(): ChildProcess {
  const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.resolve("scripts/worker.ts")], {
    env: { ...process.env, RAINPRINT_TEST: "1", JOB_LEASE_SECONDS: String(LEASE_MS / 1000), WORKER_POLL_MS: "100" },
    stdio: ["ignore", "pipe", "pipe"],
  });
  children.push(child);
  return child;
}

async function planes(editionId: string): Promise<Map<string, Buffer>> {
  const rows = await getDb().select().from(surfaces).where(eq(surfaces.editionId, editionId)).all();
  const out = new Map<string, Buffer>();
  for (const r of rows)
    for (const plane of ["value", "variance"] as const) {
      const d = await readSurfacePlaneData(r.id, r.grid as SurfaceGridSpec, plane);
      out.set(`${r.variable}/${r.period}/${plane}`, Buffer.from(d.buffer, d.byteOffset, d.byteLength));
    }
  return out;
}

describe("a worker killed in the middle of an edition build", () => {
  it("leaves the current edition in place; the build resumes in another worker and publishes once", async () => {
    const input = startBuildInput.parse({ resolutionDeg: 3, west: -30, south: 20, east: 60, north: 70, publishWhenReady: true });
    const { editionId, jobId } = await startEditionBuild(input, null, { pauseAfterPeriodMs: 400 });

    const first = startWorker();
    for (let i = 0; ; i++) {
      const periods = ((await getJob(jobId))?.checkpoint as { periods?: number[] } | null)?.periods ?? [];
      if (periods.length >= 3) break;
      if (i > 600) throw new Error("the first worker never finished three periods");
      await wait(50);
    }
    first.kill("SIGKILL");
    await new Promise((r) => first.once("exit", r));
    const killedAt = Date.now();

    // Nothing visible changed: the seeded edition is current, the new one is still building.
    expect((await getCurrentEdition())?.id).toBe(seeded);
    expect((await getDb().select().from(editions).where(eq(editions.id, editionId)).get())?.status).toBe("building");
    expect((await getJob(jobId))?.status).toBe("running");

    const second = startWorker();
    for (let i = 0; ; i++) {
      const row = await getJob(jobId);
      if (row?.status === "succeeded") break;
      if (row?.status === "failed") throw new Error(`the build failed: ${row.error}`);
      if (i > 1200) throw new Error(`the build did not finish; status ${row?.status}`);
      await wait(100);
    }
    second.kill("SIGTERM");
    await new Promise((r) => second.once("exit", r));

    const job = (await getJob(jobId))!;
    expect(job.finishedAt!.getTime() - killedAt).toBeGreaterThan(LEASE_MS - 1500);
    expect(job.attempts).toBe(2);
    const result = job.result as { published: boolean; resumedFrom: number[] };
    expect(result.published).toBe(true);
    expect(result.resumedFrom.length).toBeGreaterThanOrEqual(3);

    expect((await getCurrentEdition())?.id).toBe(editionId);
    const publishes = await getDb()
      .select()
      .from(reviewEvents)
      .where(and(eq(reviewEvents.entityId, editionId), eq(reviewEvents.action, "publish")))
      .all();
    expect(publishes).toHaveLength(1);
    expect(await getDb().select({ id: surfaces.id }).from(surfaces).where(eq(surfaces.editionId, editionId)).all()).toHaveLength(52);

    // The same parameters built in one go give byte-identical planes.
    const e = (await getDb().select().from(editions).where(eq(editions.id, editionId)).get())!;
    await getDb().insert(editions).values({ id: "uninterrupted", status: "building", parameters: e.parameters, isDemo: true });
    await runEditionBuild("uninterrupted", { threads: 1 });
    const [a, b] = await Promise.all([planes(editionId), planes("uninterrupted")]);
    expect(a.size).toBe(104);
    for (const [k, bytes] of a) expect(Buffer.compare(bytes, b.get(k)!), k).toBe(0);
  }, 180_000);
});
