/**
 * Weighted-least-squares fitting of a variogram model (nugget + one structure) to an empirical
 * variogram, minimising Σ w_j (γ_j − γ(h_j))² with gstat's weights (fit.method) [pub].
 *
 * Two algorithms:
 * - "gstat" (default): gstat's fit.variogram step for step — Gauss–Newton on (nugget, psill,
 *   range) with gstat's derivatives, step length limited (squared step ≤ 0.2 × squared parameter
 *   vector, as gstat's fit.c computes it), stop when the
 *   relative SSE change is below 1e-5 (at most 200 iterations), weights fixed at the first
 *   iteration; a negative sill is then fixed at zero and the fit restarted from the initial
 *   range, as R's fit.variogram does. Results agree with gstat's to rounding. When that
 *   iteration fails (no convergence, singular, non-positive range) the engine falls back to
 *   "optimal" and says so in `warnings` (set `fallback: false` to keep gstat's answer).
 * - "optimal": variable projection — for a given range the nugget and partial sill enter
 *   linearly and are solved exactly with non-negativity (2-parameter NNLS); the range comes from a
 *   log-spaced scan of this profile refined by golden-section search. This finds the weighted
 *   least-squares optimum regardless of starting values.
 */
import { GeostatsError } from "./errors";
import { type EmpiricalVariogram, VARIOGRAM_MODELS, type VariogramModel, type VariogramModelType, semivariance, unitStructure } from "./variogram";

/**
 * gstat's fit.method: 1 = weights N_j; 2 = N_j/γ(h_j)² (Cressie 1985; γ from the starting model,
 * which is when gstat computes the weights); 6 = unweighted; 7 = N_j/h_j² (gstat's default) [pub].
 */
export type FitMethod = 1 | 2 | 6 | 7;

export interface FitVariogramOptions {
  model: VariogramModelType;
  fitMethod?: FitMethod;
  /** "gstat" (default) or "optimal"; see the module comment. */
  algorithm?: "gstat" | "optimal";
  /** With algorithm "gstat": fall back to "optimal" when gstat's iteration fails (default true). */
  fallback?: boolean;
  /**
   * Starting values (gstat's `vgm(psill, model, range, nugget)`). The "gstat" algorithm starts
   * from them and fit.method 2 takes its weights from them. Defaults follow gstat's vgm_fill_na:
   * range = max(bin distance)/3, nugget = mean of the first 3 γ, psill = mean of the last 5 γ.
   */
  initial?: Partial<Omit<VariogramModel, "model">>;
  /** Keep the nugget fixed at this value instead of fitting it (e.g. 0). */
  fixNugget?: number;
  /** Keep the range fixed at this value (only the sills are fitted). */
  fixRange?: number;
}

export interface VariogramFit {
  variogram: VariogramModel;
  /** Weighted sum of squared errors Σ w_j (γ_j − γ(h_j))² (gstat's SSErr). */
  sse: number;
  fitMethod: FitMethod;
  /** The algorithm whose result is returned. */
  algorithm: "gstat" | "optimal";
  initial: VariogramModel;
  /** False when the fit did not converge or sits at a search bound (see warnings). */
  converged: boolean;
  warnings: string[];
}

/** gstat's limits for its Gauss–Newton iteration (R's fit.variogram: 200 iterations; DEF_fit_limit) [pub]. */
const GSTAT_MAX_ITER = 200;
const GSTAT_FIT_LIMIT = 1e-5;
const GSTAT_ZERO = 10 * Number.EPSILON;

/** Search bounds for the range parameter in "optimal", relative to the bin distances. */
const RANGE_LOWER_FACTOR = 0.1; // × smallest bin distance
const RANGE_UPPER_FACTOR = 50; // × largest bin distance
const RANGE_SCAN_POINTS = 160;

interface Params {
  nugget: number;
  psill: number;
  range: number;
}

