// Equilibrium (liquid–vapour) and kinetic fractionation. Temperatures in °C (T in K = t + 273.15),
// relative humidity as a fraction 0–1, enrichments ε in ‰.
import { requireFinite, requireInRange } from "./validate";

export type Isotope = "18O" | "2H";
export const ISOTOPES: readonly Isotope[] = ["18O", "2H"];
export type EquilibriumSource = "majoube1971" | "horita-wesolowski1994";

/** Kelvin offset. */
export const KELVIN = 273.15;

/** Temperature range (°C) each equilibrium equation was published for. */
export const EQUILIBRIUM_RANGE_C: Readonly<Record<EquilibriumSource, readonly [number, number]>> = Object.freeze({
  // Majoube (1971) measured 273–373 K.
  majoube1971: [0, 100] as const,
  // Horita & Wesolowski (1994) fitted 0 °C up to the critical point of water (374.1 °C).
  "horita-wesolowski1994": [0, 374.1] as const,
});

function requireIsotope(isotope: unknown): Isotope {
  if (isotope !== "18O" && isotope !== "2H") {
    throw new TypeError(`isotope must be "18O" or "2H"; got ${JSON.stringify(isotope)}.`);
  }
  return isotope;
}

/**
 * Equilibrium liquid–vapour fractionation factor α = R_liquid / R_vapour (> 1).
 * - `majoube1971`: Majoube (1971), J. Chim. Phys. 68:1423–1436, valid 0–100 °C.
 * - `horita-wesolowski1994`: Horita & Wesolowski (1994), GCA 58:3425–3437, valid 0–374.1 °C.
 * @param tempC temperature in °C
 * @throws RangeError outside the equation's published temperature range
 */
export function equilibriumAlpha(tempC: number, isotope: Isotope, source: EquilibriumSource = "horita-wesolowski1994"): number {
  requireIsotope(isotope);
  if (source !== "majoube1971" && source !== "horita-wesolowski1994") {
    throw new TypeError(`source must be "majoube1971" or "horita-wesolowski1994"; got ${JSON.stringify(source)}.`);
  }
  const [lo, hi] = EQUILIBRIUM_RANGE_C[source];
  requireInRange("temperature", tempC, lo, hi, {
    unit: "°C",
    why: `the ${source} equation was published for ${lo}–${hi} °C only`,
  });
  const T = tempC + KELVIN;
  if (source === "majoube1971") {
    if (isotope === "18O") {
      // Majoube (1971): ln α18 = 1137/T² − 0.4156/T − 0.0020667
      return Math.exp(1137 / (T * T) - 0.4156 / T - 0.0020667);
    }
    // Majoube (1971): ln α2 = 24844/T² − 76.248/T + 0.052612
    return Math.exp(24844 / (T * T) - 76.248 / T + 0.052612);
  }
  if (isotope === "18O") {
    // Horita & Wesolowski (1994): 10³ln α18 = −7.685 + 6.7123·10³/T − 1.6664·10⁶/T² + 0.35041·10⁹/T³
    const thousandLn = -7.685 + 6.7123e3 / T - 1.6664e6 / (T * T) + 0.35041e9 / (T * T * T);
    return Math.exp(thousandLn / 1000);
  }
  // Horita & Wesolowski (1994): 10³ln α2 = 1158.8·T³/10⁹ − 1620.1·T²/10⁶ + 794.84·T/10³ − 161.04 + 2.9992·10⁹/T³
  const thousandLn = (1158.8 * T ** 3) / 1e9 - (1620.1 * T ** 2) / 1e6 + (794.84 * T) / 1e3 - 161.04 + 2.9992e9 / T ** 3;
  return Math.exp(thousandLn / 1000);
}

/** Equilibrium enrichment ε = (α − 1)·1000 in ‰ (the form tabulated for Majoube 1971). */
export function equilibriumEpsilonPermil(
  tempC: number,
  isotope: Isotope,
  source: EquilibriumSource = "horita-wesolowski1994",
): number {
  return (equilibriumAlpha(tempC, isotope, source) - 1) * 1000;
}

