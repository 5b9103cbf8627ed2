/**
 * Variogram models, the empirical (Matheron) semivariogram and weighted-least-squares fitting,
 * in the conventions of R's gstat: a model is nugget + one structure with partial sill `psill`
 * and range parameter `range` (for lonlat in km).
 */
import { GeostatsError } from "./errors";
import { leastSquares } from "./linalg";
import { type PointsInput, StationSet } from "./stations";
import { type CoordinateSystem, distance } from "./distance";

export type VariogramModelType = "spherical" | "exponential" | "gaussian";
export const VARIOGRAM_MODELS: readonly VariogramModelType[] = ["spherical", "exponential", "gaussian"];

export interface VariogramModel {
  model: VariogramModelType;
  /** Nugget (semivariance jump at h → 0⁺), value units squared. */
  nugget: number;
  /** Partial sill of the structure, value units squared. */
  psill: number;
  /** Range parameter: km for lonlat, coordinate units for planar (gstat's `range`). */
  range: number;
}

/** Check a variogram model; throws GeostatsError naming the field. */
export function checkVariogram(v: VariogramModel, field = "variogram"): VariogramModel {
  if (!v || !VARIOGRAM_MODELS.includes(v.model)) {
    throw new GeostatsError("invalid-input", `${field}.model must be one of ${VARIOGRAM_MODELS.join(", ")}`, `${field}.model`);
  }
  for (const key of ["nugget", "psill", "range"] as const) {
    if (typeof v[key] !== "number" || !Number.isFinite(v[key])) {
      throw new GeostatsError("invalid-input", `${field}.${key} must be a finite number`, `${field}.${key}`);
    }
  }
  if (v.nugget < 0) throw new GeostatsError("invalid-input", `${field}.nugget must not be negative`, `${field}.nugget`);
  if (v.psill < 0) throw new GeostatsError("invalid-input", `${field}.psill must not be negative`, `${field}.psill`);
  if (!(v.range > 0)) throw new GeostatsError("invalid-input", `${field}.range must be positive`, `${field}.range`);
  if (!(v.nugget + v.psill > 0)) {
    throw new GeostatsError("invalid-input", `${field}: nugget + psill must be positive`, `${field}.psill`);
  }
  return { model: v.model, nugget: v.nugget, psill: v.psill, range: v.range };
}

/**
 * The unit structure f(h) ∈ [0, 1] with range parameter a — gstat's conventions [pub]:
 * spherical 1.5(h/a) − 0.5(h/a)³ for h ≤ a, 1 beyond; exponential 1 − exp(−h/a);
 * gaussian 1 − exp(−(h/a)²).
 */
export function unitStructure(model: VariogramModelType, h: number, range: number): number {
  const t = h / range;
  switch (model) {
    case "spherical":
      return t >= 1 ? 1 : t * (1.5 - 0.5 * t * t);
    case "exponential":
      return 1 - Math.exp(-t);
    case "gaussian":
      return 1 - Math.exp(-t * t);
  }
}

/** Semivariance γ(h): 0 at h = 0, nugget + psill·f(h) for h > 0 (gstat [pub]). */
export function semivariance(v: VariogramModel, h: number): number {
  if (h === 0) return 0;
  return v.nugget + v.psill * unitStructure(v.model, h, v.range);
}

/**
 * Covariance C(h) = sill − γ(h) with sill = nugget + psill (gstat's covariance for bounded
 * models [pub]): nugget + psill at h = 0 (a point with itself, or a target exactly at a station),
 * psill·(1 − f(h)) for h > 0.
 */
export function covariance(v: VariogramModel, h: number): number {
  if (h === 0) return v.nugget + v.psill;
  return v.psill * (1 - unitStructure(v.model, h, v.range));
}

// ------------------------------------------------------------------ empirical variogram

export interface EmpiricalVariogram {
  /** Number of point pairs per (non-empty) bin. */
  np: Float64Array;
  /** Mean pair distance per bin (km for lonlat). */
  dist: Float64Array;
  /** Semivariance per bin: Σ(z_i − z_j)² / (2·N), the classical estimator — Matheron (1962) [mem]; gstat's sem.c [pub]. */
  gamma: Float64Array;
  /** Bin boundaries 0, w, 2w, …, cutoff (as gstat's `boundaries` attribute). */
  boundaries: Float64Array;
  cutoff: number;
  width: number;
}

export interface EmpiricalVariogramOptions {
  /** A StationSet, or coordinates + points. */
  stations?: StationSet;
  coordinates?: CoordinateSystem;
  points?: PointsInput;
  values: ArrayLike<number>;
  /**
   * Optional drift covariates per station (no intercept column): the variogram is then computed
   * from ordinary-least-squares residuals of value ~ 1 + covariates, as gstat does for
   * `variogram(z ~ x1 + x2, …)`.
   */
  drift?: { points: ArrayLike<ArrayLike<number>> };
  /** Largest pair distance used; default one third (gstat: 0.33333) of the bounding-box diagonal. */
  cutoff?: number;
  /** Bin width; default cutoff / 15 (gstat). */
  width?: number;
}

/** gstat's default fraction of the bounding-box diagonal used as cutoff (DEF_fraction) [pub]. */
export const DEFAULT_CUTOFF_FRACTION = 0.33333;
/** gstat's default number of bins (DEF_intervals) [pub]. */
export const DEFAULT_BINS = 15;

