// Rayleigh distillation of a well-mixed reservoir. δ in ‰ vs VSMOW.
import { requireFinite, requireInRange } from "./validate";

export interface RayleighParams {
  /** Initial reservoir composition, ‰. */
  delta0: number;
  /**
   * Fractionation factor α = R_product / R_reservoir between the phase being removed and the
   * phase that stays: for rain condensing out of vapour, α = α_liquid/vapour (> 1); for
   * vapour leaving a liquid, α = 1/α_liquid/vapour (< 1).
   */
  alpha: number;
  /** Fraction of the reservoir remaining, (0, 1]. */
  f: number;
}

export interface RayleighResult {
  /** Remaining reservoir, ‰. */
  reservoir: number;
  /** Product forming at this moment (in equilibrium with the reservoir), ‰. */
  instantaneous: number;
  /** Everything removed so far, pooled, ‰ (at f = 1 the limit, equal to the instantaneous product). */
  accumulated: number;
}

/**
 * Rayleigh distillation [trade]: R/R0 = f^(α−1) for the reservoir, R_inst = α·R, and the pooled
 * product R_acc = R0·(1 − f^α)/(1 − f) from mass balance.
 */
export function rayleigh(params: RayleighParams): RayleighResult {
  if (!params || typeof params !== "object") throw new TypeError("rayleigh needs { delta0, alpha, f }.");
  const delta0 = requireFinite("delta0", params.delta0, "‰");
  const alpha = requireInRange("alpha", params.alpha, 0.5, 2, {
    minExclusive: true,
    why: "α is a ratio of isotope ratios close to 1 (e.g. 1.0098 for ¹⁸O at 20 °C)",
  });
  const f = requireInRange("f (remaining fraction)", params.f, 0, 1, {
    minExclusive: true,
    why: "f is the fraction of the reservoir left, from just above 0 to 1",
  });
  const r0 = 1 + delta0 / 1000;
  // Rayleigh [trade]: R = R0·f^(α−1)
  const r = r0 * Math.pow(f, alpha - 1);
  // Instantaneous product in equilibrium with the reservoir: R_inst = α·R
  const rInst = alpha * r;
  // Mass balance R0 = f·R + (1 − f)·R_acc → R_acc = R0(1 − f^α)/(1 − f); limit α·R0 as f → 1
  const rAcc = 1 - f < 1e-12 ? alpha * r0 : (r0 * (1 - Math.pow(f, alpha))) / (1 - f);
  return {
    reservoir: (r - 1) * 1000,
    instantaneous: (rInst - 1) * 1000,
    accumulated: (rAcc - 1) * 1000,
  };
}