/**
 * Molecular diffusivity ratios D_i/D of the heavy isotopologue to H2¹⁶O in air —
 * Merlivat (1978), J. Chem. Phys. 69:2864.
 */
export const MERLIVAT_DIFFUSIVITY_RATIOS: Readonly<Record<Isotope, number>> = Object.freeze({
  "18O": 0.9723, // D(H2¹⁸O)/D(H2O)
  "2H": 0.9755, // D(HDO)/D(H2O)
});

/**
 * Kinetic constants C_K (‰) over an open water body, ε_K = C_K·(1 − h) —
 * Gonfiantini (1986), Handbook of Environmental Isotope Geochemistry vol. 2 [mem].
 */
export const GONFIANTINI_KINETIC_CONSTANTS_PERMIL: Readonly<Record<Isotope, number>> = Object.freeze({
  "18O": 14.2,
  "2H": 12.5,
});

/**
 * Kinetic constant from diffusivities, C_K = n·θ·(D/D_i − 1)·1000 ‰ — Gat (1996), Annu. Rev.
 * Earth Planet. Sci. 24:225–262, with Merlivat's (1978) ratios. n = 1/2 for a turbulent
 * (fully developed) boundary layer, 2/3 laminar, 1 stagnant; θ = 1 for a small water body
 * whose evaporation does not change the air above it.
 */
export function kineticConstantFromDiffusivity(isotope: Isotope, n = 0.5, theta = 1): number {
  requireIsotope(isotope);
  requireInRange("n (diffusion exponent)", n, 0.5, 1, { why: "n runs from 1/2 (turbulent) to 1 (stagnant)" });
  requireInRange("θ (weighting of the air column)", theta, 0, 1, { minExclusive: true });
  // Gat (1996): C_K = n·θ·C_D, C_D = (D/D_i − 1)·1000 with Merlivat (1978) D_i/D
  return n * theta * (1 / MERLIVAT_DIFFUSIVITY_RATIOS[isotope] - 1) * 1000;
}

export type KineticMethod =
  | { method: "gonfiantini1986" }
  | { method: "diffusivity"; n?: number; theta?: number }
  | { method: "constant"; constantPermil: number };

/**
 * Kinetic enrichment of evaporation ε_K = C_K·(1 − h) in ‰ — Gonfiantini (1986); with
 * `diffusivity` the constant comes from Merlivat's diffusivity ratios (Gat 1996).
 * @param humidity relative humidity normalised to the water-surface temperature, fraction 0–1
 */
export function kineticEnrichment(
  humidity: number,
  isotope: Isotope,
  kinetic: KineticMethod = { method: "gonfiantini1986" },
): number {
  requireInRange("relative humidity", humidity, 0, 1, { why: "give humidity as a fraction (0.75, not 75)" });
  return kineticConstant(isotope, kinetic) * (1 - humidity);
}

/** C_K in ‰ for a kinetic method. */
export function kineticConstant(isotope: Isotope, kinetic: KineticMethod = { method: "gonfiantini1986" }): number {
  requireIsotope(isotope);
  if (!kinetic || typeof kinetic !== "object") throw new TypeError("kinetic must be { method: ... }.");
  switch (kinetic.method) {
    case "gonfiantini1986":
      return GONFIANTINI_KINETIC_CONSTANTS_PERMIL[isotope];
    case "diffusivity":
      return kineticConstantFromDiffusivity(isotope, kinetic.n ?? 0.5, kinetic.theta ?? 1);
    case "constant":
      return requireInRange("kinetic constant", kinetic.constantPermil, 0, 100, { unit: "‰" });
    default:
      throw new TypeError(
        `Unknown kinetic method ${JSON.stringify((kinetic as { method?: unknown }).method)}; use "gonfiantini1986", "diffusivity" or "constant".`,
      );
  }
}

/** Require a δ value in ‰ (finite). */
export function requireDelta(name: string, v: unknown): number {
  return requireFinite(name, v, "‰");
}