function stationsFrom(o: { stations?: StationSet; coordinates?: CoordinateSystem; points?: PointsInput }): StationSet {
  if (o.stations) return o.stations;
  if (!o.coordinates || !o.points) {
    throw new GeostatsError("invalid-input", "give either stations or coordinates and points", "points");
  }
  return new StationSet({ coordinates: o.coordinates, points: o.points });
}

export function readValues(values: ArrayLike<number>, n: number, field = "values"): Float64Array {
  if (!values || values.length !== n) {
    throw new GeostatsError("invalid-input", `${field} must have one value per station (${n}), got ${values ? values.length : 0}`, field);
  }
  const out = Float64Array.from(values);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(out[i])) throw new GeostatsError("invalid-input", `${field}[${i}] must be a finite number`, field);
  }
  return out;
}

/** Drift covariates as a row-major matrix [1, c1, …, cq] per row (intercept first). */
export function readDrift(rows: ArrayLike<ArrayLike<number>>, n: number, field: string, q?: number): { matrix: Float64Array; q: number } {
  if (!rows || rows.length !== n) {
    throw new GeostatsError("invalid-input", `${field} must have one row per ${field.endsWith("targets") ? "target" : "station"} (${n}), got ${rows ? rows.length : 0}`, field);
  }
  const qq = q ?? (n > 0 ? rows[0].length : 0);
  const p = qq + 1;
  const m = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    const r = rows[i];
    if (!r || r.length !== qq) throw new GeostatsError("invalid-input", `${field}[${i}] must have ${qq} covariates`, field);
    m[i * p] = 1;
    for (let j = 0; j < qq; j++) {
      const v = r[j];
      if (typeof v !== "number" || !Number.isFinite(v)) {
        throw new GeostatsError("invalid-input", `${field}[${i}][${j}] must be a finite number`, field);
      }
      m[i * p + j + 1] = v;
    }
  }
  return { matrix: m, q: qq };
}

/**
 * Empirical semivariogram with gstat's binning: pairs with 0 < distance ≤ cutoff (zero distances
 * go to the first bin), bin k holds distances in (k·w, (k+1)·w], empty bins are dropped.
 */
export function empiricalVariogram(options: EmpiricalVariogramOptions): EmpiricalVariogram {
  const set = stationsFrom(options);
  const n = set.count;
  let z = readValues(options.values, n);
  if (options.drift) {
    const { matrix, q } = readDrift(options.drift.points, n, "drift.points");
    const fit = leastSquares(matrix, n, q + 1, z);
    if (!fit) {
      throw new GeostatsError("singular-drift", "drift.points: the covariates are collinear (or constant) or there are too few stations for them", "drift.points");
    }
    z = fit.residuals;
  }
  let cutoff = options.cutoff;
  if (cutoff === undefined) {
    let minX = Infinity;
    let minY = Infinity;
    let maxX = -Infinity;
    let maxY = -Infinity;
    for (let i = 0; i < n; i++) {
      const x = set.xy[2 * i];
      const y = set.xy[2 * i + 1];
      if (x < minX) minX = x;
      if (x > maxX) maxX = x;
      if (y < minY) minY = y;
      if (y > maxY) maxY = y;
    }
    const diagonal = distance(set.coordinates, minX, minY, maxX, maxY);
    cutoff = diagonal === 0 ? 1 : diagonal * DEFAULT_CUTOFF_FRACTION;
  }
  if (!(cutoff > 0) || !Number.isFinite(cutoff)) throw new GeostatsError("invalid-input", "cutoff must be a positive number", "cutoff");
  const width = options.width ?? cutoff / DEFAULT_BINS;
  if (!(width > 0) || !Number.isFinite(width)) throw new GeostatsError("invalid-input", "width must be a positive number", "width");
  const nBins = Math.floor(cutoff / width) + 1;
  const sumG = new Float64Array(nBins);
  const sumD = new Float64Array(nBins);
  const count = new Float64Array(nBins);
  const dm = set.distanceMatrix();
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < i; j++) {
      const d = dm[i * n + j];
      if (d > cutoff) continue;
      const frac = d / width;
      let k = Math.floor(frac);
      if (d > 0 && frac === k) k -= 1;
      const diff = z[i] - z[j];
      sumG[k] += diff * diff;
      sumD[k] += d;
      count[k] += 1;
    }
  }
  const keep: number[] = [];
  for (let k = 0; k < nBins; k++) if (count[k] > 0) keep.push(k);
  const np = new Float64Array(keep.length);
  const dist = new Float64Array(keep.length);
  const gamma = new Float64Array(keep.length);
  keep.forEach((k, i) => {
    np[i] = count[k];
    dist[i] = sumD[k] / count[k];
    gamma[i] = sumG[k] / (2 * count[k]);
  });
  // boundaries as R's seq(0, cutoff, width), plus the cutoff when it is not a multiple of width
  const bounds: number[] = [];
  const steps = Math.floor(cutoff / width + 1e-10);
  for (let k = 0; k <= steps; k++) bounds.push(k * width);
  if (bounds[bounds.length - 1] !== cutoff) bounds.push(cutoff);
  return { np, dist, gamma, boundaries: Float64Array.from(bounds), cutoff, width };
}
