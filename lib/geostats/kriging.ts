/**
 * Ordinary and universal kriging (kriging with external drift) on a StationSet, global or
 * n-nearest neighbourhood, in gstat's conventions:
 *
 *   prediction  ẑ(x0) = f0ᵀβ + c0ᵀ C⁻¹ (z − Fβ),  β = (FᵀC⁻¹F)⁻¹ FᵀC⁻¹ z  (GLS trend)
 *   variance    σ²(x0) = C(0) − c0ᵀC⁻¹c0 + (f0 − FᵀC⁻¹c0)ᵀ (FᵀC⁻¹F)⁻¹ (f0 − FᵀC⁻¹c0)
 *
 * with C(0) = nugget + psill, covariances C(h) = sill − γ(h) and F = [1, covariates] (the
 * intercept is implied; ordinary kriging is F = 1) — Cressie (1993), Statistics for Spatial
 * Data, §3.4 [mem]; the same expressions as gstat's gls.c (Christensen 1991; Ver Hoef & Cressie
 * 1993) [pub].
 *
 * Numerics: Cholesky C = LLᵀ of the covariance block and a bordered solve with Q = L⁻¹F,
 * M = QᵀQ = RRᵀ. Per neighbour set we precompute β and the residual weights r = C⁻¹(z − Fβ), so a
 * prediction is f0ᵀβ + c0ᵀr (no solve) and the variance needs one triangular solve a = L⁻¹c0:
 * σ² = C(0) − aᵀa + uᵀu with u = R⁻¹(f0 − Qᵀa). Factorised systems are cached per neighbour set
 * (adjacent grid cells usually share one), so most cells only form their right-hand side.
 */
import { type CoordinateSystem } from "./distance";
import { GeostatsError } from "./errors";
import { GROUP, backSolve, cholesky, dot, forwardSolve, forwardSolveGroup } from "./linalg";
import { permuteRows, spatialOrder } from "./order";
import { type NeighbourSearcher, type NeighbourTable, type PointsInput, StationSet, readPoints } from "./stations";
import { type VariogramModel, checkVariogram, covariance, readDrift, readValues } from "./variogram";
import { WasmFactoriser, WasmGroupSolver } from "./wasm-kernels";

export interface KrigingModelOptions {
  /** A shared StationSet, or coordinates + points. */
  stations?: StationSet;
  coordinates?: CoordinateSystem;
  points?: PointsInput;
  /** One value per station. */
  values: ArrayLike<number>;
  variogram: VariogramModel;
  /** Use the n nearest stations (gstat's nmax); omit/null for the global neighbourhood. */
  maxNeighbors?: number | null;
  /**
   * Universal kriging / kriging with external drift: covariates per station (no intercept column;
   * the intercept is implied), e.g. [|lat|, lat², elevation]. Targets then need the same covariates.
   */
  drift?: { points: ArrayLike<ArrayLike<number>> };
}

export interface NeighbourWeight {
  /** Station index. */
  index: number;
  /** Distance from the target (km for lonlat, coordinate units for planar). */
  distance: number;
  /** Kriging weight of the station's value in the prediction. */
  weight: number;
}

export interface KrigingPrediction {
  value: number;
  /** Kriging variance (value units squared), ≥ 0; nugget included (gstat's convention). */
  variance: number;
  distanceUnit: "km" | "coordinate";
  /** The stations used, nearest first, with their kriging weights. */
  neighbours: NeighbourWeight[];
}

export interface PredictManyOptions {
  /** Drift covariates per target: rows of q numbers, or a flat array (targets × q, row-major). */
  drift?: ArrayLike<ArrayLike<number>> | Float64Array | Float32Array;
  /** Precomputed neighbours (from the model's StationSet, k ≥ the model's maxNeighbors). */
  neighbours?: NeighbourTable;
  /** Compute variances (default true). */
  variance?: boolean;
  /** Output arrays: "float64" (default) or "float32". */
  precision?: "float64" | "float32";
}

export interface PredictionPlanes {
  value: Float64Array | Float32Array;
  variance: Float64Array | Float32Array | null;
}

/** Arguments of KrigingEvaluator.run. Target indices are absolute (into `xy`, `drift`, `mask`). */
export interface RunArgs {
  /** Interleaved target coordinates; target t is at xy[2(t − xyBase)]. */
  xy: Float64Array;
  /** Target index of the first point in `xy` (default 0). */
  xyBase?: number;
  from: number;
  to: number;
  /** Drift covariates, targets × q row-major (absolute target index), or null. */
  drift: Float64Array | null;
  /** Neighbour table for local models; row = t − base. */
  table: NeighbourTable | null;
  /** Distances to all stations (targets × n, index order) for global models; row = t − base. */
  rows: Float64Array | null;
  /** Target index of the first row of `table`/`rows` (default `from`). */
  base?: number;
  value: Float64Array | Float32Array;
  variance: Float64Array | Float32Array | null;
  /** Output index of target `from`. */
  outOffset: number;
  /** Optional mask (absolute target index): 0 = skip (NaN). */
  mask?: Uint8Array | null;
  /**
   * The table's rows already sorted by station index with their hashes (row = t − base), shared
   * by all models of a batch whose neighbourhood size equals table.k.
   */
  sorted?: { index: Int32Array; distance: Float64Array; hash: Int32Array } | null;
}

const MODEL_TYPES = { spherical: 0, exponential: 1, gaussian: 2 } as const;

// local bindings of the hot kernels (direct calls the JIT can inline, whatever the module format)
const chol = cholesky;
const fwd = forwardSolve;
const fwdGroup = forwardSolveGroup;
const bwd = backSolve;
const dotp = dot;

