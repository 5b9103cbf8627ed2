import "server-only";
import { existsSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { env } from "@/lib/env";
import { spatialOrder } from "@/lib/geostats/order";
import { BATCH_TAIL_TEXT, type BatchItems, batchHeadText, batchItems, siteAnswerText } from "@/lib/lookup/prediction-answer";
import { resultsCsvRows } from "@/lib/lookup/results-csv";
import type { SiteInput } from "./prediction";
import { PREDICTORS_KEPT, type PoolReply, type PoolTask } from "./predict-protocol";
import type { SourcedPredictor } from "./predictor";

// Site lookups answered on worker threads, so the request thread only does the HTTP work
// (caller, key, quota, headers) and a 2-core machine uses both cores: a single lookup is one
// task; an API batch is put in spatial order and cut into chunks the threads answer in parallel
// (batchBody); the batch page's results file is made chunk by chunk (csvRows). Each thread builds
// an edition's predictor from the same EditionSource the request thread's cached predictor came
// from (lib/editions/site-model.ts) and writes the same text (lib/lookup/prediction-answer.ts,
// lib/lookup/results-csv.ts), so where an answer is computed never changes it.
//
// Threads start with the server (instrumentation.ts) or at the first lookup, running the
// TypeScript sources through tsx like the kriging grid workers; until they are ready, and with
// PREDICT_THREADS=0, lookups are answered inline on the request's thread. A thread that dies is
// replaced; its unfinished tasks are answered inline.

/** Sites per batch chunk: a chunk takes ~0.1 s, so a single lookup never waits long behind a batch. */
export const BATCH_CHUNK = 500;
/** Chunks of one batch in flight per thread (the next is queued while the thread works). */
const IN_FLIGHT_PER_THREAD = 2;

type TaskReply = Exclude<PoolReply, { ready: true }>;

type Pending = { resolve: (r: TaskReply) => void; reject: (e: Error) => void; cost: number };

/** `loaded`: the edition builds the thread keeps, least recently used first — the same list the thread keeps, since both see the tasks in the same order. */
type Slot = { worker: Worker; ready: boolean; loaded: Map<string, true>; pending: Map<number, Pending>; load: number; outbox: PoolTask[] };

function bootstrapPaths(): { bootstrap: string; entry: string } | null {
  const root = process.cwd();
  const bootstrap = path.join(root, "lib", "geostats", "worker-bootstrap.cjs");
  const entry = path.join(root, "lib", "editions", "predict-worker.ts");
  return existsSync(bootstrap) && existsSync(entry) ? { bootstrap, entry } : null;
}

export class PredictPool {
  private readonly slots: (Slot | null)[];
  private nextId = 1;
  private readonly paths = bootstrapPaths();

  constructor(readonly threads: number) {
    this.slots = new Array(threads).fill(null);
    if (!this.paths && threads > 0) console.warn("[rainprint] prediction worker sources not found; site lookups run on the request thread");
    for (let i = 0; i < threads && this.paths; i++) this.spawn(i);
  }

  private spawn(i: number): void {
    const paths = this.paths!;
    const worker = new Worker(paths.bootstrap, { workerData: { entryPath: paths.entry }, execArgv: [] });
    worker.unref();
    const slot: Slot = { worker, ready: false, loaded: new Map(), pending: new Map(), load: 0, outbox: [] };
    this.slots[i] = slot;
    worker.on("message", (m: PoolReply | PoolReply[]) => {
      for (const r of Array.isArray(m) ? m : [m]) {
        if ("ready" in r) {
          slot.ready = true;
          continue;
        }
        const p = slot.pending.get(r.id);
        if (!p) continue;
        slot.pending.delete(r.id);
        slot.load -= p.cost;
        p.resolve(r);
      }
    });
    const fail = (e: Error) => {
      if (this.slots[i] !== slot) return;
      this.slots[i] = null;
      console.error("[rainprint] a prediction worker stopped; starting another", e);
      for (const p of slot.pending.values()) p.reject(e);
      slot.pending.clear();
      const t = setTimeout(() => this.spawn(i), 1000);
      t.unref();
    };
    worker.on("error", fail);
    worker.on("exit", (code) => fail(new Error(`prediction worker exited with code ${code}`)));
  }

  /** The ready thread with the least work queued, or null (answer inline). */
  private pick(): Slot | null {
    let best: Slot | null = null;
    for (const s of this.slots) if (s?.ready && (!best || s.load < best.load)) best = s;
    return best;
  }

  /** Resolves once every thread is ready (tests, warm-up); rejects after `timeoutMs`. */
  async whenReady(timeoutMs = 60_000): Promise<void> {
    const until = Date.now() + timeoutMs;
    while (this.slots.some((s) => !s?.ready)) {
      if (!this.paths) throw new Error("prediction worker sources not found");
      if (Date.now() > until) throw new Error(`prediction workers not ready within ${timeoutMs / 1000} s`);
      await new Promise((r) => setTimeout(r, 20));
    }
  }

  /** Terminate one thread as if it had crashed (tests). */
  async terminateOneForTests(): Promise<void> {
    await this.slots.find((x) => x)?.worker.terminate();
  }

  /** Stop every thread (tests). */
  async close(): Promise<void> {
    const slots = this.slots.splice(0);
    await Promise.all(slots.map((s) => s?.worker.terminate()));
  }

  private send(slot: Slot, predictor: SourcedPredictor, task: Omit<PoolTask, "id" | "token" | "source"> & Partial<PoolTask>, cost: number): Promise<TaskReply> {
    const id = this.nextId++;
    const full = { ...task, id, token: predictor.token } as PoolTask;
    if (!slot.loaded.delete(predictor.token)) full.source = predictor.source;
    slot.loaded.set(predictor.token, true);
    while (slot.loaded.size > PREDICTORS_KEPT) slot.loaded.delete(slot.loaded.keys().next().value as string);
    return new Promise((resolve, reject) => {
      slot.pending.set(id, { resolve, reject, cost });
      slot.load += cost;
      // tasks gathered during this turn of the event loop go in one message (a message costs ~0.1 ms)
      if (slot.outbox.push(full) === 1)
        setImmediate(() => {
          const tasks = slot.outbox.splice(0);
          if (this.slots.includes(slot)) slot.worker.postMessage(tasks);
          else for (const t of tasks) slot.pending.get(t.id)?.reject(new Error("the prediction worker stopped"));
        });
    });
  }

  /** A task answered with text, or by `inline` when no thread is ready or the thread dies on it. */
  private async textTask(predictor: SourcedPredictor, task: { kind: "site" | "csv" } & Partial<PoolTask>, cost: number, inline: () => string | Promise<string>): Promise<string> {
    const slot = this.pick();
    if (!slot) return inline();
    let r: TaskReply;
    try {
      r = await this.send(slot, predictor, task, cost);
    } catch {
      return inline(); // the thread died: answer here
    }
    if (!r.ok) throw new Error(r.message);
    if (!("text" in r)) throw new Error(`a prediction worker answered a ${task.kind} task without text`);
    return r.text;
  }

  /** The single-site answer (GET /api/v1/predict) as JSON text. */
  siteText(predictor: SourcedPredictor, site: SiteInput): Promise<string> {
    return this.textTask(predictor, { kind: "site", site }, 1, () => siteAnswerText(predictor, site));
  }

  /** Rows of the batch page's results file (lib/lookup/results-csv.ts) for consecutive sites; `notice` goes in the first row's notice column. */
  csvRows(predictor: SourcedPredictor, sites: SiteInput[], ids: string[], notice?: string): Promise<string> {
    return this.textTask(predictor, { kind: "csv", sites: packSites(sites), ids, notice }, sites.length, async () => {
      await new Promise((r) => setTimeout(r, 0)); // let other requests have a turn between chunks
      return resultsCsvRows(predictor.predictMany(sites), ids, notice);
    });
  }

  /**
   * The batch answer (POST /api/v1/predict) as a stream of UTF-8 JSON: the head, the results in
   * the order sent, the tail. Every site is predicted before this resolves (so a failure is an
   * error answer, not a cut-off one): the sites are put in spatial order — neighbouring sites
   * share factorised kriging systems, which halves the work for scattered sites — and cut into
   * chunks the threads answer in parallel. Sites must be in range (checked before). An aborted
   * `signal` stops handing out chunks and rejects.
   */
  async batchBody(predictor: SourcedPredictor, sites: SiteInput[], ids: string[], signal?: AbortSignal): Promise<ReadableStream<Uint8Array>> {
    const n = sites.length;
    const xy = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      xy[2 * i] = sites[i].lon;
      xy[2 * i + 1] = sites[i].lat;
    }
    const order = spatialOrder(xy) ?? Int32Array.from({ length: n }, (_, i) => i);
    const chunks = Math.ceil(n / BATCH_CHUNK);
    const answered: BatchItems[] = new Array(chunks);
    const names = new Map<string, string>();
    const inline = async (c: number, chunkSites: SiteInput[], chunkIds: string[]) => {
      await new Promise((r) => setTimeout(r, 0)); // let other requests have a turn between chunks
      answered[c] = batchItems(predictor, chunkSites, chunkIds, names);
    };
    const answer = async (c: number) => {
      const a = c * BATCH_CHUNK;
      const b = Math.min(n, a + BATCH_CHUNK);
      const chunkSites = new Array<SiteInput>(b - a);
      const chunkIds = new Array<string>(b - a);
      for (let j = a; j < b; j++) {
        chunkSites[j - a] = sites[order[j]];
        chunkIds[j - a] = ids[order[j]];
      }
      const slot = this.pick();
      if (!slot) return inline(c, chunkSites, chunkIds);
      let r: TaskReply;
      try {
        r = await this.send(slot, predictor, { kind: "batch", sites: packSites(chunkSites), ids: chunkIds }, b - a);
      } catch {
        return inline(c, chunkSites, chunkIds); // the thread died: answer this chunk here
      }
      if (!r.ok) throw new Error(r.message);
      if (!("offsets" in r)) throw new Error("a prediction worker answered a batch chunk without results");
      answered[c] = { bytes: r.bytes, offsets: r.offsets };
    };
    // a few chunks in flight per thread, handed out in order as answers come back
    let next = 0;
    const lanes = Math.max(1, this.slots.filter((x) => x?.ready).length) * IN_FLIGHT_PER_THREAD;
    await Promise.all(
      Array.from({ length: Math.min(lanes, chunks) }, async () => {
        while (next < chunks) {
          signal?.throwIfAborted();
          await answer(next++);
        }
      }),
    );
    return batchAnswerStream(predictor, answered, order);
  }
}

