// Craig–Gordon evaporation model for an open water body, in the forms of Gonfiantini (1986)
// and Gat (1996). δ in ‰ vs VSMOW, temperatures in °C, humidity as a fraction 0–1.
import type { IsotopePair } from "./excess";
import {
  equilibriumAlpha,
  kineticEnrichment,
  type EquilibriumSource,
  type Isotope,
  type KineticMethod,
} from "./fractionation";
import { requireFinite, requireInRange } from "./validate";

export interface CraigGordonParams {
  /** Temperature of the evaporating water surface, °C (sets the equilibrium α*). */
  tempC: number;
  /** Relative humidity of the air normalised to the water-surface temperature, fraction [0, 1). */
  humidity: number;
  /** Atmospheric vapour over the water, ‰ (see `equilibriumVapour` to estimate it from precipitation). */
  atmosphere: IsotopePair;
  /**
   * Composition of the lake water now (or at the start of desiccation), ‰. When left out and a
   * through-flow lake is described, the steady-state composition is used.
   */
  lake?: IsotopePair;
  /** Remaining fraction of the initial volume for a lake drying without inflow, (0, 1]. */
  remainingFraction?: number;
  /** Inflow composition for a steady-state through-flow lake, ‰. */
  inflow?: IsotopePair;
  /** Evaporation over inflow, x = E/I, [0, 1], for the steady-state through-flow lake. */
  evaporationToInflow?: number;
  /** Kinetic enrichment; default Gonfiantini (1986) C_K·(1 − h). */
  kinetic?: KineticMethod;
  /** Equilibrium equation; default Horita & Wesolowski (1994). */
  equilibrium?: EquilibriumSource;
}

export interface CraigGordonIsotope {
  /** Equilibrium α* = R_liquid/R_vapour (> 1). */
  alpha: number;
  /** ε* = (1 − 1/α*)·1000, ‰ (the convention that makes the forms below exact). */
  epsilonEqPermil: number;
  /** ε_K, ‰. */
  epsilonKPermil: number;
  /** ε = ε* + ε_K, ‰. */
  epsilonPermil: number;
  /** Composition of the evaporating flux δE from the lake composition, ‰. */
  deltaE: number;
  /** Limiting composition δ* of a lake drying up, ‰. */
  deltaStar: number;
  /** Exponent m of δL(f) (dimensionless). */
  m: number;
  /** δL at the remaining fraction f of a lake drying without inflow, ‰ (null unless f given). */
  deltaLAtF: number | null;
  /** Steady-state through-flow lake composition, ‰ (null unless inflow and E/I given). */
  deltaLSteadyState: number | null;
}

export interface CraigGordonResult {
  d18O: CraigGordonIsotope;
  d2H: CraigGordonIsotope;
  /** The lake composition the flux, slope and δL(f) were computed from, ‰. */
  lake: IsotopePair;
  /**
   * Slope of the evaporation line in δ2H–δ18O space at the lake composition,
   * (δE − δL)₂/(δE − δL)₁₈ = m₂(δL − δ*)₂ / m₁₈(δL − δ*)₁₈ (Gat 1996); null if undefined.
   */
  evaporationLineSlope: number | null;
}

/**
 * The Craig & Gordon (1965) model as written by Gonfiantini (1986) and Gat (1996):
 *   δE = (α*⁻¹·δL − h·δA − ε) / (1 − h + 10⁻³·ε_K)
 *   δ* = (h·δA + ε) / (h − 10⁻³·ε)
 *   m  = (h − 10⁻³·ε) / (1 − h + 10⁻³·ε_K)
 *   δL(f) = δ* − (δ* − δ0)·f^m                      (lake drying without inflow)
 *   δL,ss = (δI + m·x·δ*) / (1 + m·x), x = E/I         (steady-state through-flow lake; Gat 1996)
 * with ε* = (1 − 1/α*)·1000 and ε = ε* + ε_K. With this ε* the expressions are mutually exact
 * (δ* is where δE = δL, and the through-flow lake satisfies I·δI = Q·δL + E·δE).
 * @throws RangeError for humidity outside [0, 1), humidity too low for a finite δ* (h ≤ ε/1000),
 *   f outside (0, 1], E/I outside [0, 1] or a temperature outside the equation's range.
 */