/** A factorised kriging system for one neighbour set (stations in ascending index order). */
class NeighbourSystem {
  m = 0;
  readonly cap: number;
  readonly p: number;
  readonly idx: Int32Array;
  /** kd-order ranks of idx (scratch for gathering the covariance block). */
  readonly rank: Int32Array;
  /** Cholesky factor of the covariance block, lower triangle, row stride `cap`. */
  readonly L: Float64Array;
  /** 1 / L_ii. */
  readonly invDiag: Float64Array;
  /** Q = L⁻¹F, column-major: column c at [c·cap, c·cap + m). */
  readonly Q: Float64Array;
  /** Cholesky factor of QᵀQ, p × p. */
  readonly R: Float64Array;
  /** GLS trend coefficients. */
  readonly beta: Float64Array;
  /** Residual weights C⁻¹(z − Fβ). */
  readonly r: Float64Array;
  valid = false;

  constructor(cap: number, p: number) {
    this.cap = cap;
    this.p = p;
    this.idx = new Int32Array(cap);
    this.rank = new Int32Array(cap);
    this.L = new Float64Array(cap * cap);
    this.invDiag = new Float64Array(cap);
    this.Q = new Float64Array(cap * p);
    this.R = new Float64Array(p * p);
    this.beta = new Float64Array(p);
    this.r = new Float64Array(cap);
  }
}

/** Cached factorised neighbour systems per evaluator (a power of two; see createEvaluator). */
const CACHE_SLOTS = 256;

export class KrigingModel {
  readonly stations: StationSet;
  readonly values: Float64Array;
  readonly variogram: VariogramModel;
  /** n-nearest neighbourhood size, or null for the global neighbourhood. */
  readonly maxNeighbors: number | null;
  /** Number of drift covariates q (0 = ordinary kriging); the system has p = q + 1 trend terms. */
  readonly driftCovariates: number;
  /** Drift design matrix [1, covariates] per station, row-major n × p. */
  readonly design: Float64Array;
  /** C(0) = nugget + psill. */
  readonly sill: number;
  private cov: Float64Array | null = null;
  private covKd: Float64Array | null = null;
  private globalSystem: NeighbourSystem | null = null;
  private defaultEvaluator: KrigingEvaluator | null = null;

  constructor(options: KrigingModelOptions) {
    this.stations =
      options.stations ??
      new StationSet({
        coordinates: options.coordinates as CoordinateSystem,
        points: options.points ?? [],
      });
    const n = this.stations.count;
    this.values = readValues(options.values, n);
    this.variogram = checkVariogram(options.variogram);
    this.sill = this.variogram.nugget + this.variogram.psill;
    if (options.drift) {
      const { matrix, q } = readDrift(options.drift.points, n, "drift.points");
      this.design = matrix;
      this.driftCovariates = q;
    } else {
      this.design = new Float64Array(n).fill(1);
      this.driftCovariates = 0;
    }
    const p = this.driftCovariates + 1;
    const mn = options.maxNeighbors;
    if (mn !== undefined && mn !== null) {
      if (!Number.isInteger(mn) || mn < 1) {
        throw new GeostatsError("invalid-input", "maxNeighbors must be a positive integer", "maxNeighbors");
      }
      if (mn < p) {
        throw new GeostatsError("too-few-points", `maxNeighbors (${mn}) must be at least the number of drift terms (${p}: intercept + ${p - 1} covariates)`, "maxNeighbors");
      }
    }
    this.maxNeighbors = mn === undefined || mn === null || mn >= n ? null : mn;
    if (n < p) {
      throw new GeostatsError("too-few-points", `points: ${n} stations are too few for ${p} drift terms (intercept + ${p - 1} covariates)`, "points");
    }
    const dups = this.stations.duplicatePairs(3);
    if (dups.length > 0) {
      const list = dups.map(([i, j]) => `${i} and ${j}`).join(", ");
      throw new GeostatsError(
        "duplicate-locations",
        `points: stations ${list} are at the same location; the kriging system is singular — merge or average them first`,
        "points",
      );
    }
  }

  get coordinates(): CoordinateSystem {
    return this.stations.coordinates;
  }

  /** Neighbours used per prediction. */
  get neighbourCount(): number {
    return this.maxNeighbors ?? this.stations.count;
  }

  get isGlobal(): boolean {
    return this.maxNeighbors === null;
  }

  /** Station × station covariance matrix (n × n), computed once from the shared distances. */
  covarianceMatrix(): Float64Array {
    if (this.cov) return this.cov;
    const n = this.stations.count;
    const d = this.stations.distanceMatrix();
    const c = new Float64Array(n * n);
    const v = this.variogram;
    for (let i = 0; i < n * n; i++) c[i] = covariance(v, d[i]);
    for (let i = 0; i < n; i++) c[i * n + i] = this.sill;
    this.cov = c;
    return c;
  }

  /**
   * The same covariances stored in the stations' kd-tree order (entry [rank_i·n + rank_j]), so
   * that gathering one neighbourhood's block touches few cache lines.
   */
  covarianceKd(): Float64Array {
    if (this.covKd) return this.covKd;
    const n = this.stations.count;
    const d = this.stations.distanceMatrix();
    const rank = this.stations.rank;
    const c = new Float64Array(n * n);
    const v = this.variogram;
    for (let i = 0; i < n; i++) {
      const ri = rank[i] * n;
      for (let j = 0; j < n; j++) c[ri + rank[j]] = i === j ? this.sill : covariance(v, d[i * n + j]);
    }
    this.covKd = c;
    return c;
  }

