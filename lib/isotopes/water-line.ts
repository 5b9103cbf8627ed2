// Water-line fits δ2H = slope·δ18O + intercept through precipitation samples.
// δ in ‰ vs VSMOW, amounts in mm.
import type { WaterLine } from "./excess";
import { isFiniteNumber } from "./validate";

export const WATER_LINE_METHODS = ["ols", "rma", "pwlsr", "pwrma"] as const;
export type WaterLineMethod = (typeof WATER_LINE_METHODS)[number];

/** What each method is and where it comes from (for the UI and the developer guide). */
export const WATER_LINE_METHOD_INFO: Readonly<
  Record<WaterLineMethod, { title: string; weighted: boolean; source: string }>
> = Object.freeze({
  ols: {
    title: "Ordinary least squares of δ2H on δ18O",
    weighted: false,
    source: "textbook formulas [trade]",
  },
  rma: {
    title: "Reduced major axis",
    weighted: false,
    source: "textbook formulas [trade]; worked example Diamond (2022), Stable Isotope Hydrology, Exercise 1 [pub]",
  },
  pwlsr: {
    title: "Precipitation-weighted least squares",
    weighted: true,
    source: "Hughes & Crawford (2012), J. Hydrol. 464–465:344–351, eqs 9–13 [pub]",
  },
  pwrma: {
    title: "Precipitation-weighted reduced major axis",
    weighted: true,
    source: "Crawford, Hughes & Lykoudis (2014), J. Hydrol. 519:2331–2340 [pub citation; formula mem]",
  },
});

/** One sample for a line fit; δ in ‰, amount in mm (needed by the weighted methods). */
export interface WaterLineSample {
  d18O: number | null | undefined;
  d2H: number | null | undefined;
  amountMm?: number | null;
}

export interface WaterLineFit extends WaterLine {
  method: WaterLineMethod;
  /** Standard error of the slope (dimensionless). */
  slopeSE: number;
  /** Standard error of the intercept, ‰. */
  interceptSE: number;
  /** Pearson r (amount-weighted for the weighted methods). */
  r: number;
  r2: number;
  /** Number of samples used. */
  n: number;
  /** Samples left out (a δ value missing; for weighted methods also a missing or zero amount). */
  nLeftOut: number;
  /**
   * Standard deviation of the δ2H residuals from the line (the spread of lc-excess), ‰:
   * √(Σ wᵢeᵢ² / (n − 2)) with wᵢ = 1, or wᵢ = n·pᵢ/Σp for the weighted methods.
   */
  residualSD: number;
  /** Centre of the fit (amount-weighted for weighted methods), ‰. */
  meanD18O: number;
  meanD2H: number;
  /** Σ w(x − x̄)², Σ w(y − ȳ)², Σ w(x − x̄)(y − ȳ) with the weights above (‰²). */
  ssx: number;
  ssy: number;
  spxy: number;
  /** Sum of the amounts used, mm (weighted methods only; null otherwise). */
  sumAmountMm: number | null;
}

/** Fewest usable samples for a line. */
export const MIN_LINE_SAMPLES = 3;

/**
 * Fit a water line δ2H = slope·δ18O + intercept.
 *
 * - `ols`: slope = SPxy/SSx, intercept = ȳ − slope·x̄ [trade].
 * - `rma`: slope = sign(SPxy)·√(SSy/SSx), intercept = ȳ − slope·x̄ [trade]; as worked in
 *   Diamond (2022) Exercise 1.
 * - `pwlsr`: Hughes & Crawford (2012) eqs 9–13 — weighted least squares with
 *   wᵢ = n·pᵢ/Σp (pᵢ the amounts in mm); the slope and intercept equal their eqs 9–10 and the
 *   standard errors their eqs 12–13.
 * - `pwrma`: reduced major axis with the same weights wᵢ = n·pᵢ/Σp — Crawford, Hughes &
 *   Lykoudis (2014) [formula mem]; equals `rma` when all amounts are equal.
 *
 * Standard errors: least-squares methods use s/√SSx and s·√(1/n + x̄²/SSx) with
 * s = residualSD [trade]; the reduced-major-axis methods use the large-sample
 * SE(slope) = |slope|·√((1 − r²)/n) and SE(intercept) = SE(slope)·√(x̄² + SSx/n)
 * (Kermack & Haldane 1950; Miller & Kahn 1962) [mem].
 *
 * Samples with a missing δ value are left out (and, for the weighted methods, those with a
 * missing or zero amount); `nLeftOut` counts them.
 * @throws RangeError with fewer than 3 usable samples, no spread in δ18O or δ2H, a
 *   negative amount, or a weighted method without amounts; TypeError for an unknown method.
 */
