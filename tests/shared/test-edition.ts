import { createKrigingModel, krigingModelToJSON, type VariogramModel } from "@/lib/geostats";
import type { SurfaceModelRecord } from "@/lib/editions/prediction";
import type { SurfaceStats, SurfaceTrend } from "@/lib/editions/types";

// A small edition for tests, built the way the contract in lib/editions/prediction.ts
// describes (trend by least squares on [1, |lat|, lat², elevation], ordinary kriging of
// the residuals; √P kriging for precipitation), from invented station values (synthetic
// test data). Returns plain rows; unit and end-to-end tests write them to their database.

export interface TestStation {
  code: string;
  lat: number;
  lon: number;
  elevationM: number;
}

export interface TestEditionOptions {
  id: string;
  stations: TestStation[];
  /** Residual variogram of δ18O and d-excess (default exponential, nugget 0.1, psill 1, range 800 km). */
  variogram?: VariogramModel;
  maxNeighbors?: number | null;
  extrapolationKm?: number;
  /** Leave the precipitation models out. */
  noPrecipitation?: boolean;
  /** State this correlation of the δ18O and d-excess errors in the d2H surfaces' notes (as the edition build does). */
  d2HRho?: number;
}

export interface TestSurfaceRow {
  variable: "d18O" | "d2H" | "dExcess" | "precipMm";
  period: number;
  grid: Record<string, number>;
  stats: SurfaceStats;
  trend: SurfaceTrend | null;
  variogram: null;
  crossValidation: null;
  model: SurfaceModelRecord | null;
}

/** Invented station values: δ18O in the Bowen & Wilkinson (2002) form with smooth "residual" waves, seasonal swing; d-excess ~10‰; rain by month. */
export function testStationValue(variable: "d18O" | "dExcess" | "precipMm", period: number, s: TestStation): number {
  const a = Math.abs(s.lat);
  const wave = Math.sin(s.lon / 7) * Math.cos(s.lat / 5);
  const season = period === 0 ? 0 : Math.cos(((period - (s.lat >= 0 ? 7 : 1)) / 12) * 2 * Math.PI);
  if (variable === "d18O") return -5.247 + 0.1805 * a - 0.0051 * a * a - 0.0028 * s.elevationM + 0.8 * wave + (1.5 + 0.05 * a) * season;
  if (variable === "dExcess") return 10 + 1.2 * Math.cos(s.lon / 9) - 0.6 * season + 0.3 * wave;
  return period === 0 ? 0 : 60 + 30 * Math.sin(s.lon / 11 + period) + 20 * wave;
}

/** Least squares b = (XᵀX)⁻¹Xᵀy on [1, |lat|, lat², elevation] with Cov(b) = s²(XᵀX)⁻¹ [trade]. */
export function fitTrend(st: TestStation[], y: number[]): { trend: SurfaceTrend; residuals: number[] } {
  const n = st.length;
  const X = st.map((s) => [1, Math.abs(s.lat), s.lat * s.lat, s.elevationM]);
  const xtx = Array.from({ length: 4 }, (_, i) => Array.from({ length: 4 }, (_, j) => X.reduce((a, r) => a + r[i] * r[j], 0)));
  const xty = Array.from({ length: 4 }, (_, i) => X.reduce((a, r, k) => a + r[i] * y[k], 0));
  const inv = invert(xtx);
  const b = inv.map((row) => row.reduce((a, v, j) => a + v * xty[j], 0));
  const residuals = y.map((v, k) => v - X[k].reduce((a, xv, j) => a + xv * b[j], 0));
  const s2 = residuals.reduce((a, r) => a + r * r, 0) / (n - 4);
  const names = ["intercept", "absLat", "lat2", "elevation"] as const;
  const mean = y.reduce((a, v) => a + v, 0) / n;
  const sst = y.reduce((a, v) => a + (v - mean) ** 2, 0);
  return {
    trend: {
      formula: "b0 + b1·|lat| + b2·lat² + b3·elevation_m",
      terms: names.map((name, i) => ({ name, estimate: b[i], standardError: Math.sqrt(s2 * inv[i][i]) })),
      covariance: inv.flatMap((row) => row.map((v) => s2 * v)),
      rSquared: 1 - (s2 * (n - 4)) / sst,
      residualSE: Math.sqrt(s2),
      n,
      df: n - 4,
    },
    residuals,
  };
}