  /** The factorised global system (all stations). */
  global(): NeighbourSystem {
    if (!this.globalSystem) {
      const n = this.stations.count;
      const sys = new NeighbourSystem(n, this.driftCovariates + 1);
      for (let i = 0; i < n; i++) sys.idx[i] = i;
      factorise(this, sys, n, new Float64Array(n), WasmFactoriser.create());
      this.globalSystem = sys;
    }
    return this.globalSystem;
  }

  /**
   * A per-thread evaluator with its own caches and scratch buffers. `cacheSlots` (a power of two,
   * default 256) bounds the factorised neighbour systems it keeps.
   */
  createEvaluator(cacheSlots = CACHE_SLOTS): KrigingEvaluator {
    return new KrigingEvaluator(this, cacheSlots);
  }

  private evaluator(): KrigingEvaluator {
    if (!this.defaultEvaluator) this.defaultEvaluator = new KrigingEvaluator(this);
    return this.defaultEvaluator;
  }

  /** Predict at one target, with the stations used and their kriging weights. */
  predict(x: number, y: number, driftTarget?: ArrayLike<number>): KrigingPrediction {
    return this.evaluator().predictOne(x, y, driftTarget);
  }

  /**
   * Predict at many targets ([x, y] pairs or interleaved). Pass `neighbours` (a table from the
   * shared StationSet) to reuse one neighbour search across several models.
   */
  predictMany(targets: PointsInput, options: PredictManyOptions = {}): PredictionPlanes {
    const xy = targets instanceof Float64Array ? targets : readPoints(targets, "targets");
    const t = xy.length >> 1;
    const wantVar = options.variance ?? true;
    const Arr = options.precision === "float32" ? Float32Array : Float64Array;
    const out: PredictionPlanes = { value: new Arr(t), variance: wantVar ? new Arr(t) : null };
    const drift = readTargetDrift(options.drift, t, this.driftCovariates);
    // without a given neighbour table, work in the targets' kd order (more reuse of factorised
    // systems) and write the answers back in the caller's order — identical results
    const order = options.neighbours ? null : spatialOrder(xy);
    if (!order) {
      this.evaluator().run({ xy, from: 0, to: t, drift, table: options.neighbours ?? null, rows: null, value: out.value, variance: out.variance, outOffset: 0 });
      return out;
    }
    const sorted: PredictionPlanes = { value: new Arr(t), variance: wantVar ? new Arr(t) : null };
    const q = this.driftCovariates;
    this.evaluator().run({
      xy: permuteRows(xy, order, 2),
      from: 0,
      to: t,
      drift: drift ? permuteRows(drift, order, q) : null,
      table: null,
      rows: null,
      value: sorted.value,
      variance: sorted.variance,
      outOffset: 0,
    });
    for (let j = 0; j < t; j++) {
      out.value[order[j]] = sorted.value[j];
      if (out.variance && sorted.variance) out.variance[order[j]] = sorted.variance[j];
    }
    return out;
  }
}

export function createKrigingModel(options: KrigingModelOptions): KrigingModel {
  return new KrigingModel(options);
}

/** Drift covariates per target into a flat row-major Float64Array (targets × q), checked. */
export function readTargetDrift(
  drift: ArrayLike<ArrayLike<number>> | Float64Array | Float32Array | undefined,
  t: number,
  q: number,
): Float64Array | null {
  if (q === 0) return null;
  if (!drift) throw new GeostatsError("invalid-input", `drift.targets: the model has ${q} drift covariates; give them for every target`, "drift.targets");
  if (drift instanceof Float64Array || drift instanceof Float32Array) {
    if (drift.length !== t * q) throw new GeostatsError("invalid-input", `drift.targets must have ${t} × ${q} numbers`, "drift.targets");
    const out = drift instanceof Float64Array ? drift : Float64Array.from(drift);
    for (let i = 0; i < out.length; i++) {
      if (!Number.isFinite(out[i])) throw new GeostatsError("invalid-input", `drift.targets[${Math.floor(i / q)}] has a non-finite covariate`, "drift.targets");
    }
    return out;
  }
  const { matrix } = readDrift(drift as ArrayLike<ArrayLike<number>>, t, "drift.targets", q);
  const out = new Float64Array(t * q);
  for (let i = 0; i < t; i++) for (let j = 0; j < q; j++) out[i * q + j] = matrix[i * (q + 1) + j + 1];
  return out;
}

/** out[oOff + b] = Σ_i X[8i + b]·w[wOff + i] for the eight interleaved vectors of X (eight running sums). */
function dotGroup(X: Float64Array, w: Float64Array, n: number, out: Float64Array, wOff = 0, oOff = 0): void {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let s5 = 0;
  let s6 = 0;
  let s7 = 0;
  for (let i = 0; i < n; i++) {
    const v = w[wOff + i];
    const o = 8 * i;
    s0 += X[o] * v;
    s1 += X[o + 1] * v;
    s2 += X[o + 2] * v;
    s3 += X[o + 3] * v;
    s4 += X[o + 4] * v;
    s5 += X[o + 5] * v;
    s6 += X[o + 6] * v;
    s7 += X[o + 7] * v;
  }
  out[oOff] = s0;
  out[oOff + 1] = s1;
  out[oOff + 2] = s2;
  out[oOff + 3] = s3;
  out[oOff + 4] = s4;
  out[oOff + 5] = s5;
  out[oOff + 6] = s6;
  out[oOff + 7] = s7;
}

