/**
 * What the grid runner and its worker threads exchange (kept tiny so a worker loads little).
 */
import type { SurfaceOutput, TargetSource } from "./batch";
import type { SerializedKrigingModel } from "./serialize";

/** Message from a worker. */
export type WorkerMessage =
  | { type: "progress"; cells: number }
  | { type: "done" }
  | { type: "error"; code: string; message: string; field?: string };

/** What a worker receives (structured-cloned; typed arrays over SharedArrayBuffer are shared). */
export interface WorkerJob {
  models: SerializedKrigingModel[];
  distanceMatrix: Float64Array;
  source: TargetSource;
  drifts: (Float64Array | null)[];
  outputs: SurfaceOutput[];
  mask: Uint8Array | null;
  /** Int32 slots: CONTROL_NEXT (start of the next unclaimed chunk), CONTROL_ABORT (1 = stop). */
  control: Int32Array;
  total: number;
  chunk: number;
}

export const CONTROL_NEXT = 0;
export const CONTROL_ABORT = 1;
