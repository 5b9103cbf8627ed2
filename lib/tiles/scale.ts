import type { LayerSpec } from "./layers";
import type { RampId } from "./ramps";

// From a layer's value range to positions on its ramp. Pure and client-safe.

export interface ColourScale {
  ramp: RampId;
  /** Values at the ends of the ramp (values beyond are drawn in the end colours). */
  min: number;
  max: number;
  /** Diverging ramps: the value at the neutral centre (min and max are symmetric about it). */
  centre: number | null;
  /** Round values between min and max for the legend. */
  ticks: number[];
}

/**
 * The scale for a layer from the 2nd–98th percentile ranges of the surfaces it covers, widened
 * to round numbers (the legend then reads in steps of 1, 2, 2.5 or 5 × 10ⁿ).
 */
export function buildScale(spec: Pick<LayerSpec, "ramp" | "centre">, ranges: { p02: number; p98: number }[]): ColourScale {
  let lo = Math.min(...ranges.map((r) => r.p02).filter(Number.isFinite));
  let hi = Math.max(...ranges.map((r) => r.p98).filter(Number.isFinite));
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) [lo, hi] = [0, 1];
  if (spec.centre !== null) {
    const half = Math.max(spec.centre - lo, hi - spec.centre, 1e-9);
    const step = niceStep((2 * half) / 6);
    const h = Math.ceil(half / step - 1e-9) * step;
    return { ramp: spec.ramp, min: spec.centre - h, max: spec.centre + h, centre: spec.centre, ticks: ticksOf(spec.centre - h, spec.centre + h, step) };
  }
  if (hi - lo < 1e-9) [lo, hi] = [lo - 0.5, hi + 0.5];
  const step = niceStep((hi - lo) / 5);
  const min = Math.floor(lo / step + 1e-9) * step;
  const max = Math.ceil(hi / step - 1e-9) * step;
  return { ramp: spec.ramp, min, max, centre: null, ticks: ticksOf(min, max, step) };
}

/** Position of `v` on the ramp, 0–1 (clamped); NaN for NaN. */
export function scalePosition(scale: Pick<ColourScale, "min" | "max">, v: number): number {
  if (Number.isNaN(v)) return NaN;
  const t = (v - scale.min) / (scale.max - scale.min);
  return t < 0 ? 0 : t > 1 ? 1 : t;
}

function niceStep(raw: number): number {
  const p = 10 ** Math.floor(Math.log10(raw));
  const f = raw / p;
  return (f <= 1 ? 1 : f <= 2 ? 2 : f <= 2.5 ? 2.5 : f <= 5 ? 5 : 10) * p;
}

function ticksOf(min: number, max: number, step: number): number[] {
  const out: number[] = [];
  const n = Math.round((max - min) / step);
  for (let i = 0; i <= n; i++) out.push(Number((min + i * step).toPrecision(12)));
  return out;
}