/** out[b] = Σ_i X[8i + b]² for the eight interleaved vectors of X. */
function squaresGroup(X: Float64Array, n: number, out: Float64Array): void {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let s4 = 0;
  let s5 = 0;
  let s6 = 0;
  let s7 = 0;
  for (let i = 0; i < n; i++) {
    const o = 8 * i;
    const a0 = X[o];
    const a1 = X[o + 1];
    const a2 = X[o + 2];
    const a3 = X[o + 3];
    const a4 = X[o + 4];
    const a5 = X[o + 5];
    const a6 = X[o + 6];
    const a7 = X[o + 7];
    s0 += a0 * a0;
    s1 += a1 * a1;
    s2 += a2 * a2;
    s3 += a3 * a3;
    s4 += a4 * a4;
    s5 += a5 * a5;
    s6 += a6 * a6;
    s7 += a7 * a7;
  }
  out[0] = s0;
  out[1] = s1;
  out[2] = s2;
  out[3] = s3;
  out[4] = s4;
  out[5] = s5;
  out[6] = s6;
  out[7] = s7;
}

let group8 = new Float64Array(8 * 64);
/** A module-level scratch buffer of at least `size` doubles (factorisation is not re-entrant). */
function scratch8(size: number): Float64Array {
  if (group8.length < size) group8 = new Float64Array(size);
  return group8;
}

/**
 * Factorise the kriging system of `sys.idx[0 … m)` (ascending station indices). Throws a
 * GeostatsError naming the cause when the system is singular.
 */
function factorise(model: KrigingModel, sys: NeighbourSystem, m: number, scratch: Float64Array, wasm: WasmFactoriser | null = null): void {
  sys.valid = false;
  sys.m = m;
  const n = model.stations.count;
  const cap = sys.cap;
  const p = sys.p;
  const C = model.covarianceKd();
  const rank = model.stations.rank;
  const L = sys.L;
  const idx = sys.idx;
  const rk = sys.rank;
  for (let i = 0; i < m; i++) rk[i] = rank[idx[i]];
  for (let i = 0; i < m; i++) {
    const row = rk[i] * n;
    const li = i * cap;
    for (let j = 0; j <= i; j++) L[li + j] = C[row + rk[j]];
  }
  // the WebAssembly kernel and the TypeScript one give bit-identical factors
  const bad = wasm && cap === m ? wasm.cholesky(L, m, 1e-13) : chol(L, m, cap);
  if (bad >= 0) throw diagnoseSingular(model, sys, m, bad);
  for (let i = 0; i < m; i++) sys.invDiag[i] = 1 / L[i * cap + i];
  if (m < p) {
    throw new GeostatsError("too-few-points", `only ${m} stations for ${p} drift terms (intercept + ${p - 1} covariates)`, "maxNeighbors");
  }
  // Q = L⁻¹F (column-major) and y = L⁻¹z, solved together as up to eight right-hand sides
  const F = model.design;
  const Q = sys.Q;
  const z = model.values;
  const y = scratch;
  if (p + 1 <= GROUP) {
    const B = scratch8(8 * m);
    B.fill(0, 0, 8 * m);
    for (let i = 0; i < m; i++) {
      const o = 8 * i;
      const fi = idx[i] * p;
      for (let c = 0; c < p; c++) B[o + c] = F[fi + c];
      B[o + p] = z[idx[i]];
    }
    if (wasm && cap === m) wasm.forwardSolve8(sys.invDiag, B);
    else fwdGroup(L, sys.invDiag, m, cap, B);
    for (let i = 0; i < m; i++) {
      const o = 8 * i;
      for (let c = 0; c < p; c++) Q[c * cap + i] = B[o + c];
      y[i] = B[o + p];
    }
  } else {
    for (let c = 0; c < p; c++) {
      const off = c * cap;
      for (let i = 0; i < m; i++) Q[off + i] = F[idx[i] * p + c];
      fwd(L, m, cap, Q, off);
    }
    for (let i = 0; i < m; i++) y[i] = z[idx[i]];
    fwd(L, m, cap, y, 0);
  }
  // M = QᵀQ → R
  const R = sys.R;
  for (let a = 0; a < p; a++) {
    for (let b = 0; b <= a; b++) {
      let s = 0;
      const oa = a * cap;
      const ob = b * cap;
      for (let i = 0; i < m; i++) s += Q[oa + i] * Q[ob + i];
      R[a * p + b] = s;
    }
  }
  if (chol(R, p, p, 1e-12) >= 0) {
    throw new GeostatsError(
      "singular-drift",
      p === 1
        ? "the kriging system is singular"
        : `drift: the covariates are collinear (or constant) among the ${m} stations used — drop a covariate or widen maxNeighbors`,
      "drift.points",
    );
  }
  // β = M⁻¹Qᵀy, r = L⁻ᵀ(y − Qβ)
  const beta = sys.beta;
  for (let c = 0; c < p; c++) {
    let s = 0;
    const off = c * cap;
    for (let i = 0; i < m; i++) s += Q[off + i] * y[i];
    beta[c] = s;
  }
  fwd(R, p, p, beta, 0);
  bwd(R, p, p, beta, 0);
  const r = sys.r;
  for (let i = 0; i < m; i++) {
    let s = y[i];
    for (let c = 0; c < p; c++) s -= Q[c * cap + i] * beta[c];
    r[i] = s;
  }
  bwd(L, m, cap, r, 0);
  sys.valid = true;
}

function diagnoseSingular(model: KrigingModel, sys: NeighbourSystem, m: number, row: number): GeostatsError {
  const set = model.stations;
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < i; j++) {
      if (set.stationDistance(sys.idx[i], sys.idx[j]) === 0) {
        return new GeostatsError("duplicate-locations", `points: stations ${sys.idx[j]} and ${sys.idx[i]} are at the same location`, "points");
      }
    }
  }
  const hint =
    model.variogram.nugget === 0
      ? " (stations very close together and a variogram without nugget; a gaussian model without nugget is especially prone to this — add a small nugget)"
      : "";
  return new GeostatsError(
    "ill-conditioned",
    `the covariance matrix is numerically singular at station ${sys.idx[row]}${hint}`,
    "variogram",
  );
}

