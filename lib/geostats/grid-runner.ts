/**
 * Multi-threaded kriging of grids and large target sets with worker_threads (Node scripts, the
 * CLI and the job worker only — not imported by `lib/geostats/index.ts`, so the pure engine stays
 * importable from Next.js server code).
 *
 * Work is split into chunks of consecutive cells that the workers claim from a shared counter,
 * so neighbouring cells (which usually share a neighbour set, hence a factorised system) stay
 * in one worker. Results are written straight into SharedArrayBuffer-backed planes: value and
 * variance per model, Float32 by default. Cells with mask 0 are NaN. Cancellable with an
 * AbortSignal; reports progress.
 *
 * Worker threads run TypeScript through a small .mjs bootstrap that loads the worker with tsx's
 * `tsImport` when the engine runs from .ts sources (tsx CLI, vitest); compiled .js runs as is.
 */
import os from "node:os";
import { setImmediate as yieldToEventLoop } from "node:timers/promises";
import { fileURLToPath } from "node:url";
import { Worker } from "node:worker_threads";
import { SurfaceBatch, type SurfaceOutput, type TargetSource, unpermute } from "./batch";
import { GeostatsError } from "./errors";
import { type GridSpec, checkGrid } from "./grid";
import { type KrigingModel, readTargetDrift } from "./kriging";
import { CONTROL_ABORT, CONTROL_NEXT, type WorkerJob, type WorkerMessage } from "./grid-protocol";
import { permuteRows, spatialOrder } from "./order";
import { serializeKrigingModel } from "./serialize";
import { type PointsInput, readPoints, normaliseCoordinates } from "./stations";

export interface ParallelOptions {
  /** Worker threads; default: all cores (os.availableParallelism()). 0 or 1 runs in this thread. */
  threads?: number;
  signal?: AbortSignal;
  /** Called after each chunk with the number of targets done so far. */
  onProgress?: (progress: { done: number; total: number }) => void;
  /** Compute variances (default true). */
  variance?: boolean;
  /** Output planes: "float32" (default) or "float64". */
  precision?: "float32" | "float64";
  /** Targets per chunk claimed by a worker (default: a few rows of the grid, or 2048 points). */
  chunk?: number;
  /**
   * Below this many targets the work runs in the calling thread (worker start-up costs a few
   * hundred milliseconds). Default 20,000.
   */
  inlineBelow?: number;
}

export interface GridOptions extends ParallelOptions {
  grid: GridSpec;
  /** One model or several on the same StationSet (their neighbour search is shared). */
  models: KrigingModel | readonly KrigingModel[];
  /** Per model: drift covariates per cell (cells × q, row-major), or null for models without drift. */
  drifts?: readonly (Float64Array | Float32Array | null | undefined)[];
  /** Optional mask, one byte per cell: 0 = skip (NaN). */
  mask?: Uint8Array;
}

export interface TargetsOptions extends ParallelOptions {
  targets: PointsInput;
  models: KrigingModel | readonly KrigingModel[];
  /** Per model: drift covariates per target (rows of q numbers or a flat targets × q array). */
  drifts?: readonly (ArrayLike<ArrayLike<number>> | Float64Array | Float32Array | null | undefined)[];
}

/** Krige every cell of a regular grid (north-up, see grid.ts); one {value, variance} per model. */
export async function krigeGrid(options: GridOptions): Promise<SurfaceOutput[]> {
  const grid = checkGrid(options.grid);
  const total = grid.nx * grid.ny;
  const models = asList(options.models);
  if (options.mask && options.mask.length !== total) {
    throw new GeostatsError("invalid-input", `mask must have one byte per cell (${total})`, "mask");
  }
  const drifts = models.map((m, i) => readTargetDrift(options.drifts?.[i] ?? undefined, total, m.driftCovariates));
  return run(models, { kind: "grid", grid }, total, drifts, options.mask ?? null, { chunk: Math.max(grid.nx, 1024), ...options });
}

/** Krige an explicit list of targets; one {value, variance} per model. */
export async function krigeTargets(options: TargetsOptions): Promise<SurfaceOutput[]> {
  const models = asList(options.models);
  const xy = readPoints(options.targets, "targets");
  normaliseCoordinates(xy, models[0].coordinates, "targets");
  const total = xy.length >> 1;
  const drifts = models.map((m, i) => readTargetDrift(options.drifts?.[i] ?? undefined, total, m.driftCovariates));
  // work in the targets' kd order (neighbouring targets reuse factorised systems), answer in theirs
  const order = spatialOrder(xy);
  if (!order) return run(models, { kind: "points", xy }, total, drifts, null, { chunk: 2048, ...options });
  const sortedDrifts = drifts.map((d, i) => (d ? permuteRows(d, order, models[i].driftCovariates) : null));
  const planes = await run(models, { kind: "points", xy: permuteRows(xy, order, 2) }, total, sortedDrifts, null, { chunk: 2048, ...options });
  return unpermute(planes, order);
}

function asList(models: KrigingModel | readonly KrigingModel[]): readonly KrigingModel[] {
  const list = Array.isArray(models) ? (models as readonly KrigingModel[]) : [models as KrigingModel];
  if (list.length === 0) throw new GeostatsError("invalid-input", "at least one model is needed", "models");
  const set = list[0].stations;
  if (list.some((m) => m.stations !== set)) {
    throw new GeostatsError("invalid-input", "all models must share one StationSet (pass `stations` to createKrigingModel)", "models");
  }
  return list;
}

