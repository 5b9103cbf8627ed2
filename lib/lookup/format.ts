import type { Estimate } from "@/lib/editions/prediction";

// Number formats of the lookup pages and files. Pure; safe in client components.

export const MONTHS = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"] as const;
export const MONTHS_SHORT = MONTHS.map((m) => m.slice(0, 3));

/** A signed number with a real minus sign: −9.12. */
export function num(v: number | null | undefined, digits = 2): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const s = Math.abs(v).toFixed(digits);
  return v < 0 && Number(s) !== 0 ? `−${s}` : s;
}

/** "−9.12 (−10.31 to −7.93)" */
export function withInterval(e: Estimate | null, digits = 2): string {
  if (!e) return "—";
  return `${num(e.value, digits)} (${num(e.lower95, digits)} to ${num(e.upper95, digits)})`;
}
