// Plain names for edition variables and periods (pages, charts, downloads). Client-safe.
import type { SurfaceVariable } from "./types";

export const VARIABLE_LABEL: Record<SurfaceVariable, string> = {
  d18O: "δ18O",
  d2H: "δ2H",
  dExcess: "d-excess",
  precipMm: "precipitation",
};

const MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"];

export function periodLabel(period: number): string {
  return period === 0 ? "annual" : MONTHS[period - 1];
}

export function fmt(x: number | null | undefined, digits = 2): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "—";
  return x.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: digits });
}

export function fmtSci(x: number): string {
  if (!Number.isFinite(x)) return "—";
  if (x === 0) return "0";
  const a = Math.abs(x);
  return a >= 0.01 && a < 1e5 ? x.toLocaleString("en-GB", { maximumSignificantDigits: 4 }) : x.toExponential(3);
}
