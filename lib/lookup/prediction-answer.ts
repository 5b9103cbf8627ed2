import type { LoadedEditionPredictor } from "@/lib/editions/site-model";
import type { Estimate, SiteInput, SitePrediction } from "@/lib/editions/prediction";
import { SYNTHETIC_NOTICE } from "@/lib/api/v1/common";
import { writeBatchItem } from "./batch-json";
import { citationLine } from "./citation";

// The public API's site-lookup answers as JSON text (GET and POST /api/v1/predict). Pure: the
// route handlers and the prediction worker threads (lib/editions/predict-worker.ts) write the
// same text from the same predictor. The documented shapes are the zod schemas in
// lib/api/v1/predict.ts (tests check these answers against them).

/** x rounded to `d` decimals, as a number (toFixed's decimal rounding; the JSON writer below uses the same). */
const fx = (x: number, d: number) => Number(x.toFixed(d));
const r3 = (x: number) => fx(x, 3);
const est = (e: Estimate) => ({ value: r3(e.value), sd: r3(e.sd), lower95: r3(e.lower95), upper95: r3(e.upper95) });
const period = (p: SitePrediction["annual"]) => ({ d18O: est(p.d18O), d2H: est(p.d2H), dExcess: est(p.dExcess), precipMm: p.precipMm ? est(p.precipMm) : null });
const orNull = (x: number, digits: number) => (Number.isFinite(x) ? fx(x, digits) : null);

/** A prediction as the API answers it (‰ to 0.001, km to 0.1, weights to 0.0001). */
export function apiPrediction(p: SitePrediction, predictor: Pick<LoadedEditionPredictor, "edition">, id?: string) {
  const e = predictor.edition;
  return {
    edition: p.edition,
    citation: citationLine(e, p.site),
    site: {
      ...(id === undefined ? {} : { id }),
      lat: p.site.lat,
      lon: p.site.lon,
      elevationM: p.site.elevationM,
      seaLevelEquivalent: p.site.elevationM === null,
      extrapolation: p.site.extrapolation,
      nearestStationKm: fx(p.site.nearestStationKm, 1),
      extrapolationKm: p.site.extrapolationKm,
    },
    annual: period(p.annual),
    monthly: p.monthly.map((m) => ({ month: m.month, ...period(m) })),
    waterLine: {
      slope: orNull(p.waterLine.slope, 4),
      intercept: orNull(p.waterLine.intercept, 3),
      slopeSE: orNull(p.waterLine.slopeSE, 4),
      interceptSE: orNull(p.waterLine.interceptSE, 3),
      r2: orNull(p.waterLine.r2, 4),
      method: p.waterLine.method,
    },
    stations: p.stations.map((s) => ({ code: s.code, name: s.name, distanceKm: fx(s.distanceKm, 1), weight: fx(s.weight, 4) })),
    synthetic: e.isDemo,
    ...(e.isDemo ? { notice: SYNTHETIC_NOTICE } : {}),
  };
}


/** The single-site answer as JSON text. */
export function siteAnswerText(predictor: LoadedEditionPredictor, site: SiteInput): string {
  return JSON.stringify(apiPrediction(predictor.predict(site), predictor));
}

/** The batch answer up to its first result: `{"edition":…,"citation":…,"count":…,"synthetic":…,"notice":…,"results":[`. */
export function batchHeadText(predictor: Pick<LoadedEditionPredictor, "edition" | "editionId">, count: number): string {
  const e = predictor.edition;
  const head = {
    edition: predictor.editionId,
    citation: `Rainprint (${e.publishedAt ? e.publishedAt.getUTCFullYear() : "n.d."}). Predicted precipitation δ18O, δ2H and d-excess at the sites listed; edition ${predictor.editionId}${
      e.publishedAt ? ` (published ${e.publishedAt.toISOString().slice(0, 10)})` : ""
    }, regression-kriging with 95% intervals. Licence CC BY 4.0.${e.isDemo ? " Synthetic demo data." : ""}`,
    count,
    synthetic: e.isDemo,
    ...(e.isDemo ? { notice: SYNTHETIC_NOTICE } : {}),
  };
  return `${JSON.stringify(head).slice(0, -1)},"results":[`;
}

/** What closes the batch answer after its last result. */
export const BATCH_TAIL_TEXT = "]}";

/** Results of a batch's sites as UTF-8 JSON, one after another without separators; site k is bytes[offsets[k], offsets[k+1]). */
export interface BatchItems {
  bytes: Uint8Array;
  offsets: Uint32Array;
}

const encoder = new TextEncoder();

/**
 * The results of `sites` (best in spatial order: neighbouring sites share factorised kriging
 * systems) as UTF-8 JSON items. `names`: JSON heads of stations already written (a cache).
 */
export function batchItems(predictor: LoadedEditionPredictor, sites: SiteInput[], ids: string[], names: Map<string, string> = new Map()): BatchItems {
  const preds = predictor.predictMany(sites);
  const offsets = new Uint32Array(preds.length + 1);
  let bytes = new Uint8Array(Math.max(1024, preds.length * 6000));
  let at = 0;
  const out: string[] = [];
  for (let i = 0; i < preds.length; i++) {
    out.length = 0;
    writeBatchItem(out, preds[i], ids[i], names);
    const text = out.join("");
    // a UTF-8 byte is at most 3 per UTF-16 unit
    if (bytes.length - at < 3 * text.length) {
      const grown = new Uint8Array(Math.max(2 * bytes.length, at + 3 * text.length));
      grown.set(bytes.subarray(0, at));
      bytes = grown;
    }
    at += encoder.encodeInto(text, bytes.subarray(at)).written;
    offsets[i + 1] = at;
  }
  return { bytes: bytes.slice(0, at), offsets }; // a copy of the used part: the working buffer is ~30% larger
}
