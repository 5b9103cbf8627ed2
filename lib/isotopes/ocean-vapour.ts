// Vapour evaporated from the ocean under the closure assumption. δ in ‰ vs VSMOW,
// temperature in °C, humidity as a fraction 0–1 (normalised to the sea-surface temperature).
import { D_EXCESS_SLOPE, type IsotopePair } from "./excess";
import { equilibriumAlpha, type EquilibriumSource } from "./fractionation";
import { requireFinite, requireInRange } from "./validate";

/**
 * Kinetic factors for the smooth regime (wind below ~7 m/s), in ‰: k18 ≈ 6.0‰ and
 * k2H ≈ 0.88·k18 — Merlivat & Jouzel (1979), JGR 84(C8):5029–5033 [mem].
 * (0.88 is also the ratio of Merlivat's (1978) diffusivity constants, 25.1/28.5.)
 */
export const OCEAN_KINETIC_FACTORS_PERMIL = Object.freeze({ k18: 6.0, k2H: 0.88 * 6.0 });

/** Mean ocean water [trade]: 0‰ / 0‰, d = 0. */
export const SEAWATER: Readonly<IsotopePair> = Object.freeze({ d18O: 0, d2H: 0 });

export interface OceanVapourParams {
  /** Sea-surface temperature, °C. */
  seaSurfaceTempC: number;
  /** Relative humidity normalised to the sea-surface temperature, fraction [0, 1]. */
  humidity: number;
  /** Ocean surface water, ‰ (default 0/0). */
  ocean?: IsotopePair;
  /** Kinetic factor for ¹⁸O, ‰ (default 6.0, smooth regime). */
  k18Permil?: number;
  /** Kinetic factor for ²H, ‰ (default 0.88·k18). */
  k2HPermil?: number;
  /** Equilibrium equation, default Majoube (1971) as in Merlivat & Jouzel (1979). */
  equilibrium?: EquilibriumSource;
}

export interface OceanVapourResult extends IsotopePair {
  /** d = δ2H − 8·δ18O of the vapour, ‰. */
  dExcess: number;
  alpha18: number;
  alpha2H: number;
  k18Permil: number;
  k2HPermil: number;
}

/**
 * Composition of vapour evaporated from the ocean when the overlying vapour is that same
 * evaporate (the closure assumption) — Merlivat & Jouzel (1979):
 *   R_E = (1 − k)·R_oc / (α*·(1 − k·h))
 * from R_E = (1 − k)(R_oc/α* − h·R_A)/(1 − h) with R_A = R_E.
 */
export function oceanVapourClosure(params: OceanVapourParams): OceanVapourResult {
  if (!params || typeof params !== "object") throw new TypeError("oceanVapourClosure needs a parameter object.");
  const h = requireInRange("relative humidity", params.humidity, 0, 1, {
    why: "give it as a fraction (0.8, not 80)",
  });
  const ocean = params.ocean ?? SEAWATER;
  requireFinite("ocean.d18O", ocean.d18O, "‰");
  requireFinite("ocean.d2H", ocean.d2H, "‰");
  const k18 = requireInRange("k18", params.k18Permil ?? OCEAN_KINETIC_FACTORS_PERMIL.k18, 0, 50, { unit: "‰" });
  const k2H = requireInRange("k2H", params.k2HPermil ?? 0.88 * k18, 0, 50, { unit: "‰" });
  const source = params.equilibrium ?? "majoube1971";
  const a18 = equilibriumAlpha(params.seaSurfaceTempC, "18O", source);
  const a2 = equilibriumAlpha(params.seaSurfaceTempC, "2H", source);

  const vapour = (deltaOcean: number, alpha: number, kPermil: number) => {
    const k = kPermil / 1000;
    // Merlivat & Jouzel (1979) closure: R_E/R_std = (1 − k)(1 + δ_oc/1000) / (α*(1 − k·h))
    return (((1 - k) * (1 + deltaOcean / 1000)) / (alpha * (1 - k * h)) - 1) * 1000;
  };
  const d18O = vapour(ocean.d18O, a18, k18);
  const d2H = vapour(ocean.d2H, a2, k2H);
  return { d18O, d2H, dExcess: d2H - D_EXCESS_SLOPE * d18O, alpha18: a18, alpha2H: a2, k18Permil: k18, k2HPermil: k2H };
}
