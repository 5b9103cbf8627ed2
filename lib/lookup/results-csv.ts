import { csvRow, type CsvValue } from "@/lib/downloads/csv";
import type { Estimate, PeriodPrediction, SitePrediction } from "@/lib/editions/prediction";

// The results file of a batch lookup: one row per site with every value and
// interval (annual and each month), the predicted water line and the flags.
// RFC 4180 with formula neutralisation (lib/downloads/csv.ts): a site id like
// "=HYPERLINK(…)" arrives in a spreadsheet as text. Pure.

const PERIODS = ["annual", ...Array.from({ length: 12 }, (_, i) => `m${String(i + 1).padStart(2, "0")}`)];
const QUANTITIES = [
  ["d18O", "d18O_permil"],
  ["d2H", "d2H_permil"],
  ["dExcess", "d_excess_permil"],
  ["precipMm", "precip_mm"],
] as const;

export function resultsCsvColumns(): string[] {
  const cols = ["id", "latitude", "longitude", "elevation_m", "sea_level_equivalent", "edition", "extrapolation", "nearest_station_km"];
  for (const p of PERIODS) for (const [, name] of QUANTITIES) cols.push(`${name}_${p}`, `${name}_sd_${p}`, `${name}_lower95_${p}`, `${name}_upper95_${p}`);
  cols.push("lmwl_slope", "lmwl_intercept_permil", "lmwl_slope_se", "lmwl_intercept_se_permil", "lmwl_method", "notice");
  return cols;
}

export function resultsCsvHeader(): string {
  return csvRow(resultsCsvColumns());
}

const r = (x: number, d: number) => (Number.isFinite(x) ? Number(x.toFixed(d)) : null);

function cells(e: Estimate | null, d: number): CsvValue[] {
  return e ? [r(e.value, d), r(e.sd, d), r(e.lower95, d), r(e.upper95, d)] : [null, null, null, null];
}

function periodCells(p: PeriodPrediction): CsvValue[] {
  return [...cells(p.d18O, 3), ...cells(p.d2H, 2), ...cells(p.dExcess, 2), ...cells(p.precipMm, 1)];
}

/** Rows for predictions `preds` with the caller's ids; `notice` goes in the first row's notice column. */
export function resultsCsvRows(preds: readonly SitePrediction[], ids: readonly string[], notice?: string): string {
  let out = "";
  for (let i = 0; i < preds.length; i++) {
    const p = preds[i];
    const row: CsvValue[] = [ids[i], p.site.lat, p.site.lon, p.site.elevationM, p.site.elevationM === null, p.edition, p.site.extrapolation, r(p.site.nearestStationKm, 1)];
    row.push(...periodCells(p.annual));
    for (const m of p.monthly) row.push(...periodCells(m));
    const w = p.waterLine;
    row.push(r(w.slope, 4), r(w.intercept, 3), r(w.slopeSE, 4), r(w.interceptSE, 3), w.method, i === 0 ? (notice ?? "") : "");
    out += csvRow(row);
  }
  return out;
}