/**
 * Copies one neighbour row (sorted by distance) into out*[oOff …] sorted by station index —
 * the canonical key of a neighbour set — and returns its hash (FNV-1a over the indices).
 */
export function sortNeighbourRow(
  idx: Int32Array,
  dist: Float64Array,
  off: number,
  k: number,
  outIdx: Int32Array,
  outDist: Float64Array,
  oOff: number,
): number {
  for (let i = 0; i < k; i++) {
    const v = idx[off + i];
    const d = dist[off + i];
    let j = i - 1;
    while (j >= 0 && outIdx[oOff + j] > v) {
      outIdx[oOff + j + 1] = outIdx[oOff + j];
      outDist[oOff + j + 1] = outDist[oOff + j];
      j--;
    }
    outIdx[oOff + j + 1] = v;
    outDist[oOff + j + 1] = d;
  }
  let h = 0x811c9dc5 | 0;
  for (let i = 0; i < k; i++) h = Math.imul(h ^ outIdx[oOff + i], 0x01000193);
  return h;
}

/**
 * Evaluates a model at many targets with a cache of factorised neighbour systems and scratch
 * buffers (one evaluator per thread; nothing is allocated per target).
 */
export class KrigingEvaluator {
  readonly model: KrigingModel;
  private readonly k: number;
  private readonly p: number;
  private readonly slots: (NeighbourSystem | null)[];
  private readonly slotHash: Int32Array;
  private readonly sortIdx: Int32Array;
  private readonly sortDist: Float64Array;
  private readonly c0: Float64Array;
  private readonly a: Float64Array;
  private readonly u: Float64Array;
  private readonly f0: Float64Array;
  private readonly rowIdx: Int32Array;
  private readonly rowDist: Float64Array;
  private readonly scratch: Float64Array;
  /** GROUP interleaved right-hand sides (global neighbourhood), GROUP·n. */
  private readonly block: Float64Array;
  /** Distances of GROUP targets to all stations (global neighbourhood), GROUP·n. */
  private readonly rowsG: Float64Array;
  /** Per-target accumulators of a group (GROUP), and Qᵀa (p·GROUP). */
  private readonly groupAcc = new Float64Array(GROUP);
  private readonly groupQa: Float64Array;
  /** GROUP interleaved right-hand sides for a local system (GROUP·k), and the group's drift rows. */
  private readonly blockLocal: Float64Array;
  private readonly groupF0: Float64Array;
  private searcher: NeighbourSearcher | null = null;
  /** The global factor in WebAssembly memory (SIMD solve of GROUP targets), or null if unavailable. */
  private wasm: WasmGroupSolver | null | undefined;
  /** WebAssembly scratch for factorising neighbour systems (null without WebAssembly SIMD). */
  private readonly factoriser = WasmFactoriser.create();
  /** Statistics: how many neighbour systems were factorised / reused. */
  factorisations = 0;
  reuses = 0;

  private readonly cacheMask: number;

  constructor(model: KrigingModel, cacheSlots = CACHE_SLOTS) {
    this.model = model;
    const slots = 2 ** Math.max(0, Math.min(16, Math.floor(Math.log2(Math.max(1, cacheSlots)))));
    this.cacheMask = slots - 1;
    const n = model.stations.count;
    this.k = model.neighbourCount;
    this.p = model.driftCovariates + 1;
    this.slots = new Array(model.isGlobal ? 0 : slots).fill(null);
    this.slotHash = new Int32Array(model.isGlobal ? 0 : slots);
    const cap = Math.max(this.k, 1);
    this.sortIdx = new Int32Array(cap);
    this.sortDist = new Float64Array(cap);
    this.c0 = new Float64Array(n);
    this.a = new Float64Array(n);
    this.u = new Float64Array(this.p);
    this.f0 = new Float64Array(this.p);
    this.rowIdx = new Int32Array(cap);
    this.rowDist = new Float64Array(n);
    this.scratch = new Float64Array(n);
    this.block = new Float64Array(model.isGlobal ? GROUP * n : 0);
    this.rowsG = new Float64Array(model.isGlobal ? GROUP * n : 0);
    this.groupQa = new Float64Array(GROUP * this.p);
    this.blockLocal = new Float64Array(model.isGlobal ? 0 : GROUP * Math.max(1, this.k));
    this.groupF0 = new Float64Array(GROUP * this.p);
  }

  private neighbourSearcher(): NeighbourSearcher {
    if (!this.searcher) this.searcher = this.model.stations.searcher();
    return this.searcher;
  }

  /** Use a given searcher (e.g. one per worker thread). */
  setSearcher(s: NeighbourSearcher): void {
    this.searcher = s;
  }