export function fitVariogram(ev: EmpiricalVariogram, options: FitVariogramOptions): VariogramFit {
  const model = options.model;
  if (!VARIOGRAM_MODELS.includes(model)) {
    throw new GeostatsError("invalid-input", `variogram.model must be one of ${VARIOGRAM_MODELS.join(", ")}`, "variogram.model");
  }
  const method: FitMethod = options.fitMethod ?? 7;
  if (![1, 2, 6, 7].includes(method)) throw new GeostatsError("invalid-input", "fitMethod must be 1, 2, 6 or 7", "fitMethod");
  const algorithm = options.algorithm ?? "gstat";
  const m = ev.gamma.length;
  const fixRange = options.fixRange;
  const minBins = fixRange !== undefined ? 2 : 3;
  if (m < minBins) {
    throw new GeostatsError(
      "fit-failed",
      `too few points to fit a variogram: ${m} non-empty distance bins (need at least ${minBins}); add stations or give the variogram`,
      "points",
    );
  }
  let gMax = 0;
  let hMax = 0;
  for (let j = 0; j < m; j++) {
    if (!Number.isFinite(ev.gamma[j]) || !Number.isFinite(ev.dist[j])) {
      throw new GeostatsError("fit-failed", "the empirical variogram has non-finite entries", "values");
    }
    gMax = Math.max(gMax, ev.gamma[j]);
    hMax = Math.max(hMax, ev.dist[j]);
  }
  if (!(gMax > 0)) throw new GeostatsError("fit-failed", "the values do not vary between stations: no variogram can be fitted", "values");
  if (method === 7 && ev.dist.some((d) => d === 0)) {
    throw new GeostatsError("fit-failed", "fit method 7 (N/h²) cannot use a zero-distance bin; use another fit method", "fitMethod");
  }

  // starting values, as gstat's vgm_fill_na
  const head = Array.from(ev.gamma.slice(0, 3));
  const tail = Array.from(ev.gamma.slice(Math.max(0, m - 5)));
  const initial: VariogramModel = {
    model,
    nugget: options.fixNugget ?? options.initial?.nugget ?? mean(head),
    psill: options.initial?.psill ?? mean(tail),
    range: fixRange ?? options.initial?.range ?? hMax / 3,
  };
  for (const k of ["nugget", "psill", "range"] as const) {
    if (!Number.isFinite(initial[k]) || initial[k] < 0) throw new GeostatsError("invalid-input", `initial ${k} must be a non-negative number`, `initial.${k}`);
  }

  const warnings: string[] = [];
  if (algorithm === "gstat") {
    const g = gstatFit(ev, model, method, initial, options.fixNugget === undefined, fixRange === undefined);
    const failed = !g.converged || g.singular || !(g.params.range > 0) || !Number.isFinite(g.sse) || g.params.nugget < 0 || g.params.psill < 0;
    if (!failed || options.fallback === false) {
      warnings.push(...g.warnings);
      const opt = optimalFit(ev, model, weights(ev, method, initial), options.fixNugget, fixRange);
      if (!failed && opt.sse < g.sse * (1 - 1e-3)) {
        warnings.push(
          `gstat-compatible fit; the weighted least-squares optimum fits better (SSE ${fmt(opt.sse)} < ${fmt(g.sse)}): ` +
            `nugget ${fmt(opt.nugget)}, psill ${fmt(opt.psill)}, range ${fmt(opt.range)} (algorithm "optimal")`,
        );
      }
      return finish(model, g.params, g.sse, method, "gstat", initial, !failed, warnings);
    }
    warnings.push(
      `gstat's Gauss–Newton fit failed here (${g.warnings.join("; ") || "non-positive or non-finite parameters"}); ` +
        "used the weighted least-squares optimum instead",
    );
  }
  const opt = optimalFit(ev, model, weights(ev, method, initial), options.fixNugget, fixRange);
  if (opt.atLower && options.fixNugget === undefined) {
    // a range below the shortest lag makes the structure a second nugget: fold it in
    opt.nugget += opt.psill;
    opt.psill = 0;
  }
  if (opt.atUpper) {
    warnings.push(
      `the fitted range reached the upper search bound (${fmt(opt.range)}, ${RANGE_UPPER_FACTOR}× the largest lag): ` +
        "the variogram keeps rising within the cutoff (no sill) — consider a drift/trend or a larger cutoff",
    );
  }
  return finish(model, opt, opt.sse, method, "optimal", initial, !opt.atUpper && !opt.atLower, warnings);
}

function finish(
  model: VariogramModelType,
  p: Params,
  sse: number,
  method: FitMethod,
  algorithm: "gstat" | "optimal",
  initial: VariogramModel,
  converged: boolean,
  warnings: string[],
): VariogramFit {
  const variogram: VariogramModel = { model, nugget: p.nugget, psill: p.psill, range: p.range };
  if (variogram.psill === 0 || (variogram.psill < 1e-9 * (variogram.nugget + variogram.psill))) {
    warnings.push("no spatial structure: the fitted model is a pure nugget (the values look spatially uncorrelated at these distances)");
  }
  if (!(variogram.nugget + variogram.psill > 0)) throw new GeostatsError("fit-failed", "the fitted variogram has zero sill", "values");
  return { variogram, sse, fitMethod: method, algorithm, initial, converged, warnings };
}

