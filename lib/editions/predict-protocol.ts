import type { SiteInput } from "./prediction";
import type { EditionSource } from "./site-model";

// Messages between lib/editions/predict-pool.ts and its worker threads (lib/editions/predict-worker.ts):
// tasks go to a thread in arrays, answers come back in arrays (the thread announces itself with one { ready }).

/** Edition predictors a thread keeps (least recently used dropped); the pool mirrors the list to know when to send a source again. */
export const PREDICTORS_KEPT = 4;

/** A task; `source` comes with a worker's first task for an edition build (`token`). */
export type PoolTask =
  | { id: number; kind: "site"; token: string; source?: EditionSource; site: SiteInput }
  | {
      id: number;
      kind: "batch";
      token: string;
      source?: EditionSource;
      /** lat, lon, elevation (NaN = none) per site. */
      sites: Float64Array;
      ids: string[];
    }
  | {
      id: number;
      kind: "csv";
      token: string;
      source?: EditionSource;
      /** As for "batch". */
      sites: Float64Array;
      ids: string[];
      /** For the first row's notice column (the first chunk of a results file). */
      notice?: string;
    };

/** A worker's answer: JSON text of a site or results-file rows (`text`), a batch chunk's results (lib/lookup/prediction-answer.ts BatchItems), or what went wrong. */
export type PoolReply =
  | { ready: true }
  | { id: number; ok: true; text: string }
  | { id: number; ok: true; bytes: Uint8Array; offsets: Uint32Array }
  | { id: number; ok: false; message: string };
