// Ordinary least squares of a station mean on [1, |lat|, lat², elevation], with standard errors
// and the coefficients' covariance s²(XᵀX)⁻¹ — textbook OLS [trade]; the regressors are the form of
// Bowen & Wilkinson (2002), Geology 30:315–318 [pub citation]. Pure: no framework, no database.

import type { SurfaceTrend, TrendTerm } from "../types";

export const TREND_TERMS: TrendTerm["name"][] = ["intercept", "absLat", "lat2", "elevation"];
export const TREND_FORMULA = "δ = b0 + b1·|lat| + b2·lat² + b3·elevation_m (Bowen & Wilkinson 2002 form)";

/** The regressor row of a site: [1, |lat|, lat², elevation m]. */
export function trendRow(lat: number, elevationM: number): [number, number, number, number] {
  return [1, Math.abs(lat), lat * lat, elevationM];
}

/** b·x for a regressor row. */
export function trendValue(coef: ArrayLike<number>, lat: number, elevationM: number): number {
  const a = Math.abs(lat);
  return coef[0] + coef[1] * a + coef[2] * lat * lat + coef[3] * elevationM;
}

/** xᵀ·Cov(b)·x, the variance of the fitted trend at a site. */
export function trendVariance(cov: ArrayLike<number>, lat: number, elevationM: number): number {
  const x = trendRow(lat, elevationM);
  let s = 0;
  for (let i = 0; i < 4; i++) {
    let r = 0;
    for (let j = 0; j < 4; j++) r += cov[i * 4 + j] * x[j];
    s += x[i] * r;
  }
  return s;
}

/** Inverse of a small symmetric positive-definite matrix (Gauss–Jordan with partial pivoting); null when singular. */
function invert(a: number[], p: number): number[] | null {
  const m = a.slice();
  const inv: number[] = Array.from({ length: p * p }, (_, k) => (Math.floor(k / p) === k % p ? 1 : 0));
  for (let c = 0; c < p; c++) {
    let piv = c;
    for (let r = c + 1; r < p; r++) if (Math.abs(m[r * p + c]) > Math.abs(m[piv * p + c])) piv = r;
    // the matrix is Jacobi-scaled (unit diagonal): a pivot this small means collinear columns
    if (!(Math.abs(m[piv * p + c]) > 1e-10)) return null;
    if (piv !== c)
      for (let k = 0; k < p; k++) {
        [m[c * p + k], m[piv * p + k]] = [m[piv * p + k], m[c * p + k]];
        [inv[c * p + k], inv[piv * p + k]] = [inv[piv * p + k], inv[c * p + k]];
      }
    const d = m[c * p + c];
    for (let k = 0; k < p; k++) {
      m[c * p + k] /= d;
      inv[c * p + k] /= d;
    }
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = m[r * p + c];
      if (f === 0) continue;
      for (let k = 0; k < p; k++) {
        m[r * p + k] -= f * m[c * p + k];
        inv[r * p + k] -= f * inv[c * p + k];
      }
    }
  }
  return inv;
}

export interface TrendFit {
  record: SurfaceTrend;
  coefficients: number[];
  /** Observed − fitted, per station (input order). */
  residuals: Float64Array;
}

/**
 * Fit the trend. When every station sits at the same elevation (e.g. all 0 m) the elevation
 * column cannot be estimated: it is fixed at 0 with standard error 0 and flagged in `formula`.
 */
export function fitTrend(lat: ArrayLike<number>, elevationM: ArrayLike<number>, y: ArrayLike<number>): TrendFit {
  const n = y.length;
  if (lat.length !== n || elevationM.length !== n) throw new RangeError("fitTrend: lat, elevation and values must have one entry per station");
  let eMin = Infinity;
  let eMax = -Infinity;
  for (let i = 0; i < n; i++) {
    eMin = Math.min(eMin, elevationM[i]);
    eMax = Math.max(eMax, elevationM[i]);
  }
  const useElev = eMax - eMin > 1e-9;
  const cols = useElev ? 4 : 3;
  if (n <= cols) throw new RangeError(`fitTrend: ${n} stations cannot fit ${cols} trend coefficients; at least ${cols + 1} are needed`);
  // Centre and scale the columns for a well-conditioned XᵀX, then transform back.
  const X: number[][] = [];
  for (let i = 0; i < n; i++) X.push(trendRow(lat[i], elevationM[i]).slice(0, cols));
  const xtx = new Array(cols * cols).fill(0);
  const xty = new Array(cols).fill(0);
  for (let i = 0; i < n; i++)
    for (let a = 0; a < cols; a++) {
      xty[a] += X[i][a] * y[i];
      for (let b = 0; b < cols; b++) xtx[a * cols + b] += X[i][a] * X[i][b];
    }
  // Jacobi scaling
  const sc = Array.from({ length: cols }, (_, a) => 1 / Math.sqrt(xtx[a * cols + a] || 1));
  const scaled = xtx.map((v, k) => v * sc[Math.floor(k / cols)] * sc[k % cols]);
  const invS = invert(scaled, cols);
  if (!invS) throw new RangeError("fitTrend: the regressors are collinear among the stations (|lat|, lat², elevation)");
  const inv = invS.map((v, k) => v * sc[Math.floor(k / cols)] * sc[k % cols]);
  const b = new Array(cols).fill(0);
  for (let a = 0; a < cols; a++) for (let c = 0; c < cols; c++) b[a] += inv[a * cols + c] * xty[c];
  const residuals = new Float64Array(n);
  let sse = 0;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += y[i];
  mean /= n;
  let sst = 0;
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let a = 0; a < cols; a++) f += b[a] * X[i][a];
    residuals[i] = y[i] - f;
    sse += residuals[i] ** 2;
    sst += (y[i] - mean) ** 2;
  }
  const df = n - cols;
  const s2 = sse / df;
  const coefficients = [b[0], b[1], b[2], useElev ? b[3] : 0];
  const covariance = new Array(16).fill(0);
  for (let a = 0; a < cols; a++) for (let c = 0; c < cols; c++) covariance[a * 4 + c] = s2 * inv[a * cols + c];
  const terms: TrendTerm[] = TREND_TERMS.map((name, k) => ({ name, estimate: coefficients[k], standardError: Math.sqrt(Math.max(0, covariance[k * 4 + k])) }));
  return {
    coefficients,
    residuals,
    record: {
      formula: useElev ? TREND_FORMULA : `${TREND_FORMULA}; elevation term fixed at 0 (every station at the same elevation)`,
      terms,
      covariance,
      rSquared: sst > 0 ? 1 - sse / sst : 0,
      residualSE: Math.sqrt(s2),
      n,
      df,
    },
  };
}
