/**
 * Storing and reloading fitted kriging models. A serialised model is a small JSON header plus
 * typed arrays (station coordinates, values, drift covariates) — editions store these, site
 * lookups reload them. Restoring recomputes the distance matrix and factorisations (milliseconds
 * for a few hundred stations), so stored models stay small and version-independent.
 */
import { type CoordinateSystem } from "./distance";
import { GeostatsError } from "./errors";
import { KrigingModel } from "./kriging";
import { StationSet } from "./stations";
import { type VariogramModel, checkVariogram } from "./variogram";

export const MODEL_FORMAT = "rainprint.kriging-model";
export const MODEL_FORMAT_VERSION = 1;

export interface KrigingModelHeader {
  format: typeof MODEL_FORMAT;
  version: number;
  coordinates: CoordinateSystem;
  /** Number of stations. */
  stations: number;
  variogram: VariogramModel;
  maxNeighbors: number | null;
  /** Drift covariates per station (0 = ordinary kriging). */
  driftCovariates: number;
}

export interface SerializedKrigingModel {
  header: KrigingModelHeader;
  arrays: {
    /** Interleaved station coordinates [x0, y0, …] (lonlat: longitude normalised to (−180, 180]). */
    points: Float64Array;
    values: Float64Array;
    /** Drift covariates, stations × driftCovariates row-major (no intercept column), or null. */
    drift: Float64Array | null;
  };
}

/** The same content with plain number arrays: safe to JSON.stringify (doubles round-trip exactly). */
export interface KrigingModelJSON {
  header: KrigingModelHeader;
  arrays: { points: number[]; values: number[]; drift: number[] | null };
}

export function serializeKrigingModel(model: KrigingModel): SerializedKrigingModel {
  const n = model.stations.count;
  const q = model.driftCovariates;
  const p = q + 1;
  let drift: Float64Array | null = null;
  if (q > 0) {
    drift = new Float64Array(n * q);
    for (let i = 0; i < n; i++) for (let j = 0; j < q; j++) drift[i * q + j] = model.design[i * p + j + 1];
  }
  return {
    header: {
      format: MODEL_FORMAT,
      version: MODEL_FORMAT_VERSION,
      coordinates: model.coordinates,
      stations: n,
      variogram: { ...model.variogram },
      maxNeighbors: model.maxNeighbors,
      driftCovariates: q,
    },
    arrays: { points: Float64Array.from(model.stations.xy), values: Float64Array.from(model.values), drift },
  };
}

export function krigingModelToJSON(model: KrigingModel): KrigingModelJSON {
  const s = serializeKrigingModel(model);
  return {
    header: s.header,
    arrays: { points: Array.from(s.arrays.points), values: Array.from(s.arrays.values), drift: s.arrays.drift ? Array.from(s.arrays.drift) : null },
  };
}

export interface RestoreOptions {
  /**
   * Reuse this StationSet (its distance matrix and index) when the stored coordinates are the
   * same — restore all surfaces of an edition onto one set.
   */
  stations?: StationSet;
}

export function restoreKrigingModel(stored: SerializedKrigingModel | KrigingModelJSON, options: RestoreOptions = {}): KrigingModel {
  const h = stored?.header;
  if (!h || h.format !== MODEL_FORMAT) throw new GeostatsError("invalid-input", `not a ${MODEL_FORMAT} object`, "model");
  if (h.version !== MODEL_FORMAT_VERSION) {
    throw new GeostatsError("invalid-input", `unsupported model format version ${h.version} (this engine reads ${MODEL_FORMAT_VERSION})`, "model.version");
  }
  const n = h.stations;
  const points = Float64Array.from(stored.arrays.points);
  const values = Float64Array.from(stored.arrays.values);
  if (points.length !== 2 * n || values.length !== n) throw new GeostatsError("invalid-input", "stored arrays do not match the header's station count", "model.arrays");
  const q = h.driftCovariates;
  let drift: { points: number[][] } | undefined;
  if (q > 0) {
    const flat = stored.arrays.drift;
    if (!flat || flat.length !== n * q) throw new GeostatsError("invalid-input", "stored drift does not match the header", "model.arrays.drift");
    const rows: number[][] = [];
    for (let i = 0; i < n; i++) rows.push(Array.from({ length: q }, (_, j) => flat[i * q + j]));
    drift = { points: rows };
  }
  let stations = options.stations;
  if (stations) {
    let same = stations.coordinates === h.coordinates && stations.count === n;
    for (let i = 0; same && i < 2 * n; i++) same = stations.xy[i] === points[i];
    if (!same) throw new GeostatsError("invalid-input", "the given StationSet does not hold the stored model's stations", "stations");
  } else {
    stations = new StationSet({ coordinates: h.coordinates, points });
  }
  return new KrigingModel({ stations, values, variogram: checkVariogram(h.variogram), maxNeighbors: h.maxNeighbors, drift });
}
