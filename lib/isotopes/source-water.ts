// Source water of evaporated samples: where their evaporation line meets a meteoric water line.
// δ in ‰ vs VSMOW.
import type { IsotopePair, WaterLine } from "./excess";
import { fitWaterLine, type WaterLineFit, type WaterLineSample } from "./water-line";
import { isFiniteNumber, requireFinite } from "./validate";

/** A meteoric water line, optionally with its own uncertainty (e.g. a predicted local line). */
export interface MeteoricLineInput extends WaterLine {
  slopeSE?: number;
  interceptSE?: number;
  /** Covariance of slope and intercept (‰); 0 when not given. */
  slopeInterceptCov?: number;
}

export interface SourceWaterOptions {
  /**
   * `delta` (default): first-order propagation (delta method) of the evaporation line's slope and
   * intercept covariance, plus the meteoric line's when given. `bootstrap`: resample the samples
   * with replacement (seeded, deterministic) and refit.
   */
  uncertainty?: "delta" | "bootstrap";
  /** Bootstrap draws (default 2000). */
  draws?: number;
  /** Seed of the bootstrap's random numbers (default 1). */
  seed?: number;
}

export interface SourceWaterResult extends IsotopePair {
  /** Standard error of the estimate, ‰. */
  d18OSE: number;
  d2HSE: number;
  /** 95% interval, ‰: ±1.96·SE for `delta`, the 2.5–97.5 percentiles for `bootstrap`. */
  interval95: { d18O: [number, number]; d2H: [number, number] };
  /** How the uncertainty was found. */
  uncertaintyMethod: "delta-method propagation" | "bootstrap";
  /** Draws that gave an intersection (bootstrap only). */
  drawsUsed: number | null;
  /** The evaporation line fitted to the samples (ordinary least squares). */
  evaporationLine: WaterLineFit;
  /** Things a reader should know (weak fit, slope close to the water line's, …). */
  warnings: string[];
}

/** A slope of an evaporation line above this is hard to tell from a meteoric line [trade]. */
const STEEP_EVAPORATION_SLOPE = 7;

/**
 * Estimate the source water of a set of evaporated samples as the intersection of their
 * evaporation line (ordinary least squares of δ2H on δ18O) with a meteoric water line [trade]
 * (the evaporation-line method, e.g. Gat 1996):
 *   δ18O_s = (b_e − b_m)/(a_m − a_e),  δ2H_s = a_m·δ18O_s + b_m.
 * Uncertainty: delta-method propagation by default (states it in `uncertaintyMethod`), or a
 * seeded bootstrap. The meteoric line's own uncertainty is included when given.
 * @throws RangeError with fewer than 3 usable samples, no spread, or an evaporation line not
 *   shallower than the meteoric line (no evaporation trend, no intersection on the right side).
 */