/** Fit several model types and keep the one with the smallest weighted SSE (as gstat does for a model list). */
export function fitVariogramBest(ev: EmpiricalVariogram, options: Omit<FitVariogramOptions, "model"> & { models?: readonly VariogramModelType[] }): VariogramFit {
  let best: VariogramFit | null = null;
  for (const model of options.models ?? VARIOGRAM_MODELS) {
    const fit = fitVariogram(ev, { ...options, model });
    if (!best || fit.sse < best.sse) best = fit;
  }
  return best as VariogramFit;
}

/** Fit weights w_j for gstat's fit.method [pub]. */
function weights(ev: EmpiricalVariogram, method: FitMethod, start: VariogramModel): Float64Array {
  const m = ev.gamma.length;
  const w = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const h = ev.dist[j];
    switch (method) {
      case 1:
        w[j] = ev.np[j];
        break;
      case 6:
        w[j] = 1;
        break;
      case 7:
        w[j] = ev.np[j] / (h * h);
        break;
      case 2: {
        const s = semivariance(start, h);
        if (!(Math.abs(s) > 1e-30)) {
          throw new GeostatsError("fit-failed", "fit method 2: the starting model has zero semivariance at a bin (infinite weight)", "fitMethod");
        }
        w[j] = ev.np[j] / (s * s);
        break;
      }
    }
  }
  return w;
}

// ------------------------------------------------------------------ "optimal"

function optimalFit(
  ev: EmpiricalVariogram,
  model: VariogramModelType,
  w: Float64Array,
  fixNugget: number | undefined,
  fixRange: number | undefined,
): Params & { sse: number; atLower: boolean; atUpper: boolean } {
  const m = ev.gamma.length;
  const h = ev.dist;
  const g = ev.gamma;
  const f = new Float64Array(m);
  const cur = { nugget: 0, psill: 0 };
  /** Exact non-negative weighted least squares for (nugget, psill) at range a; returns the SSE. */
  const solveSills = (a: number): number => {
    for (let j = 0; j < m; j++) f[j] = h[j] === 0 ? 0 : unitStructure(model, h[j], a);
    const nugBasis = (j: number) => (h[j] === 0 ? 0 : 1);
    let W = 0;
    let Sf = 0;
    let Sff = 0;
    let Sg = 0;
    let Sfg = 0;
    for (let j = 0; j < m; j++) {
      const wj = w[j];
      const e = nugBasis(j);
      const gj = fixNugget !== undefined ? g[j] - fixNugget * e : g[j];
      W += wj * e;
      Sf += wj * e * f[j];
      Sff += wj * f[j] * f[j];
      Sg += wj * e * gj;
      Sfg += wj * f[j] * gj;
    }
    const sse = (nug: number, ps: number): number => {
      let s = 0;
      for (let j = 0; j < m; j++) {
        const r = g[j] - nug * nugBasis(j) - ps * f[j];
        s += w[j] * r * r;
      }
      return s;
    };
    if (fixNugget !== undefined) {
      const ps = Sff > 0 ? Math.max(0, Sfg / Sff) : 0;
      cur.nugget = fixNugget;
      cur.psill = ps;
      return sse(fixNugget, ps);
    }
    const det = W * Sff - Sf * Sf;
    if (det > 1e-12 * W * Sff) {
      const nug = (Sff * Sg - Sf * Sfg) / det;
      const ps = (W * Sfg - Sf * Sg) / det;
      if (nug >= 0 && ps >= 0) {
        cur.nugget = nug;
        cur.psill = ps;
        return sse(nug, ps);
      }
    }
    // on the boundary: nugget = 0 or psill = 0
    const ps0 = Sff > 0 ? Math.max(0, Sfg / Sff) : 0;
    const e1 = sse(0, ps0);
    const nug0 = W > 0 ? Math.max(0, Sg / W) : 0;
    const e2 = sse(nug0, 0);
    if (e1 < e2 * (1 - 1e-12)) {
      cur.nugget = 0;
      cur.psill = ps0;
      return e1;
    }
    cur.nugget = nug0;
    cur.psill = 0;
    return e2;
  };

  if (fixRange !== undefined) {
    const e = solveSills(fixRange);
    return { range: fixRange, nugget: cur.nugget, psill: cur.psill, sse: e, atLower: false, atUpper: false };
  }
  let hMin = Infinity;
  let hMax = 0;
  for (let j = 0; j < m; j++) {
    if (h[j] > 0) hMin = Math.min(hMin, h[j]);
    hMax = Math.max(hMax, h[j]);
  }
  const lo = Math.log(RANGE_LOWER_FACTOR * hMin);
  const hi = Math.log(RANGE_UPPER_FACTOR * hMax);
  const step = (hi - lo) / (RANGE_SCAN_POINTS - 1);
  let best = { range: Math.exp(lo), nugget: 0, psill: 0, sse: Infinity };
  let kBest = 0;
  for (let k = 0; k < RANGE_SCAN_POINTS; k++) {
    const a = Math.exp(lo + k * step);
    const e = solveSills(a);
    if (e < best.sse) {
      best = { range: a, nugget: cur.nugget, psill: cur.psill, sse: e };
      kBest = k;
    }
  }
  // golden-section refinement of log(range) between the scan neighbours of the best point
  let a0 = lo + Math.max(0, kBest - 1) * step;
  let a1 = lo + Math.min(RANGE_SCAN_POINTS - 1, kBest + 1) * step;
  const phi = (Math.sqrt(5) - 1) / 2;
  let c = a1 - phi * (a1 - a0);
  let d = a0 + phi * (a1 - a0);
  let ec = solveSills(Math.exp(c));
  let ed = solveSills(Math.exp(d));
  for (let it = 0; it < 200 && a1 - a0 > 1e-12; it++) {
    if (ec <= ed) {
      a1 = d;
      d = c;
      ed = ec;
      c = a1 - phi * (a1 - a0);
      ec = solveSills(Math.exp(c));
    } else {
      a0 = c;
      c = d;
      ec = ed;
      d = a0 + phi * (a1 - a0);
      ed = solveSills(Math.exp(d));
    }
  }
  const aStar = Math.exp((a0 + a1) / 2);
  const eStar = solveSills(aStar);
  if (eStar <= best.sse) best = { range: aStar, nugget: cur.nugget, psill: cur.psill, sse: eStar };
  return { ...best, atLower: kBest === 0, atUpper: kBest === RANGE_SCAN_POINTS - 1 };
}

