// Deuterium excess and line-conditioned excess. All δ values in ‰ vs VSMOW.
import { requireFinite } from "./validate";

/** A straight water line in δ space: δ2H = slope·δ18O + intercept (intercept in ‰). */
export interface WaterLine {
  slope: number;
  intercept: number;
}

/** A pair of δ values in ‰ vs VSMOW. */
export interface IsotopePair {
  d18O: number;
  d2H: number;
}

/** Global meteoric water line δ2H = 8·δ18O + 10 — Craig (1961), Science 133:1702–1703. */
export const GMWL: Readonly<WaterLine> = Object.freeze({ slope: 8, intercept: 10 });

/**
 * Amount-weighted global line δ2H = 8.17·δ18O + 11.27 — Rozanski, Araguás-Araguás &
 * Gonfiantini (1993), AGU Geophys. Monogr. 78. [mem: recalled, not confirmed; some texts
 * quote 8.13/10.8.] Shown for comparison only; GMWL is the reference the checks use.
 */
export const GMWL_AMOUNT_WEIGHTED_1993: Readonly<WaterLine> = Object.freeze({ slope: 8.17, intercept: 11.27 });

/** Slope used in the deuterium-excess definition (dimensionless). */
export const D_EXCESS_SLOPE = 8;

/**
 * Deuterium excess d = δ2H − 8·δ18O in ‰ — Dansgaard (1964), Tellus 16:436–468.
 * @param d18O δ18O in ‰ vs VSMOW
 * @param d2H δ2H in ‰ vs VSMOW
 */
export function dExcess(d18O: number, d2H: number): number {
  requireFinite("δ18O", d18O, "‰");
  requireFinite("δ2H", d2H, "‰");
  // Dansgaard (1964): d = δ2H − 8·δ18O
  return d2H - D_EXCESS_SLOPE * d18O;
}

/**
 * Line-conditioned excess lc-excess = δ2H − a·δ18O − b in ‰, with a, b the slope and
 * intercept of a local water line — Landwehr & Coplen (2006), IAEA-CSP-26.
 * It is the vertical (δ2H) distance of the sample from that line.
 */
export function lcExcess(d18O: number, d2H: number, line: WaterLine): number {
  requireFinite("δ18O", d18O, "‰");
  requireFinite("δ2H", d2H, "‰");
  if (line === null || typeof line !== "object") {
    throw new TypeError("line must be an object { slope, intercept } (a fitted water line).");
  }
  requireFinite("line.slope", line.slope);
  requireFinite("line.intercept", line.intercept, "‰");
  // Landwehr & Coplen (2006): lc-excess = δ2H − a·δ18O − b
  return d2H - line.slope * d18O - line.intercept;
}
