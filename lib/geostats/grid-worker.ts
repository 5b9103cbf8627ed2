/**
 * Worker-thread side of the grid runner: rebuilds the station set (sharing the parent's distance
 * matrix) and the models, then claims chunks of targets from the shared counter until none are
 * left or the job is aborted, writing into the shared output planes.
 */
import { parentPort, workerData } from "node:worker_threads";
import { SurfaceBatch } from "./batch";
import { isGeostatsError } from "./errors";
import { CONTROL_ABORT, CONTROL_NEXT, type WorkerJob, type WorkerMessage } from "./grid-protocol";
import { restoreKrigingModel } from "./serialize";
import { StationSet } from "./stations";

function main(): void {
  const port = parentPort;
  if (!port) throw new Error("grid-worker must run in a worker thread");
  const job = (workerData as { job: WorkerJob }).job;
  try {
    const first = job.models[0].header;
    const stations = new StationSet({ coordinates: first.coordinates, points: job.models[0].arrays.points, distanceMatrix: job.distanceMatrix });
    const models = job.models.map((m) => restoreKrigingModel(m, { stations }));
    const batch = new SurfaceBatch(models);
    for (;;) {
      if (Atomics.load(job.control, CONTROL_ABORT) !== 0) break;
      const start = Atomics.add(job.control, CONTROL_NEXT, job.chunk);
      if (start >= job.total) break;
      const end = Math.min(job.total, start + job.chunk);
      batch.run(job.source, start, end, job.drifts, job.outputs, start, job.mask);
      port.postMessage({ type: "progress", cells: end - start } satisfies WorkerMessage);
    }
    port.postMessage({ type: "done" } satisfies WorkerMessage);
  } catch (e) {
    const msg: WorkerMessage = isGeostatsError(e)
      ? { type: "error", code: e.code, message: e.message, field: e.field }
      : { type: "error", code: "invalid-input", message: e instanceof Error ? e.message : String(e) };
    Atomics.store(job.control, CONTROL_ABORT, 1);
    port.postMessage(msg);
  }
}

main();