export function craigGordon(params: CraigGordonParams): CraigGordonResult {
  if (!params || typeof params !== "object") throw new TypeError("craigGordon needs a parameter object.");
  const h = requireInRange("relative humidity", params.humidity, 0, 1, {
    maxExclusive: true,
    why: "give it as a fraction (0.75, not 75); at h = 1 there is no net evaporation",
  });
  requireFinite("water-surface temperature", params.tempC, "°C");
  const atm = requirePair("atmosphere", params.atmosphere);
  const f =
    params.remainingFraction === undefined
      ? null
      : requireInRange("remaining fraction f", params.remainingFraction, 0, 1, { minExclusive: true });
  const hasInflow = params.inflow !== undefined || params.evaporationToInflow !== undefined;
  if (hasInflow && (params.inflow === undefined || params.evaporationToInflow === undefined)) {
    throw new TypeError("A through-flow lake needs both inflow { d18O, d2H } and evaporationToInflow (E/I).");
  }
  const inflow = hasInflow ? requirePair("inflow", params.inflow) : null;
  const x = hasInflow ? requireInRange("evaporation/inflow E/I", params.evaporationToInflow, 0, 1) : null;
  if (params.lake === undefined && !hasInflow) {
    throw new TypeError("Give the lake composition (lake) or a through-flow lake (inflow and evaporationToInflow).");
  }
  const kinetic = params.kinetic ?? { method: "gonfiantini1986" };
  const source = params.equilibrium ?? "horita-wesolowski1994";

  const constants = (iso: Isotope) => {
    const alpha = equilibriumAlpha(params.tempC, iso, source);
    const epsEq = (1 - 1 / alpha) * 1000;
    const epsK = kineticEnrichment(h, iso, kinetic);
    const eps = epsEq + epsK;
    const denom = 1 - h + 1e-3 * epsK;
    const num = h - 1e-3 * eps;
    if (!(num > 0)) {
      throw new RangeError(
        `Humidity h = ${h} is at or below ε/1000 = ${(eps / 1000).toFixed(3)} for ${iso}: the model has no finite limiting composition. Use h > ${(eps / 1000).toFixed(3)}.`,
      );
    }
    // Gonfiantini (1986): m = (h − 10⁻³ε)/(1 − h + 10⁻³ε_K)
    const m = num / denom;
    const iKey = iso === "18O" ? "d18O" : "d2H";
    // Gonfiantini (1986): δ* = (h·δA + ε)/(h − 10⁻³ε)
    const deltaStar = (h * atm[iKey] + eps) / num;
    // Gat (1996): steady-state through-flow lake δL = (δI + m·x·δ*)/(1 + m·x)
    const steady = inflow && x !== null ? (inflow[iKey] + m * x * deltaStar) / (1 + m * x) : null;
    return { alpha, epsEq, epsK, eps, denom, m, deltaStar, steady, iKey };
  };
  const c18 = constants("18O");
  const c2 = constants("2H");

  const lake: IsotopePair = params.lake
    ? requirePair("lake", params.lake)
    : { d18O: c18.steady as number, d2H: c2.steady as number };

  const finish = (c: ReturnType<typeof constants>): CraigGordonIsotope => {
    const dL = lake[c.iKey as "d18O" | "d2H"];
    // Gonfiantini (1986): δE = (α*⁻¹·δL − h·δA − ε)/(1 − h + 10⁻³ε_K)
    const deltaE = (dL / c.alpha - h * atm[c.iKey as "d18O" | "d2H"] - c.eps) / c.denom;
    // Gonfiantini (1986): δL(f) = δ* − (δ* − δ0)·f^m
    const deltaLAtF = f === null ? null : c.deltaStar - (c.deltaStar - dL) * Math.pow(f, c.m);
    return {
      alpha: c.alpha,
      epsilonEqPermil: c.epsEq,
      epsilonKPermil: c.epsK,
      epsilonPermil: c.eps,
      deltaE,
      deltaStar: c.deltaStar,
      m: c.m,
      deltaLAtF,
      deltaLSteadyState: c.steady,
    };
  };
  const r18 = finish(c18);
  const r2 = finish(c2);
  // Gat (1996): evaporation-line slope = (δE − δL)₂/(δE − δL)₁₈ at the lake composition
  const dx = r18.deltaE - lake.d18O;
  const slope = Math.abs(dx) > 1e-12 ? (r2.deltaE - lake.d2H) / dx : null;
  return { d18O: r18, d2H: r2, lake, evaporationLineSlope: slope };
}

/**
 * Vapour in isotopic equilibrium with precipitation (or any liquid) at tempC:
 * δA = (δP − ε*)/α* with ε* = (α* − 1)·1000, i.e. R_A = R_P/α* — the definition of α = R_liquid/R_vapour
 * [trade]; a common way to estimate δA over a lake when it is not measured.
 */
export function equilibriumVapour(
  liquid: IsotopePair,
  tempC: number,
  source: EquilibriumSource = "horita-wesolowski1994",
): IsotopePair {
  const p = requirePair("liquid", liquid);
  const a18 = equilibriumAlpha(tempC, "18O", source);
  const a2 = equilibriumAlpha(tempC, "2H", source);
  // R_vapour = R_liquid/α*: δA = (δP − (α* − 1)·1000)/α*
  return {
    d18O: (p.d18O - (a18 - 1) * 1000) / a18,
    d2H: (p.d2H - (a2 - 1) * 1000) / a2,
  };
}

function requirePair(name: string, v: unknown): IsotopePair {
  if (!v || typeof v !== "object") throw new TypeError(`${name} must be { d18O, d2H } in ‰.`);
  const o = v as Record<string, unknown>;
  return { d18O: requireFinite(`${name}.d18O`, o.d18O, "‰"), d2H: requireFinite(`${name}.d2H`, o.d2H, "‰") };
}
