// A prediction worker thread (started by lib/editions/predict-pool.ts through
// lib/geostats/worker-bootstrap.cjs): builds an edition's site predictor from the EditionSource
// the pool sends with its first task for that edition, then answers site lookups and batch
// chunks as JSON text — the same text the main thread writes inline (lib/lookup/prediction-answer.ts).
import { parentPort } from "node:worker_threads";
import { batchItems, siteAnswerText } from "../lookup/prediction-answer";
import { resultsCsvRows } from "../lookup/results-csv";
import type { SiteInput } from "./prediction";
import { PREDICTORS_KEPT, type PoolReply, type PoolTask } from "./predict-protocol";
import { type LoadedEditionPredictor, predictorFromSource } from "./site-model";

/** Predictors per edition build token (most recently used last; the pool keeps the same list). */
const predictors = new Map<string, { predictor: LoadedEditionPredictor; names: Map<string, string> }>();

function predictorFor(task: PoolTask): { predictor: LoadedEditionPredictor; names: Map<string, string> } {
  let hit = predictors.get(task.token);
  if (task.source && !hit) {
    hit = { predictor: predictorFromSource(task.source), names: new Map() };
  }
  if (!hit) throw new Error(`edition build ${task.token} was never sent to this worker`);
  predictors.delete(task.token);
  predictors.set(task.token, hit);
  while (predictors.size > PREDICTORS_KEPT) predictors.delete(predictors.keys().next().value as string);
  return hit;
}

function sitesOf(packed: Float64Array): SiteInput[] {
  const n = packed.length / 3;
  const sites: SiteInput[] = new Array(n);
  for (let i = 0; i < n; i++) {
    const e = packed[3 * i + 2];
    sites[i] = { lat: packed[3 * i], lon: packed[3 * i + 1], elevationM: Number.isNaN(e) ? null : e };
  }
  return sites;
}

const port = parentPort;
if (!port) throw new Error("predict-worker.ts runs as a worker thread");

/** One task's answer, and the buffers to transfer with it. */
function answer(task: PoolTask): { reply: PoolReply; transfer: ArrayBuffer[] } {
  try {
    const { predictor, names } = predictorFor(task);
    if (task.kind === "site") return { reply: { id: task.id, ok: true, text: siteAnswerText(predictor, task.site) }, transfer: [] };
    if (task.kind === "csv") return { reply: { id: task.id, ok: true, text: resultsCsvRows(predictor.predictMany(sitesOf(task.sites)), task.ids, task.notice) }, transfer: [] };
    const { bytes, offsets } = batchItems(predictor, sitesOf(task.sites), task.ids, names);
    return { reply: { id: task.id, ok: true, bytes, offsets }, transfer: [bytes.buffer as ArrayBuffer, offsets.buffer as ArrayBuffer] };
  } catch (e) {
    return { reply: { id: task.id, ok: false, message: e instanceof Error ? e.message : String(e) }, transfer: [] };
  }
}

// Tasks come in arrays (the pool sends what gathered during one turn of its event loop) and
// answers go back in arrays: one message each way for many single-site lookups. Answers so far
// are sent before a chunk of many sites is started, so single lookups never wait for it.
port.on("message", (tasks: PoolTask[]) => {
  let replies: PoolReply[] = [];
  let transfer: ArrayBuffer[] = [];
  const flush = () => {
    if (replies.length) port.postMessage(replies, transfer);
    replies = [];
    transfer = [];
  };
  for (const task of tasks) {
    if (task.kind !== "site") flush();
    const a = answer(task);
    replies.push(a.reply);
    transfer.push(...a.transfer);
  }
  flush();
});

port.postMessage({ ready: true } satisfies PoolReply);
