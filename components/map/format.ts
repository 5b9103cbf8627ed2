// Number formatting for the map (client-safe).

/** Decimals shown per unit: ‰ to 0.1 (δ2H and d-excess) or 0.01 (δ18O); mm to 1. */
export function decimalsFor(variable: string): number {
  return variable === "d18O" ? 2 : variable === "precipMm" ? 0 : 1;
}

/** A number with a true minus sign. */
export function num(v: number, decimals: number): string {
  const s = v.toFixed(decimals);
  return s.startsWith("-") ? `−${s.slice(1)}` : s;
}

export function unitsText(units: string): string {
  return units === "‰" ? "‰ VSMOW" : units;
}
