// Two-point normalisation onto the VSMOW–SLAP scale, and the reference waters. δ in ‰.
import { requireFinite } from "./validate";

export interface ReferenceWater {
  /** δ18O on the VSMOW–SLAP scale, ‰, with its stated 1σ uncertainty where given. */
  d18O: number;
  d18OSd: number | null;
  /** δ2H on the VSMOW–SLAP scale, ‰. */
  d2H: number;
  d2HSd: number | null;
  source: string;
}

/** Assigned values of international reference waters [pub]. */
export const REFERENCE_WATERS: Readonly<Record<"VSMOW2" | "SLAP2" | "SLAP" | "GISP", ReferenceWater>> = Object.freeze({
  VSMOW2: { d18O: 0.0, d18OSd: 0.02, d2H: 0.0, d2HSd: 0.3, source: "IAEA reference sheet VSMOW2 [pub]" },
  SLAP2: { d18O: -55.5, d18OSd: 0.02, d2H: -427.5, d2HSd: 0.3, source: "IAEA reference sheet SLAP2 [pub]" },
  SLAP: {
    d18O: -55.5,
    d18OSd: null,
    d2H: -428.0,
    d2HSd: null,
    source: "defines the scale; Coplen (1994), Pure Appl. Chem. 66:273 [pub]",
  },
  GISP: { d18O: -24.78, d18OSd: null, d2H: -189.5, d2HSd: 1.2, source: "IAEA/CIAAW tables [pub]" },
});

/** VSMOW absolute isotope ratios — IAEA reference sheet [pub]. */
export const VSMOW_RATIOS = Object.freeze({ r2H: 155.76e-6, r18O: 2005.2e-6 });

/** A reference water as measured in a run, and its assigned value. */
export interface ReferenceReading {
  /** Value the instrument reported, ‰ on the working scale. */
  measured: number;
  /** Assigned value on the VSMOW–SLAP scale, ‰. */
  assigned: number;
}

/** The straight line true = slope·measured + intercept defined by two reference waters. */
export function twoPointScale(references: readonly [ReferenceReading, ReferenceReading]): {
  slope: number;
  intercept: number;
} {
  if (!Array.isArray(references) || references.length !== 2) {
    throw new TypeError("references must be two readings [{ measured, assigned }, { measured, assigned }].");
  }
  const [r1, r2] = references;
  const m1 = requireFinite("references[0].measured", r1?.measured, "‰");
  const t1 = requireFinite("references[0].assigned", r1?.assigned, "‰");
  const m2 = requireFinite("references[1].measured", r2?.measured, "‰");
  const t2 = requireFinite("references[1].assigned", r2?.assigned, "‰");
  if (Math.abs(t2 - t1) < 1e-9) {
    throw new RangeError("The two reference waters have the same assigned value; use two waters far apart (e.g. VSMOW2 and SLAP2).");
  }
  if (Math.abs(m2 - m1) < 1e-9) {
    throw new RangeError("The two reference waters were measured with the same value; the scale cannot be stretched. Check the run.");
  }
  // Two-point normalisation [trade; Coplen 1988 mem]: slope = (δ2,true − δ1,true)/(δ2,meas − δ1,meas)
  const slope = (t2 - t1) / (m2 - m1);
  return { slope, intercept: t1 - slope * m1 };
}

/**
 * Normalise measured δ values onto the VSMOW–SLAP scale with two reference waters:
 * δ_true = δ1,true + (δ_meas − δ1,meas)·(δ2,true − δ1,true)/(δ2,meas − δ1,meas)
 * [trade; Coplen (1988) mem].
 */
export function normalizeTwoPoint(measured: number, references: readonly [ReferenceReading, ReferenceReading]): number;
export function normalizeTwoPoint(
  measured: readonly number[],
  references: readonly [ReferenceReading, ReferenceReading],
): number[];
export function normalizeTwoPoint(
  measured: number | readonly number[],
  references: readonly [ReferenceReading, ReferenceReading],
): number | number[] {
  const { slope } = twoPointScale(references);
  const m1 = references[0].measured;
  const t1 = references[0].assigned;
  // δ_true = δ1,true + (δ_meas − δ1,meas)·slope
  const one = (v: number, i?: number) =>
    t1 + (requireFinite(i === undefined ? "measured" : `measured[${i}]`, v, "‰") - m1) * slope;
  if (Array.isArray(measured)) return measured.map((v, i) => one(v, i));
  return one(measured as number);
}
