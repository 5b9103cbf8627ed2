import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { jobs } from "@/db/schema";
import { cancelJob, enqueueJob, getJob } from "@/lib/jobs";
import { claimJob, runClaimedJob, sweepAbandoned } from "@/lib/jobs/runner";
import type { JobHandler } from "@/lib/jobs/types";
import { freshDb } from "./helpers/db";

beforeAll(freshDb);

const LEASE_MS = 5000;
const wait = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function clearQueue() {
  await getDb().update(jobs).set({ status: "cancelled" }).where(inArray(jobs.status, ["queued", "running"]));
}

describe("claiming", () => {
  it("gives a job to exactly one of many simultaneous claimers", async () => {
    await clearQueue();
    const { id } = await enqueueJob({ kind: "k", payload: {} });
    const claims = await Promise.all(Array.from({ length: 8 }, (_, i) => claimJob(`w${i}`, ["k"], LEASE_MS)));
    const winners = claims.filter(Boolean);
    expect(winners).toHaveLength(1);
    expect(winners[0]!.id).toBe(id);
    const row = await getJob(id);
    expect(row?.status).toBe("running");
    expect(row?.attempts).toBe(1);
  });

  it("does not claim jobs that are not due, of other kinds, or held under a live lease", async () => {
    await clearQueue();
    await enqueueJob({ kind: "k", payload: {}, runAfter: new Date(Date.now() + 60_000) });
    await enqueueJob({ kind: "other", payload: {} });
    expect(await claimJob("w", ["k"], LEASE_MS)).toBeNull();
    const { id } = await enqueueJob({ kind: "k", payload: {} });
    expect((await claimJob("a", ["k"], LEASE_MS))?.id).toBe(id);
    expect(await claimJob("b", ["k"], LEASE_MS)).toBeNull();
    // After the lease runs out, another worker takes it over (attempt 2).
    const later = await claimJob("b", ["k"], LEASE_MS, Date.now() + LEASE_MS + 1);
    expect(later).toMatchObject({ id, attempts: 2 });
  });
});

describe("running", () => {
  it("records success only while the worker still owns the lease", async () => {
    await clearQueue();
    const { id } = await enqueueJob({ kind: "slow", payload: {} });
    const job = (await claimJob("a", ["slow"], LEASE_MS))!;
    let calls = 0;
    const handler: JobHandler = async () => {
      calls++;
      // Meanwhile the lease passes to worker b (as if a had stalled past its lease).
      await getDb().update(jobs).set({ leaseOwner: "b" }).where(eq(jobs.id, id));
      return { done: true };
    };
    expect(await runClaimedJob(job, { registry: { slow: handler }, workerId: "a", leaseMs: LEASE_MS })).toBe("lost");
    expect((await getJob(id))?.status).toBe("running");
    expect(calls).toBe(1);
  });

  it("retries a failing job with backoff, then marks it failed after maxAttempts", async () => {
    await clearQueue();
    const { id } = await enqueueJob({ kind: "flaky", payload: {}, maxAttempts: 2 });
    const handler: JobHandler = async () => {
      throw new Error("upstream refused");
    };
    const first = (await claimJob("a", ["flaky"], LEASE_MS))!;
    expect(await runClaimedJob(first, { registry: { flaky: handler }, workerId: "a", leaseMs: LEASE_MS })).toBe("retry");
    const queued = (await getJob(id))!;
    expect(queued.status).toBe("queued");
    expect(queued.error).toBe("upstream refused");
    expect(queued.runAfter.getTime()).toBeGreaterThan(Date.now());
    const second = (await claimJob("a", ["flaky"], LEASE_MS, queued.runAfter.getTime() + 1))!;
    expect(second.attempts).toBe(2);
    expect(await runClaimedJob(second, { registry: { flaky: handler }, workerId: "a", leaseMs: LEASE_MS })).toBe("failed");
    expect((await getJob(id))?.status).toBe("failed");
  });

  it("reports progress and checkpoints, and cancels a running job through its signal", async () => {
    await clearQueue();
    const { id } = await enqueueJob({ kind: "long", payload: {} });
    const job = (await claimJob("a", ["long"], 600))!;
    const handler: JobHandler = async (_job, ctx) => {
      await ctx.progress(0.25, "first quarter");
      await ctx.checkpoint({ done: 1 });
      await cancelJob(id);
      await new Promise((resolve, reject) => {
        const t = setTimeout(resolve, 10_000);
        ctx.signal.addEventListener("abort", () => {
          clearTimeout(t);
          reject(ctx.signal.reason);
        });
      });
    };
    expect(await runClaimedJob(job, { registry: { long: handler }, workerId: "a", leaseMs: 600 })).toBe("cancelled");
    const row = (await getJob(id))!;
    expect(row).toMatchObject({ status: "cancelled", progress: 0.25, stage: "first quarter", checkpoint: { done: 1 } });
  });

  it("cancels a queued job at once, and closes a job whose last attempt's worker died", async () => {
    await clearQueue();
    const { id } = await enqueueJob({ kind: "k", payload: {} });
    expect(await cancelJob(id)).toBe("cancelled");
    expect(await cancelJob("no-such-job")).toBeNull();
    const dead = await enqueueJob({ kind: "k", payload: {}, maxAttempts: 1 });
    await claimJob("a", ["k"], LEASE_MS);
    expect(await sweepAbandoned(Date.now() + LEASE_MS + 1)).toBe(1);
    expect((await getJob(dead.id))?.status).toBe("failed");
  });
});