// ------------------------------------------------------------------ "gstat"

/** gstat's derivative of the unit structure with respect to the range (vario_fn.c da_fn_*) [pub]. */
function gstatRangeDerivative(model: VariogramModelType, h: number, a: number): number {
  switch (model) {
    case "spherical": {
      if (h > a) return 0;
      const hr2 = h / (a * a);
      return 1.5 * hr2 * (-1 + h * hr2);
    }
    case "exponential": {
      const hr = -h / a;
      return (hr / a) * Math.exp(hr);
    }
    case "gaussian": {
      // gstat's expression (it differs from d/da of 1 − exp(−(h/a)²) by a factor 2h/a; kept for parity)
      const hr = h / a;
      return (-hr / a) * Math.exp(-(hr * hr));
    }
  }
}

function unitOrZero(model: VariogramModelType, h: number, a: number): number {
  return h === 0 ? 0 : unitStructure(model, h, a);
}

interface GstatRun {
  params: Params;
  sse: number;
  converged: boolean;
  singular: boolean;
  warnings: string[];
}

/** R's fit.variogram: one Gauss–Newton run, then a restart with negative sills fixed at zero. */
function gstatFit(ev: EmpiricalVariogram, model: VariogramModelType, method: FitMethod, initial: VariogramModel, fitNugget: boolean, fitRange: boolean): GstatRun {
  let start: Params = { nugget: initial.nugget, psill: initial.psill, range: initial.range };
  let fitN = fitNugget;
  let fitP = true;
  const warnings: string[] = [];
  for (let pass = 0; pass < 3; pass++) {
    const run = gstatIterate(ev, model, method, start, fitN, fitP, fitRange);
    warnings.push(...run.warnings);
    if (run.singular || !(run.params.nugget < 0 || run.params.psill < 0)) {
      return { ...run, warnings };
    }
    // R: fit.sills = psill > 0; negative sills set to zero; range back to its initial value
    fitN = fitN && run.params.nugget > 0;
    fitP = run.params.psill > 0;
    start = { nugget: Math.max(0, run.params.nugget), psill: Math.max(0, run.params.psill), range: initial.range };
  }
  return { params: start, sse: NaN, converged: false, singular: true, warnings: [...warnings, "negative sills after restarts"] };
}