/** Sites as the threads take them: lat, lon, elevation (NaN = none) per site. */
function packSites(sites: SiteInput[]): Float64Array {
  const packed = new Float64Array(3 * sites.length);
  sites.forEach((s, k) => {
    packed[3 * k] = s.lat;
    packed[3 * k + 1] = s.lon;
    packed[3 * k + 2] = s.elevationM ?? Number.NaN;
  });
  return packed;
}

/** The batch answer: head, results in the order sent (copied out of the chunks, which were cut in spatial `order`), tail. */
function batchAnswerStream(predictor: SourcedPredictor, answered: BatchItems[], order: Int32Array): ReadableStream<Uint8Array> {
  const n = order.length;
  const rank = new Uint32Array(n);
  for (let j = 0; j < n; j++) rank[order[j]] = j;
  const encoder = new TextEncoder();
  const COMMA = 0x2c;
  let i = 0;
  return new ReadableStream<Uint8Array>({
    start(controller) {
      controller.enqueue(encoder.encode(batchHeadText(predictor, n)));
    },
    pull(controller) {
      // results in the order sent, ~BATCH_CHUNK per piece, copied out of the chunks' bytes
      const end = Math.min(n, i + BATCH_CHUNK);
      let size = 0;
      for (let k = i; k < end; k++) {
        const j = rank[k];
        const o = answered[Math.floor(j / BATCH_CHUNK)].offsets;
        size += o[(j % BATCH_CHUNK) + 1] - o[j % BATCH_CHUNK] + (k ? 1 : 0);
      }
      const piece = new Uint8Array(size);
      let at = 0;
      for (; i < end; i++) {
        const j = rank[i];
        const { bytes, offsets } = answered[Math.floor(j / BATCH_CHUNK)];
        if (i) piece[at++] = COMMA;
        const from = offsets[j % BATCH_CHUNK];
        const to = offsets[(j % BATCH_CHUNK) + 1];
        piece.set(bytes.subarray(from, to), at);
        at += to - from;
      }
      controller.enqueue(piece);
      if (i >= n) {
        controller.enqueue(encoder.encode(BATCH_TAIL_TEXT));
        controller.close();
      }
    },
  });
}

const globalForPool = globalThis as unknown as { __rainprintPredictPool?: PredictPool };

/** Threads by default: one per core, at most 4. */
export function defaultPredictThreads(): number {
  return Math.min(4, os.availableParallelism());
}

/** The process's prediction pool (started at first use). */
export function predictPool(): PredictPool {
  return (globalForPool.__rainprintPredictPool ??= new PredictPool(env().PREDICT_THREADS ?? defaultPredictThreads()));
}