export function fitWaterLine(samples: readonly WaterLineSample[], method: WaterLineMethod): WaterLineFit {
  if (!(WATER_LINE_METHODS as readonly string[]).includes(method)) {
    throw new TypeError(`Unknown water-line method "${String(method)}"; use one of ${WATER_LINE_METHODS.join(", ")}.`);
  }
  if (!Array.isArray(samples)) throw new TypeError("samples must be an array of { d18O, d2H, amountMm? }.");
  const weighted = WATER_LINE_METHOD_INFO[method].weighted;

  const xs: number[] = [];
  const ys: number[] = [];
  const ps: number[] = [];
  let withAmount = 0;
  for (const s of samples) {
    if (!s || !isFiniteNumber(s.d18O) || !isFiniteNumber(s.d2H)) continue;
    if (weighted) {
      const p = s.amountMm;
      if (!isFiniteNumber(p)) continue;
      if (p < 0) throw new RangeError(`A precipitation amount is negative (${p} mm); amounts must be ≥ 0 mm.`);
      withAmount++;
      if (p === 0) continue; // zero weight: contributes nothing
      ps.push(p);
    }
    xs.push(s.d18O);
    ys.push(s.d2H);
  }
  if (weighted && withAmount === 0) {
    throw new RangeError(
      `Method "${method}" weights by precipitation amount, but no sample has an amount (amountMm). ` +
        `Add the amounts or use "${method === "pwlsr" ? "ols" : "rma"}".`,
    );
  }
  const n = xs.length;
  if (n < MIN_LINE_SAMPLES) {
    throw new RangeError(
      `A water line needs at least ${MIN_LINE_SAMPLES} usable samples (both δ values${weighted ? " and an amount > 0 mm" : ""}); got ${n}.`,
    );
  }

  // Weights: 1 for unweighted methods; n·pᵢ/Σp for weighted ones (Hughes & Crawford 2012).
  const sumP = weighted ? ps.reduce((a, b) => a + b, 0) : null;
  const w = weighted ? ps.map((p) => (n * p) / (sumP as number)) : xs.map(() => 1);
  const W = w.reduce((a, b) => a + b, 0); // = n in both cases (up to rounding)

  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    sx += w[i] * xs[i];
    sy += w[i] * ys[i];
  }
  const xBar = sx / W;
  const yBar = sy / W;
  let ssx = 0;
  let ssy = 0;
  let spxy = 0;
  for (let i = 0; i < n; i++) {
    const dx = xs[i] - xBar;
    const dy = ys[i] - yBar;
    ssx += w[i] * dx * dx;
    ssy += w[i] * dy * dy;
    spxy += w[i] * dx * dy;
  }
  // Zero spread (relative to the values' size, so rounding noise counts as zero).
  const scaleX = Math.max(1, ...xs.map(Math.abs));
  const scaleY = Math.max(1, ...ys.map(Math.abs));
  if (!(ssx > 1e-20 * W * scaleX * scaleX)) {
    throw new RangeError(`All ${n} usable samples have the same δ18O (${xBar.toFixed(2)} ‰): a water line cannot be fitted.`);
  }
  if (!(ssy > 1e-20 * W * scaleY * scaleY)) {
    throw new RangeError(`All ${n} usable samples have the same δ2H (${yBar.toFixed(1)} ‰): a water line cannot be fitted.`);
  }

  const r = spxy / Math.sqrt(ssx * ssy);
  const r2 = r * r;
  let slope: number;
  if (method === "ols" || method === "pwlsr") {
    // OLS [trade]; PWLSR Hughes & Crawford (2012) eq 9: a = SPxy_w / SSx_w
    slope = spxy / ssx;
  } else {
    // RMA [trade]; PWRMA Crawford et al. (2014) [mem]: a = sign(SPxy)·√(SSy/SSx)
    slope = (spxy < 0 ? -1 : 1) * Math.sqrt(ssy / ssx);
  }
  // Hughes & Crawford (2012) eq 10 / textbook: b = ȳ − a·x̄
  const intercept = yBar - slope * xBar;

  let sse = 0;
  for (let i = 0; i < n; i++) {
    const e = ys[i] - slope * xs[i] - intercept;
    sse += w[i] * e * e;
  }
  const residualSD = Math.sqrt(sse / (n - 2));

  let slopeSE: number;
  let interceptSE: number;
  if (method === "ols" || method === "pwlsr") {
    // Weighted least squares standard errors (Hughes & Crawford 2012 eqs 12–13 with wᵢ = n·pᵢ/Σp)
    slopeSE = residualSD / Math.sqrt(ssx);
    interceptSE = residualSD * Math.sqrt(1 / W + (xBar * xBar) / ssx);
  } else {
    // Large-sample RMA standard errors (Kermack & Haldane 1950; Miller & Kahn 1962) [mem]
    slopeSE = Math.abs(slope) * Math.sqrt(Math.max(0, 1 - r2) / n);
    interceptSE = slopeSE * Math.sqrt(xBar * xBar + ssx / W);
  }

  return {
    method,
    slope,
    intercept,
    slopeSE,
    interceptSE,
    r,
    r2,
    n,
    nLeftOut: samples.length - n,
    residualSD,
    meanD18O: xBar,
    meanD2H: yBar,
    ssx,
    ssy,
    spxy,
    sumAmountMm: sumP,
  };
}