  /**
   * Predict targets [from, to) of the interleaved `xy` (see RunArgs). Masked targets get NaN.
   */
  run(args: RunArgs): void {
    const { xy, from, to, drift, table, rows, value, variance, outOffset, mask } = args;
    const base = args.base ?? from;
    const xyBase = args.xyBase ?? 0;
    const model = this.model;
    const q = model.driftCovariates;
    const f0 = this.f0;
    f0[0] = 1;
    if (table && table.k < this.k && !model.isGlobal) {
      throw new GeostatsError("invalid-input", `the neighbour table has ${table.k} neighbours per target; the model needs ${this.k}`, "neighbours");
    }
    const n = model.stations.count;
    const wantVar = variance !== null;
    if (model.isGlobal) {
      // unmasked targets in groups of GROUP: one pass over L serves the whole group
      const group = new Array<number>(GROUP).fill(0);
      let g = 0;
      const flush = (): void => {
        if (g === 0) return;
        // distances of the (not necessarily consecutive) targets to all stations, into rowsG
        for (let b = 0; b < g; b++) {
          const t = group[b];
          if (rows) {
            const src = (t - base) * n;
            const dst = b * n;
            const rg = this.rowsG;
            for (let i = 0; i < n; i++) rg[dst + i] = rows[src + i];
          }
          if (!rows) this.neighbourSearcher().all(xy[2 * (t - xyBase)], xy[2 * (t - xyBase) + 1], this.rowsG, b * n);
        }
        this.evaluateGroup(group, g, drift, value, variance, outOffset, from);
        g = 0;
      };
      for (let t = from; t < to; t++) {
        if (mask && mask[t] === 0) {
          value[outOffset + t - from] = NaN;
          if (variance) variance[outOffset + t - from] = NaN;
          continue;
        }
        group[g++] = t;
        if (g === GROUP) flush();
      }
      flush();
      return;
    }
    // Local neighbourhoods. Consecutive targets that share a neighbour set (adjacent grid cells
    // usually do) are gathered into groups of up to GROUP and their variances solved together.
    const k = this.k;
    const sorted = args.sorted && table && table.k === k ? args.sorted : null;
    this.groupSize = 0;
    this.groupSys = null;
    for (let t = from; t < to; t++) {
      const o = outOffset + t - from;
      if (mask && mask[t] === 0) {
        value[o] = NaN;
        if (variance) variance[o] = NaN;
        continue;
      }
      if (q > 0) for (let j = 0; j < q; j++) f0[j + 1] = (drift as Float64Array)[t * q + j];
      let sIdx: Int32Array;
      let sDist: Float64Array;
      let so: number;
      let h: number;
      if (sorted) {
        so = (t - base) * k;
        sIdx = sorted.index;
        sDist = sorted.distance;
        h = sorted.hash[t - base];
      } else {
        let idx: Int32Array;
        let dist: Float64Array;
        let off: number;
        if (table) {
          idx = table.index;
          dist = table.distance;
          off = (t - base) * table.k;
        } else {
          this.neighbourSearcher().nearest(xy[2 * (t - xyBase)], xy[2 * (t - xyBase) + 1], k, this.rowIdx, this.rowDist, 0);
          idx = this.rowIdx;
          dist = this.rowDist;
          off = 0;
        }
        h = sortNeighbourRow(idx, dist, off, k, this.sortIdx, this.sortDist, 0);
        sIdx = this.sortIdx;
        sDist = this.sortDist;
        so = 0;
      }
      // same neighbour set as the open group? (compare before any cache lookup may reuse its slot)
      const cur = this.groupSys;
      let same = cur !== null && this.groupHash === h;
      if (same) {
        const ci = (cur as NeighbourSystem).idx;
        for (let i = 0; i < k; i++) {
          if (ci[i] !== sIdx[so + i]) {
            same = false;
            break;
          }
        }
      }
      if (!same) {
        this.flushLocalGroup(drift, value, variance, outOffset, from);
        this.groupSys = this.lookupSystem(sIdx, so, h);
        this.groupHash = h;
      } else {
        this.reuses++;
      }
      this.addToLocalGroup(t, sDist, so, value, o, wantVar);
      if (this.groupSize === GROUP) this.flushLocalGroup(drift, value, variance, outOffset, from);
    }
    this.flushLocalGroup(drift, value, variance, outOffset, from);
    this.groupSys = null;
  }

  // ---- grouped evaluation of consecutive targets sharing one local system
  private groupSys: NeighbourSystem | null = null;
  private groupHash = 0;
  private groupSize = 0;
  private readonly groupTargets = new Int32Array(GROUP);

  /** Covariances of target t into the group block, and its prediction f0ᵀβ + c0ᵀr. */
  private addToLocalGroup(t: number, dist: Float64Array, dOff: number, value: Float64Array | Float32Array, o: number, wantVar: boolean): void {
    const sys = this.groupSys as NeighbourSystem;
    const m = sys.m;
    const p = sys.p;
    const b = this.groupSize;
    const X = this.blockLocal;
    this.covariances(dist, dOff, m, X, GROUP, b);
    let v = 0;
    const f0 = this.f0;
    for (let c = 0; c < p; c++) v += f0[c] * sys.beta[c];
    const r = sys.r;
    let s = 0;
    for (let i = 0; i < m; i++) s += X[GROUP * i + b] * r[i];
    value[o] = v + s;
    if (!wantVar) return;
    for (let c = 1; c < p; c++) this.groupF0[b * p + c] = f0[c];
    this.groupTargets[b] = t;
    this.groupSize = b + 1;
  }

  /** Variances of the open group: one multi-right-hand-side solve with the shared factor. */
  private flushLocalGroup(
    _drift: Float64Array | null,
    _value: Float64Array | Float32Array,
    variance: Float64Array | Float32Array | null,
    outOffset: number,
    from: number,
  ): void {
    const g = this.groupSize;
    this.groupSize = 0;
    if (g === 0 || !variance) return;
    const sys = this.groupSys as NeighbourSystem;
    const m = sys.m;
    const p = sys.p;
    const X = this.blockLocal;
    if (g < GROUP) for (let i = 0; i < m; i++) for (let b = g; b < GROUP; b++) X[GROUP * i + b] = 0;
    fwdGroup(sys.L, sys.invDiag, m, sys.cap, X);
    const aa = this.groupAcc;
    squaresGroup(X, m, aa);
    const qa = this.groupQa;
    const cap = sys.cap;
    for (let c = 0; c < p; c++) dotGroup(X, sys.Q, m, qa, c * cap, c * GROUP);
    const u = this.u;
    const sill = this.model.sill;
    for (let b = 0; b < g; b++) {
      u[0] = 1 - qa[b];
      for (let c = 1; c < p; c++) u[c] = this.groupF0[b * p + c] - qa[c * GROUP + b];
      fwd(sys.R, p, p, u, 0);
      let uu = 0;
      for (let c = 0; c < p; c++) uu += u[c] * u[c];
      variance[outOffset + this.groupTargets[b] - from] = clampVariance(sill - aa[b] + uu, sill);
    }
  }

