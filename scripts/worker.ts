// The background worker: claims jobs from the database and runs them (see
// lib/jobs/runner.ts). Start several for more throughput; they share the work
// through the jobs table. SIGTERM/SIGINT stop it gracefully: the running job
// is handed back (its checkpoint kept) for another worker to resume.
//
// Run with the `react-server` condition (as `npm start` does) so modules
// marked `import "server-only"` load: tsx --conditions=react-server scripts/worker.ts
import { closeDb, dbReady } from "../db";
import { jobRegistry } from "../lib/jobs/registry";
import { startWorker } from "../lib/jobs/runner";
import { ensureReviewDigestScheduled } from "../lib/jobs/handlers/review-digest";

async function main() {
  await dbReady();
  await ensureReviewDigestScheduled().catch((e) => console.error("[worker] could not schedule the review digest:", e));
  const registry = jobRegistry();
  const worker = startWorker({ registry, pollMs: Number(process.env.WORKER_POLL_MS || 500) });
  console.log(`[worker] ${worker.workerId} started; kinds: ${Object.keys(registry).join(", ")}`);
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[worker] ${signal}: finishing …`);
    const force = setTimeout(() => process.exit(1), 15_000);
    force.unref();
    await worker.stop();
    closeDb();
    process.exit(0);
  };
  process.on("SIGTERM", () => void stop("SIGTERM"));
  process.on("SIGINT", () => void stop("SIGINT"));
  await worker.done;
}

main().catch((e) => {
  console.error(e instanceof Error ? (e.stack ?? e.message) : e);
  process.exit(1);
});