export function sourceWaterFromEvaporationLine(
  samples: readonly WaterLineSample[],
  waterLine: MeteoricLineInput,
  options: SourceWaterOptions = {},
): SourceWaterResult {
  if (!waterLine || typeof waterLine !== "object") throw new TypeError("waterLine must be { slope, intercept }.");
  const am = requireFinite("waterLine.slope", waterLine.slope);
  const bm = requireFinite("waterLine.intercept", waterLine.intercept, "‰");
  const evap = fitWaterLine(samples, "ols");
  const warnings: string[] = [];
  if (!(evap.slope < am - 1e-9)) {
    throw new RangeError(
      `The samples' line has slope ${evap.slope.toFixed(2)}, not shallower than the water line's ${am.toFixed(2)}: ` +
        "they show no evaporation trend, so there is no source-water intersection. Check the samples are from one evaporating water.",
    );
  }
  if (evap.slope > STEEP_EVAPORATION_SLOPE) {
    warnings.push(
      `The samples' line is steep (slope ${evap.slope.toFixed(2)}), close to the water line's; the intersection is poorly defined.`,
    );
  }
  if (evap.r2 < 0.8) warnings.push(`The samples scatter about their line (r² = ${evap.r2.toFixed(2)}); treat the estimate with care.`);
  if (evap.n < 5) warnings.push(`Only ${evap.n} samples define the evaporation line.`);

  const point = intersect(evap.slope, evap.intercept, am, bm);
  const method = options.uncertainty ?? "delta";
  if (method !== "delta" && method !== "bootstrap") {
    throw new TypeError(`uncertainty must be "delta" or "bootstrap"; got ${JSON.stringify(method)}.`);
  }

  const amSE = isFiniteNumber(waterLine.slopeSE) ? waterLine.slopeSE : 0;
  const bmSE = isFiniteNumber(waterLine.interceptSE) ? waterLine.interceptSE : 0;
  const mCov = isFiniteNumber(waterLine.slopeInterceptCov) ? waterLine.slopeInterceptCov : 0;

  if (method === "delta") {
    const D = am - evap.slope;
    const x = point.d18O;
    // Covariance of the OLS slope a_e and intercept b_e [trade]: Var(a) = s²/SSx,
    // Var(b) = s²(1/n + x̄²/SSx), Cov(a, b) = −x̄·s²/SSx
    const s2 = evap.residualSD * evap.residualSD;
    const vA = s2 / evap.ssx;
    const vB = s2 * (1 / evap.n + (evap.meanD18O * evap.meanD18O) / evap.ssx);
    const cAB = (-evap.meanD18O * s2) / evap.ssx;
    // Gradients of x* = (b_e − b_m)/(a_m − a_e) and y* = a_m·x* + b_m (delta method)
    const gx = { ae: x / D, be: 1 / D, am: -x / D, bm: -1 / D };
    const gy = { ae: am * gx.ae, be: am * gx.be, am: x + am * gx.am, bm: 1 + am * gx.bm };
    const variance = (g: typeof gx) =>
      g.ae * g.ae * vA +
      g.be * g.be * vB +
      2 * g.ae * g.be * cAB +
      g.am * g.am * amSE * amSE +
      g.bm * g.bm * bmSE * bmSE +
      2 * g.am * g.bm * mCov;
    const sx = Math.sqrt(Math.max(0, variance(gx)));
    const sy = Math.sqrt(Math.max(0, variance(gy)));
    return {
      ...point,
      d18OSE: sx,
      d2HSE: sy,
      interval95: {
        d18O: [point.d18O - 1.96 * sx, point.d18O + 1.96 * sx],
        d2H: [point.d2H - 1.96 * sy, point.d2H + 1.96 * sy],
      },
      uncertaintyMethod: "delta-method propagation",
      drawsUsed: null,
      evaporationLine: evap,
      warnings,
    };
  }

  // Bootstrap: resample the usable samples with replacement; perturb the meteoric line by its SEs.
  const draws = Math.floor(requireFinite("draws", options.draws ?? 2000));
  if (draws < 100) throw new RangeError(`A bootstrap needs at least 100 draws; got ${draws}.`);
  const rand = mulberry32(Math.floor(requireFinite("seed", options.seed ?? 1)));
  const usable = samples.filter((s) => s && isFiniteNumber(s.d18O) && isFiniteNumber(s.d2H));
  const xs: number[] = [];
  const ys: number[] = [];
  for (let k = 0; k < draws; k++) {
    const resample: WaterLineSample[] = [];
    for (let i = 0; i < usable.length; i++) resample.push(usable[Math.floor(rand() * usable.length)]);
    let line: WaterLineFit;
    try {
      line = fitWaterLine(resample, "ols");
    } catch {
      continue; // a resample with no spread: skip it
    }
    const z1 = gaussian(rand);
    const z2 = gaussian(rand);
    // Correlated slope/intercept draw from their 2×2 covariance (Cholesky).
    const l11 = amSE;
    const l21 = amSE > 0 ? mCov / amSE : 0;
    const l22 = Math.sqrt(Math.max(0, bmSE * bmSE - l21 * l21));
    const a = am + l11 * z1;
    const b = bm + l21 * z1 + l22 * z2;
    if (!(line.slope < a)) continue;
    const p = intersect(line.slope, line.intercept, a, b);
    xs.push(p.d18O);
    ys.push(p.d2H);
  }
  if (xs.length < draws / 2) {
    warnings.push(`Only ${xs.length} of ${draws} bootstrap draws gave an intersection; the estimate is unstable.`);
  }
  if (xs.length < 2) {
    throw new RangeError("Too few bootstrap draws gave an intersection to estimate an uncertainty; use more samples.");
  }
  return {
    ...point,
    d18OSE: sd(xs),
    d2HSE: sd(ys),
    interval95: { d18O: [quantile(xs, 0.025), quantile(xs, 0.975)], d2H: [quantile(ys, 0.025), quantile(ys, 0.975)] },
    uncertaintyMethod: "bootstrap",
    drawsUsed: xs.length,
    evaporationLine: evap,
    warnings,
  };
}

function intersect(ae: number, be: number, am: number, bm: number): IsotopePair {
  // Intersection of δ2H = a_e·δ18O + b_e with δ2H = a_m·δ18O + b_m
  const x = (be - bm) / (am - ae);
  return { d18O: x, d2H: am * x + bm };
}

/** Small seeded PRNG (mulberry32), uniform in [0, 1). Deterministic for a seed. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussian(rand: () => number): number {
  // Box–Muller transform
  const u = Math.max(rand(), 1e-300);
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

function sd(xs: readonly number[]): number {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  return Math.sqrt(xs.reduce((a, b) => a + (b - m) * (b - m), 0) / (xs.length - 1));
}

function quantile(xs: readonly number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  const pos = (s.length - 1) * q;
  const lo = Math.floor(pos);
  const hi = Math.ceil(pos);
  return s[lo] + (s[hi] - s[lo]) * (pos - lo);
}
