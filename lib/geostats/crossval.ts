/**
 * Leave-one-out cross-validation of a kriging model, as gstat's krige.cv with nfold = n:
 * each station is predicted from all the others (same variogram, same neighbourhood rule),
 * residual = observed − predicted, z = residual / √variance.
 */
import { GeostatsError } from "./errors";
import { type KrigingModel } from "./kriging";
import { cholesky, forwardSolve } from "./linalg";

export interface CrossValidation {
  /** Number of stations. */
  n: number;
  observed: Float64Array;
  predicted: Float64Array;
  variance: Float64Array;
  /** observed − predicted. */
  residual: Float64Array;
  /** residual / √variance. */
  zScore: Float64Array;
  /** Mean residual (ideal 0) [trade]. */
  meanError: number;
  /** Root mean squared residual [trade]. */
  rmse: number;
  /** Mean z-score (ideal 0) [trade]. */
  meanZ: number;
  /** Mean squared z-score (ideal ≈ 1: the kriging variance matches the actual errors) [trade]. */
  meanZ2: number;
}

/**
 * Leave-one-out cross-validation. Global neighbourhood: exact closed form from one factorisation
 * — residual_i = (Pz)_i / P_ii and variance_i = 1/P_ii with P = C⁻¹ − C⁻¹F(FᵀC⁻¹F)⁻¹FᵀC⁻¹ the
 * data block of the inverse of the bordered kriging matrix — Dubrule (1983), Math. Geology
 * 15:687–699 [mem]. n-nearest neighbourhood: each station is re-predicted from its nearest
 * others.
 */
export function crossValidate(model: KrigingModel): CrossValidation {
  const n = model.stations.count;
  const p = model.driftCovariates + 1;
  if (n - 1 < p || n < 2) {
    throw new GeostatsError("too-few-points", `points: cross-validation needs at least ${p + 1} stations`, "points");
  }
  const observed = Float64Array.from(model.values);
  const predicted = new Float64Array(n);
  const variance = new Float64Array(n);
  if (model.isGlobal || model.neighbourCount >= n - 1) {
    globalLeaveOneOut(model, predicted, variance);
  } else {
    localLeaveOneOut(model, predicted, variance);
  }
  return summarise(observed, predicted, variance);
}

export function summarise(observed: Float64Array, predicted: Float64Array, variance: Float64Array): CrossValidation {
  const n = observed.length;
  const residual = new Float64Array(n);
  const zScore = new Float64Array(n);
  let se = 0;
  let sr = 0;
  let sz = 0;
  let sz2 = 0;
  for (let i = 0; i < n; i++) {
    const r = observed[i] - predicted[i];
    residual[i] = r;
    const z = r / Math.sqrt(variance[i]);
    zScore[i] = z;
    sr += r;
    se += r * r;
    sz += z;
    sz2 += z * z;
  }
  return { n, observed, predicted, variance, residual, zScore, meanError: sr / n, rmse: Math.sqrt(se / n), meanZ: sz / n, meanZ2: sz2 / n };
}

function localLeaveOneOut(model: KrigingModel, predicted: Float64Array, variance: Float64Array): void {
  const set = model.stations;
  const n = set.count;
  const k = model.neighbourCount;
  const searcher = set.searcher();
  const idx = new Int32Array(k + 1);
  const dist = new Float64Array(k + 1);
  const ev = model.createEvaluator();
  const q = model.driftCovariates;
  const p = q + 1;
  const f = new Float64Array(q);
  for (let i = 0; i < n; i++) {
    searcher.nearest(set.xy[2 * i], set.xy[2 * i + 1], k + 1, idx, dist, 0);
    // drop station i itself (at distance 0; duplicates are rejected when the model is built)
    let w = 0;
    for (let j = 0; j <= k; j++) {
      if (idx[j] === i) continue;
      if (w < k) {
        idx[w] = idx[j];
        dist[w] = dist[j];
        w++;
      }
    }
    for (let j = 0; j < q; j++) f[j] = model.design[i * p + j + 1];
    const r = ev.evaluateNeighbours(idx, dist, 0, q > 0 ? f : null, true);
    predicted[i] = r.value;
    variance[i] = r.variance;
  }
}

function globalLeaveOneOut(model: KrigingModel, predicted: Float64Array, variance: Float64Array): void {
  const n = model.stations.count;
  const p = model.driftCovariates + 1;
  const C = model.covarianceMatrix();
  // L: Cholesky of C (n × n, row-major)
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) L[i * n + j] = C[i * n + j];
  if (cholesky(L, n, n) >= 0) {
    model.global(); // throws the diagnosed error
    throw new GeostatsError("ill-conditioned", "the covariance matrix is numerically singular", "variogram");
  }
  // X = L⁻¹ (lower triangular), column by column
  const X = new Float64Array(n * n); // row-major
  const col = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    col.fill(0);
    col[c] = 1;
    // forward solve from row c (entries above are zero)
    for (let i = c; i < n; i++) {
      let s = col[i];
      const row = i * n;
      for (let k = c; k < i; k++) s -= L[row + k] * col[k];
      col[i] = s / L[row + i];
    }
    for (let i = c; i < n; i++) X[i * n + c] = col[i];
  }
  // diag(C⁻¹)_i = Σ_k X_ki²
  const cinvDiag = new Float64Array(n);
  for (let kk = 0; kk < n; kk++) {
    const row = kk * n;
    for (let i = 0; i <= kk; i++) cinvDiag[i] += X[row + i] * X[row + i];
  }
  // Q = L⁻¹F (n × p, row-major), M = QᵀQ = RRᵀ
  const F = model.design;
  const Q = new Float64Array(n * p);
  for (let c = 0; c < p; c++) {
    const v = new Float64Array(n);
    for (let i = 0; i < n; i++) v[i] = F[i * p + c];
    forwardSolve(L, n, n, v, 0);
    for (let i = 0; i < n; i++) Q[i * p + c] = v[i];
  }
  const R = new Float64Array(p * p);
  for (let a = 0; a < p; a++) {
    for (let b = 0; b <= a; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += Q[i * p + a] * Q[i * p + b];
      R[a * p + b] = s;
    }
  }
  if (cholesky(R, p, p, 1e-12) >= 0) {
    throw new GeostatsError("singular-drift", "drift: the covariates are collinear (or constant) among the stations", "drift.points");
  }
  // Pz = C⁻¹(z − Fβ) = r of the global system
  const r = model.global().r;
  // G_i = (C⁻¹F)_i = Σ_k X_ki Q_k ; P_ii = diag(C⁻¹)_i − ‖R⁻¹ G_i‖²
  const G = new Float64Array(n * p);
  for (let kk = 0; kk < n; kk++) {
    const row = kk * n;
    for (let i = 0; i <= kk; i++) {
      const x = X[row + i];
      for (let c = 0; c < p; c++) G[i * p + c] += x * Q[kk * p + c];
    }
  }
  const g = new Float64Array(p);
  const z = model.values;
  for (let i = 0; i < n; i++) {
    for (let c = 0; c < p; c++) g[c] = G[i * p + c];
    forwardSolve(R, p, p, g, 0);
    let s = 0;
    for (let c = 0; c < p; c++) s += g[c] * g[c];
    const pii = cinvDiag[i] - s;
    if (!(pii > 0)) throw new GeostatsError("ill-conditioned", `cross-validation: station ${i} cannot be left out (singular system)`, "points");
    const res = r[i] / pii;
    predicted[i] = z[i] - res;
    variance[i] = 1 / pii;
  }
}
