// Amount-weighted means of δ values. δ in ‰ vs VSMOW, amounts in mm.
import { isFiniteNumber } from "./validate";

export interface WeightedMean {
  /** Σ Pᵢ·δᵢ / Σ Pᵢ in ‰, or null when no pair with an amount > 0 mm is usable. */
  mean: number | null;
  /** Σ Pᵢ over the pairs used, mm. */
  sumAmountMm: number;
  /** Pairs used (value and amount both present; amount may be 0 mm). */
  n: number;
  /** Pairs left out because the value or the amount was missing or not a number. */
  leftOut: number;
}

/**
 * Amount-weighted mean δ̄ = Σ Pᵢ·δᵢ / Σ Pᵢ [trade] (as in Diamond 2022, Exercise 2).
 * A pair whose value or amount is missing (null, undefined, NaN) is left out of both
 * sums, so months without an isotope value do not dilute the mean.
 * @param values δ values in ‰
 * @param amountsMm precipitation amounts in mm, same length
 * @throws RangeError when the lengths differ or an amount is negative
 */
export function amountWeightedMean(
  values: readonly (number | null | undefined)[],
  amountsMm: readonly (number | null | undefined)[],
): WeightedMean {
  if (!Array.isArray(values) || !Array.isArray(amountsMm)) {
    throw new TypeError("values and amountsMm must be arrays of numbers (null for missing).");
  }
  if (values.length !== amountsMm.length) {
    throw new RangeError(
      `values (${values.length}) and amountsMm (${amountsMm.length}) must have the same length: one amount per value.`,
    );
  }
  let sumP = 0;
  let sumPd = 0;
  let n = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    const p = amountsMm[i];
    if (!isFiniteNumber(v) || !isFiniteNumber(p)) continue;
    if (p < 0) throw new RangeError(`amountsMm[${i}] = ${p} mm is negative; precipitation amounts must be ≥ 0 mm.`);
    sumP += p;
    sumPd += p * v;
    n++;
  }
  return { mean: sumP > 0 ? sumPd / sumP : null, sumAmountMm: sumP, n, leftOut: values.length - n };
}