  /** Up to GROUP (not necessarily consecutive) targets of a global model; their rows are in rowsG. */
  private evaluateGroup(
    group: number[],
    g: number,
    drift: Float64Array | null,
    value: Float64Array | Float32Array,
    variance: Float64Array | Float32Array | null,
    outOffset: number,
    from: number,
  ): void {
    const sys = this.model.global();
    const n = sys.m;
    const p = sys.p;
    const q = p - 1;
    const X = this.block;
    if (g < GROUP) X.fill(0);
    const beta = sys.beta;
    const r = sys.r;
    for (let b = 0; b < g; b++) this.covariances(this.rowsG, b * n, n, X, GROUP, b);
    // predictions: f0ᵀβ + c0ᵀr, all targets in one pass over the stations
    const acc = this.groupAcc;
    dotGroup(X, r, n, acc);
    for (let b = 0; b < g; b++) {
      const t = group[b];
      let v = beta[0];
      for (let j = 0; j < q; j++) v += (drift as Float64Array)[t * q + j] * beta[j + 1];
      value[outOffset + t - from] = v + acc[b];
    }
    if (!variance) return;
    if (this.wasm === undefined) this.wasm = GROUP === 8 ? WasmGroupSolver.create(sys.L, sys.invDiag, n, sys.cap) : null;
    if (this.wasm) this.wasm.solve(X);
    else fwdGroup(sys.L, sys.invDiag, n, sys.cap, X);
    // aᵀa and Qᵀa for all targets
    const aa = this.groupAcc;
    squaresGroup(X, n, aa);
    const qa = this.groupQa;
    const Q = sys.Q;
    const cap = sys.cap;
    for (let c = 0; c < p; c++) dotGroup(X, Q, n, qa, c * cap, c * GROUP);
    const f0 = this.f0;
    const u = this.u;
    const sill = this.model.sill;
    for (let b = 0; b < g; b++) {
      const t = group[b];
      f0[0] = 1;
      for (let j = 0; j < q; j++) f0[j + 1] = (drift as Float64Array)[t * q + j];
      for (let c = 0; c < p; c++) u[c] = f0[c] - qa[c * GROUP + b];
      fwd(sys.R, p, p, u, 0);
      let uu = 0;
      for (let c = 0; c < p; c++) uu += u[c] * u[c];
      variance[outOffset + t - from] = clampVariance(sill - aa[b] + uu, sill);
    }
  }

  /** Predict at targets whose neighbours are given directly (used by cross-validation). */
  evaluateNeighbours(idx: Int32Array, dist: Float64Array, off: number, f: ArrayLike<number> | null, wantVar: boolean): { value: number; variance: number } {
    this.setDrift(f);
    this.evaluate(this.localSystem(idx, dist, off), this.sortDist, wantVar);
    return { value: this.outValue, variance: this.outVariance };
  }

  private setDrift(f: ArrayLike<number> | null): void {
    const q = this.model.driftCovariates;
    this.f0[0] = 1;
    if (q > 0) {
      if (!f || f.length !== q) {
        throw new GeostatsError("invalid-input", `drift target must have ${q} covariates`, "drift.targets");
      }
      for (let j = 0; j < q; j++) {
        if (!Number.isFinite(f[j])) throw new GeostatsError("invalid-input", "drift target covariates must be finite numbers", "drift.targets");
        this.f0[j + 1] = f[j];
      }
    }
  }

  private outValue = 0;
  private outVariance = 0;

  /**
   * Sort one row of neighbours by station index into sortIdx/sortDist, then fetch its factorised
   * system from the cache (or factorise it).
   */
  private localSystem(idx: Int32Array, dist: Float64Array, off: number): NeighbourSystem {
    const h = sortNeighbourRow(idx, dist, off, this.k, this.sortIdx, this.sortDist, 0);
    return this.lookupSystem(this.sortIdx, 0, h);
  }

  /**
   * The factorised system of the neighbour set sorted[off … off+k) (ascending station indices,
   * hash h from sortNeighbourRow), from the cache or newly factorised.
   */
  private lookupSystem(sorted: Int32Array, off: number, h: number): NeighbourSystem {
    const k = this.k;
    const slot = (h >>> 0) & this.cacheMask;
    let sys = this.slots[slot];
    if (sys && sys.valid && this.slotHash[slot] === h && sys.m === k) {
      let same = true;
      const sidx = sys.idx;
      for (let i = 0; i < k; i++) {
        if (sidx[i] !== sorted[off + i]) {
          same = false;
          break;
        }
      }
      if (same) {
        this.reuses++;
        return sys;
      }
    }
    if (!sys) {
      sys = new NeighbourSystem(k, this.p);
      this.slots[slot] = sys;
    }
    for (let i = 0; i < k; i++) sys.idx[i] = sorted[off + i];
    this.slotHash[slot] = h;
    factorise(this.model, sys, k, this.scratch, this.factoriser);
    this.factorisations++;
    return sys;
  }