function invert(m: number[][]): number[][] {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    const d = a[c][c];
    for (let j = 0; j < 2 * n; j++) a[c][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((row) => row.slice(n));
}

const plane = { cells: 1, min: 0, max: 0, mean: 0, p02: 0, p98: 0 };

function stats(method: SurfaceStats["method"], units: "‰" | "mm", used: number, extrapolationKm: number, note?: string): SurfaceStats {
  return {
    method,
    units,
    value: plane,
    variance: plane,
    sd: plane,
    stations: { used, excludedCoverage: 0 },
    seaLevelEquivalent: true,
    extrapolation: { distanceKm: extrapolationKm, cells: 0, fraction: 0 },
    ...(note ? { note } : {}),
  };
}

export const TEST_D2H_NOTE = "δ2H = d-excess + 8·δ18O (Dansgaard 1964); variance Var(d) + 64·Var(δ18O), the two kriging errors treated as independent.";

/** The surfaces of a test edition (13 periods of δ18O, d-excess and precipitation models; δ2H and annual precipitation derived). */
export function buildTestEdition(opts: TestEditionOptions): TestSurfaceRow[] {
  const st = opts.stations;
  const points = st.map((s) => [s.lon, s.lat]);
  const codes = st.map((s) => s.code);
  const vg: VariogramModel = opts.variogram ?? { model: "exponential", nugget: 0.1, psill: 1, range: 800 };
  const ex = opts.extrapolationKm ?? 600;
  const grid = { lon0: -179.5, lat0: 89.5, dLon: 1, dLat: 1, nx: 360, ny: 180, chunk: 128 };
  const rows: TestSurfaceRow[] = [];
  for (let period = 0; period <= 12; period++) {
    for (const variable of ["d18O", "dExcess"] as const) {
      const { trend, residuals } = fitTrend(st, st.map((s) => testStationValue(variable, period, s)));
      const model = createKrigingModel({ coordinates: "lonlat", points, values: residuals, variogram: vg, maxNeighbors: opts.maxNeighbors ?? null });
      rows.push({
        variable,
        period,
        grid,
        stats: stats("regression-kriging", "‰", st.length, ex),
        trend,
        variogram: null,
        crossValidation: null,
        model: { kind: "regression-kriging", stationCodes: codes, kriging: krigingModelToJSON(model), extrapolationKm: ex },
      });
    }
    const note = opts.d2HRho === undefined ? TEST_D2H_NOTE : `δ2H = d-excess + 8·δ18O. Variance = Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18O with ρ = ${opts.d2HRho.toFixed(4)}, the correlation of the leave-one-out residuals.`;
    rows.push({ variable: "d2H", period, grid, stats: stats("derived-d2H", "‰", st.length, ex, note), trend: null, variogram: null, crossValidation: null, model: null });
    if (opts.noPrecipitation) continue;
    if (period === 0) {
      rows.push({ variable: "precipMm", period, grid, stats: stats("derived-annual-sum", "mm", st.length, ex), trend: null, variogram: null, crossValidation: null, model: null });
    } else {
      const z = st.map((s) => Math.sqrt(testStationValue("precipMm", period, s)));
      const model = createKrigingModel({ coordinates: "lonlat", points, values: z, variogram: { model: "exponential", nugget: 0.2, psill: 2, range: 1000 }, maxNeighbors: opts.maxNeighbors ?? null });
      rows.push({
        variable: "precipMm",
        period,
        grid,
        stats: stats("sqrt-kriging", "mm", st.length, ex),
        trend: null,
        variogram: null,
        crossValidation: null,
        model: { kind: "sqrt-kriging", stationCodes: codes, kriging: krigingModelToJSON(model), extrapolationKm: ex },
      });
    }
  }
  return rows;
}

/** A reproducible spread of invented stations over a region (synthetic test data). */
export function testStations(prefix: string, count: number, box: { lat: [number, number]; lon: [number, number] }, seed = 1): TestStation[] {
  let s = seed >>> 0;
  const rnd = () => {
    // mulberry32 [trade]
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return Array.from({ length: count }, (_, i) => ({
    code: `${prefix}-${String(i + 1).padStart(3, "0")}`,
    lat: box.lat[0] + rnd() * (box.lat[1] - box.lat[0]),
    lon: box.lon[0] + rnd() * (box.lon[1] - box.lon[0]),
    elevationM: Math.round(rnd() * 1500),
  }));
}