/** gstat's wls_fit/fit_GaussNewton (fit.c) [pub]. */
function gstatIterate(
  ev: EmpiricalVariogram,
  model: VariogramModelType,
  method: FitMethod,
  startParams: Params,
  fitNugget: boolean,
  fitPsill: boolean,
  fitRange: boolean,
): GstatRun {
  const m = ev.gamma.length;
  const h = ev.dist;
  const g = ev.gamma;
  const p: Params = { ...startParams };
  // gstat: a fitted sill of exactly zero starts at 1 ("avoid lot'o trouble")
  if (fitNugget && p.nugget === 0) p.nugget = 1;
  if (fitPsill && p.psill === 0) p.psill = 1;
  const which: ("nugget" | "psill" | "range")[] = [];
  if (fitNugget) which.push("nugget");
  if (fitPsill) which.push("psill");
  if (fitRange) which.push("range");
  const k = which.length;
  const w = weights(ev, method, { model, ...p }); // gstat fills the weights at the first iteration
  const sse = (q: Params): number => {
    let s = 0;
    for (let j = 0; j < m; j++) {
      const r = g[j] - semivariance({ model, ...q }, h[j]);
      s += w[j] * r * r;
    }
    return s;
  };
  if (k === 0) return { params: p, sse: sse(p), converged: true, singular: false, warnings: [] };
  const X = new Float64Array(m * k);
  const y = new Float64Array(m);
  const A = new Float64Array(k * k);
  const b = new Float64Array(k);
  let oldSSE = Number.MAX_VALUE;
  let iter = 0;
  let current = sse(p);
  for (;;) {
    // design matrix of the linearised model and current residuals, weighted by √w
    for (let j = 0; j < m; j++) {
      const sw = Math.sqrt(w[j]);
      y[j] = (g[j] - semivariance({ model, ...p }, h[j])) * sw;
      for (let c = 0; c < k; c++) {
        const par = which[c];
        const v = par === "nugget" ? (h[j] === 0 ? 0 : 1) : par === "psill" ? unitOrZero(model, h[j], p.range) : p.psill * gstatRangeDerivative(model, h[j], p.range);
        X[j * k + c] = v * sw;
      }
    }
    // normal equations XᵀX β = Xᵀy by Cholesky (gstat's calc_lm)
    for (let r = 0; r < k; r++) {
      let s = 0;
      for (let j = 0; j < m; j++) s += X[j * k + r] * y[j];
      b[r] = s;
      for (let c = 0; c <= r; c++) {
        let t = 0;
        for (let j = 0; j < m; j++) t += X[j * k + r] * X[j * k + c];
        A[r * k + c] = t;
      }
    }
    if (m < k || !choleskySolve(A, b, k)) {
      return { params: p, sse: current, converged: false, singular: true, warnings: ["singular model in variogram fit"] };
    }
    let bounded = false;
    if (fitRange) {
      let nb = 0;
      let ns = 0;
      for (let c = 0; c < k; c++) {
        nb += b[c] * b[c];
        const v = p[which[c]];
        ns += v * v;
      }
      // gstat's v_norm2 is the squared norm: the "20%" limit compares squared lengths
      const s = nb / ns;
      if (s > 0.2) {
        for (let c = 0; c < k; c++) b[c] *= 0.2 / s;
        bounded = true;
      }
    }
    for (let c = 0; c < k; c++) p[which[c]] += b[c];
    current = sse(p);
    let step = oldSSE - current;
    if (current > GSTAT_ZERO) step /= current;
    iter++;
    oldSSE = current;
    if ((step < GSTAT_FIT_LIMIT && step >= 0 && !bounded) || iter === GSTAT_MAX_ITER) break;
  }
  const converged = iter < GSTAT_MAX_ITER;
  return {
    params: p,
    sse: current,
    converged,
    singular: false,
    warnings: converged ? [] : [`No convergence after ${GSTAT_MAX_ITER} iterations: try different initial values?`],
  };
}

/** Solve the small SPD system A x = b in place (x → b); false if not positive definite. */
function choleskySolve(A: Float64Array, b: Float64Array, k: number): boolean {
  for (let j = 0; j < k; j++) {
    let d = A[j * k + j];
    for (let t = 0; t < j; t++) d -= A[j * k + t] * A[j * k + t];
    if (!(d > 0)) return false;
    const l = Math.sqrt(d);
    A[j * k + j] = l;
    for (let i = j + 1; i < k; i++) {
      let s = A[i * k + j];
      for (let t = 0; t < j; t++) s -= A[i * k + t] * A[j * k + t];
      A[i * k + j] = s / l;
    }
  }
  for (let i = 0; i < k; i++) {
    let s = b[i];
    for (let t = 0; t < i; t++) s -= A[i * k + t] * b[t];
    b[i] = s / A[i * k + i];
  }
  for (let i = k - 1; i >= 0; i--) {
    let s = b[i];
    for (let t = i + 1; t < k; t++) s -= A[t * k + i] * b[t];
    b[i] = s / A[i * k + i];
  }
  return true;
}

function mean(xs: number[]): number {
  return xs.reduce((a, b) => a + b, 0) / xs.length;
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}