function shared<T extends Float64Array | Float32Array | Uint8Array>(a: T, Ctor: { new (b: SharedArrayBuffer): T; BYTES_PER_ELEMENT: number }): T {
  if (a.buffer instanceof SharedArrayBuffer && a.constructor === Ctor) return a;
  const out = new Ctor(new SharedArrayBuffer(a.length * Ctor.BYTES_PER_ELEMENT));
  (out as unknown as { set(x: ArrayLike<number>): void }).set(a);
  return out;
}

async function run(
  models: readonly KrigingModel[],
  source: TargetSource,
  total: number,
  drifts: (Float64Array | null)[],
  mask: Uint8Array | null,
  options: ParallelOptions & { chunk: number },
): Promise<SurfaceOutput[]> {
  const signal = options.signal;
  if (signal?.aborted) throw abortError();
  const wantVar = options.variance ?? true;
  const f64 = options.precision === "float64";
  const threadsWanted = options.threads ?? (typeof os.availableParallelism === "function" ? os.availableParallelism() : os.cpus().length);
  const inline = threadsWanted <= 1 || total < (options.inlineBelow ?? 20_000);
  const chunk = Math.max(1, Math.floor(options.chunk));

  const alloc = (): Float64Array | Float32Array => {
    const bytes = total * (f64 ? 8 : 4);
    const buf = inline ? new ArrayBuffer(bytes) : new SharedArrayBuffer(bytes);
    return f64 ? new Float64Array(buf) : new Float32Array(buf);
  };
  const outputs: SurfaceOutput[] = models.map(() => ({ value: alloc(), variance: wantVar ? alloc() : null }));

  if (inline) {
    const batch = new SurfaceBatch(models);
    for (let start = 0; start < total; start += chunk) {
      if (signal?.aborted) throw abortError();
      const end = Math.min(total, start + chunk);
      batch.run(source, start, end, drifts, outputs, start, mask);
      options.onProgress?.({ done: end, total });
      if (end < total) await yieldToEventLoop();
    }
    return outputs;
  }

  // ---- worker threads, with this thread working alongside them
  const threads = Math.max(1, Math.min(threadsWanted, Math.ceil(total / chunk)));
  const control = new Int32Array(new SharedArrayBuffer(8));
  const dedup = new Map<Float64Array, Float64Array>();
  const sharedDrifts = drifts.map((d) => {
    if (!d) return null;
    let s = dedup.get(d);
    if (!s) {
      s = shared(d, Float64Array);
      dedup.set(d, s);
    }
    return s;
  });
  const sharedSource: TargetSource = source.kind === "points" ? { kind: "points", xy: shared(source.xy, Float64Array) } : source;
  const sharedMask = mask ? shared(mask, Uint8Array) : null;
  const job: WorkerJob = {
    models: models.map((m) => serializeKrigingModel(m)),
    distanceMatrix: models[0].stations.sharedDistanceMatrix(),
    source: sharedSource,
    drifts: sharedDrifts,
    outputs,
    mask: sharedMask,
    control,
    total,
    chunk,
  };
  const bootstrap = fileURLToPath(new URL("./worker-bootstrap.cjs", import.meta.url));
  const entryPath = fileURLToPath(new URL(import.meta.url.endsWith(".ts") ? "./grid-worker.ts" : "./grid-worker.js", import.meta.url));

  const workers: Worker[] = [];
  const doneWorkers = new Set<Worker>();
  let done = 0;
  let failure: Error | null = null;
  let resolveWorkers: () => void = () => {};
  const workersDone = new Promise<void>((resolve) => (resolveWorkers = resolve));
  const progress = (cells: number): void => {
    done += cells;
    try {
      options.onProgress?.({ done, total });
    } catch (e) {
      fail(e instanceof Error ? e : new Error(String(e)));
    }
  };
  const fail = (e: Error): void => {
    if (failure) return;
    failure = e;
    Atomics.store(control, CONTROL_ABORT, 1);
    for (const w of workers) void w.terminate();
    resolveWorkers();
  };
  const onAbort = (): void => fail(abortError());
  signal?.addEventListener("abort", onAbort, { once: true });
  // threads − 1 workers; this thread is the last one
  for (let i = 0; i < threads - 1; i++) {
    const w = new Worker(bootstrap, { workerData: { entryPath, job }, execArgv: [] });
    workers.push(w);
    w.on("message", (msg: WorkerMessage) => {
      if (failure) return;
      if (msg.type === "progress") progress(msg.cells);
      else if (msg.type === "error") fail(new GeostatsError((msg.code as GeostatsError["code"]) ?? "invalid-input", msg.message, msg.field));
      else if (msg.type === "done") {
        doneWorkers.add(w);
        if (doneWorkers.size === workers.length) resolveWorkers();
      }
    });
    w.on("error", (e) => fail(e instanceof Error ? e : new Error(String(e))));
    w.on("exit", (code) => {
      if (!failure && !doneWorkers.has(w)) fail(new Error(`kriging worker stopped unexpectedly (exit code ${code})`));
    });
  }
  if (workers.length === 0) resolveWorkers();
  try {
    const batch = new SurfaceBatch(models);
    while (!failure && Atomics.load(control, CONTROL_ABORT) === 0) {
      const start = Atomics.add(control, CONTROL_NEXT, chunk);
      if (start >= total) break;
      const end = Math.min(total, start + chunk);
      batch.run(sharedSource, start, end, sharedDrifts, outputs, start, sharedMask);
      progress(end - start);
      await yieldToEventLoop(); // let worker messages and the abort signal through
    }
  } catch (e) {
    fail(e instanceof Error ? e : new Error(String(e)));
  }
  await workersDone;
  signal?.removeEventListener("abort", onAbort);
  if (failure) throw failure;
  return outputs;
}

function abortError(): GeostatsError {
  return new GeostatsError("aborted", "kriging was cancelled");
}