describe("a worker killed in the middle of a job", () => {
  const children: ChildProcess[] = [];
  afterAll(() => {
    for (const c of children) if (c.exitCode === null) c.kill("SIGKILL");
  });

  function startWorker(): ChildProcess {
    // node itself with tsx as a loader: one process, so SIGKILL hits the worker (the tsx CLI would be a parent).
    const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", path.resolve("scripts/worker.ts")], {
      env: { ...process.env, RAINPRINT_TEST: "1", JOB_LEASE_SECONDS: String(LEASE_MS / 1000), WORKER_POLL_MS: "100" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    children.push(child);
    return child;
  }

  it("is taken over after its lease and completes exactly once", async () => {
    await clearQueue();
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "rainprint-job-")), "effects.log");
    const steps = 6;
    const { id } = await enqueueJob({ kind: "test-steps", payload: { file, steps, stepMs: 700 }, maxAttempts: 3 });

    const first = startWorker();
    // Wait until the first worker has checkpointed two steps, then kill it without warning.
    for (let i = 0; ; i++) {
      const row = await getJob(id);
      if ((row?.checkpoint as { done?: number } | null)?.done === 2) break;
      if (i > 300) throw new Error("the first worker never reached step 2");
      await wait(50);
    }
    first.kill("SIGKILL");
    await new Promise((r) => first.once("exit", r));
    const killedAt = Date.now();
    expect((await getJob(id))?.status).toBe("running");

    const second = startWorker();
    for (let i = 0; ; i++) {
      const row = await getJob(id);
      if (row?.status === "succeeded") break;
      if (i > 600) throw new Error(`the job did not finish; status ${row?.status}`);
      await wait(100);
    }
    const row = (await getJob(id))!;
    // The second worker could only claim after the first one's lease ran out.
    expect(row.finishedAt!.getTime() - killedAt).toBeGreaterThan(LEASE_MS - 1500);
    expect(row.attempts).toBe(2);
    expect(row.result).toEqual({ steps, resumedFrom: 2 });

    const lines = readFileSync(file, "utf8").trim().split("\n");
    expect(lines.filter((l) => l.startsWith("finished"))).toHaveLength(1);
    for (let s = 1; s <= steps; s++) expect(lines.filter((l) => l.startsWith(`step ${s} `))).toHaveLength(1);
    // Steps 1–2 by the first worker, 3–6 by the second.
    const owner = (s: number) => lines.find((l) => l.startsWith(`step ${s} `))!.split(" by ")[1];
    expect(owner(1)).toBe(owner(2));
    expect(owner(3)).not.toBe(owner(2));
    expect(owner(6)).toBe(owner(3));

    second.kill("SIGTERM");
    await new Promise((r) => second.once("exit", r));
    expect(existsSync(file)).toBe(true);
  });
});