  /** Covariances target → stations from distances (inlined model shapes; same as covariance()). */
  private covariances(dist: Float64Array, dOff: number, m: number, out: Float64Array, stride: number, oOff: number): void {
    const v = this.model.variogram;
    const sill = this.model.sill;
    const psill = v.psill;
    const range = v.range;
    switch (MODEL_TYPES[v.model]) {
      case 0:
        for (let i = 0; i < m; i++) {
          const h = dist[dOff + i];
          let c: number;
          if (h === 0) c = sill;
          else {
            const t = h / range;
            c = t >= 1 ? 0 : psill * (1 - t * (1.5 - 0.5 * t * t));
          }
          out[oOff + i * stride] = c;
        }
        break;
      case 1:
        for (let i = 0; i < m; i++) {
          const h = dist[dOff + i];
          out[oOff + i * stride] = h === 0 ? sill : psill * Math.exp(-h / range);
        }
        break;
      case 2:
        for (let i = 0; i < m; i++) {
          const h = dist[dOff + i];
          const t = h / range;
          out[oOff + i * stride] = h === 0 ? sill : psill * Math.exp(-t * t);
        }
        break;
    }
  }

  /** Prediction and variance for a factorised system and distances aligned with sys.idx. */
  private evaluate(sys: NeighbourSystem, dist: Float64Array, wantVar: boolean, dOff = 0): void {
    const m = sys.m;
    const p = sys.p;
    const c0 = this.c0;
    this.covariances(dist, dOff, m, c0, 1, 0);
    const f0 = this.f0;
    let value = 0;
    for (let c = 0; c < p; c++) value += f0[c] * sys.beta[c];
    value += dotp(c0, 0, sys.r, 0, m);
    this.outValue = value;
    if (!wantVar) {
      this.outVariance = NaN;
      return;
    }
    // a = L⁻¹c0, with the same operations (and rounding) as one column of forwardSolveGroup
    const a = this.a;
    const L = sys.L;
    const inv = sys.invDiag;
    const cap = sys.cap;
    let aa = 0;
    for (let i = 0; i < m; i++) {
      const row = i * cap;
      let s = c0[i];
      for (let k = 0; k < i; k++) s -= L[row + k] * a[k];
      const ai = s * inv[i];
      a[i] = ai;
      aa += ai * ai;
    }
    this.outVariance = this.finishVariance(sys, a, 0, 1, aa, f0);
  }

  /** σ² = C(0) − aᵀa + uᵀu with u = R⁻¹(f0 − Qᵀa); `a` read at a[aOff + i·aStride]. */
  private finishVariance(sys: NeighbourSystem, a: Float64Array, aOff: number, aStride: number, aa: number, f0: Float64Array): number {
    const p = sys.p;
    const m = sys.m;
    const cap = sys.cap;
    const u = this.u;
    const Q = sys.Q;
    for (let c = 0; c < p; c++) {
      let s = f0[c];
      const off = c * cap;
      for (let i = 0; i < m; i++) s -= Q[off + i] * a[aOff + i * aStride];
      u[c] = s;
    }
    fwd(sys.R, p, p, u, 0);
    let uu = 0;
    for (let c = 0; c < p; c++) uu += u[c] * u[c];
    return clampVariance(this.model.sill - aa + uu, this.model.sill);
  }

  /** One prediction with neighbours and weights λ = L⁻ᵀ(a + Q·R⁻ᵀu). */
  predictOne(x: number, y: number, driftTarget?: ArrayLike<number>): KrigingPrediction {
    const model = this.model;
    this.setDrift(driftTarget ?? null);
    const searcher = this.neighbourSearcher();
    const n = model.stations.count;
    let sys: NeighbourSystem;
    let order: Int32Array;
    let orderDist: Float64Array;
    let m: number;
    if (model.isGlobal) {
      sys = model.global();
      m = n;
      order = new Int32Array(n);
      orderDist = new Float64Array(n);
      searcher.nearest(x, y, n, order, orderDist, 0);
      searcher.all(x, y, this.rowDist, 0);
      this.evaluate(sys, this.rowDist, true);
    } else {
      m = this.k;
      order = new Int32Array(m);
      orderDist = new Float64Array(m);
      searcher.nearest(x, y, m, order, orderDist, 0);
      sys = this.localSystem(order, orderDist, 0);
      this.evaluate(sys, this.sortDist, true);
    }
    const value = this.outValue;
    const variance = this.outVariance;
    // weights: v = R⁻ᵀu, λ = L⁻ᵀ(a + Qv)
    const p = sys.p;
    const cap = sys.cap;
    const vv = Float64Array.from(this.u.subarray(0, p));
    bwd(sys.R, p, p, vv, 0);
    const lambda = new Float64Array(m);
    for (let i = 0; i < m; i++) {
      let s = this.a[i];
      for (let c = 0; c < p; c++) s += sys.Q[c * cap + i] * vv[c];
      lambda[i] = s;
    }
    bwd(sys.L, m, cap, lambda, 0);
    const weightOf = new Map<number, number>();
    for (let i = 0; i < m; i++) weightOf.set(sys.idx[i], lambda[i]);
    const neighbours: NeighbourWeight[] = [];
    for (let i = 0; i < m; i++) {
      neighbours.push({ index: order[i], distance: orderDist[i], weight: weightOf.get(order[i]) ?? 0 });
    }
    return { value, variance, distanceUnit: model.coordinates === "lonlat" ? "km" : "coordinate", neighbours };
  }
}

/** Variances below zero are round-off: clamp to 0 (anything clearly negative means a broken system). */
function clampVariance(v: number, sill: number): number {
  if (v >= 0) return v;
  if (v > -1e-6 * sill) return 0;
  throw new GeostatsError("ill-conditioned", `negative kriging variance (${v}): the kriging system is numerically unstable`, "variogram");
}
