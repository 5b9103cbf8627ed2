// The numeric heart of an edition build: from frozen station means to the planes and records of
// one period's surfaces. No database (the job handler in lib/jobs/handlers/build-edition.ts reads
// and writes); uses the multi-threaded grid runner, so it runs in the job worker, scripts and tests.
//
// Method (recorded with every surface):
//   δ18O, d-excess: regression-kriging — OLS trend on [1, |lat|, lat², elevation] (Bowen &
//     Wilkinson 2002 form [pub citation]) plus ordinary kriging of the trend residuals (Hengl,
//     Heuvelink & Rossiter 2007, Computers & Geosciences 33:1301 [mem]); variance = kriging variance
//     of the residual + xᵀCov(b)x.
//   δ2H: d-excess + 8·δ18O (Dansgaard 1964 definition of d [pub]).
//   precipitation: ordinary kriging of √P, P = max(ẑ, 0)², Var(P) = 4ẑ²σ² + 2σ⁴ (the variance of the
//     square of a Gaussian variable [trade]); the annual surface is the sum of the twelve months.

import { crossValidate, createKrigingModel, createStationSet, empiricalVariogram, fitVariogram, greatCircleKm, krigingModelToJSON, VARIOGRAM_MODELS } from "@/lib/geostats";
import type { CrossValidation, KrigingModel, StationSet, VariogramModelType } from "@/lib/geostats";
import { krigeGrid } from "@/lib/geostats/grid-runner";
import { landMask, type LonLatGrid } from "@/lib/geo";
import type { SurfaceModelRecord } from "../prediction";
import type {
  CrossValidationStats,
  FittedVariogramRecord,
  PlaneStats,
  SurfaceCrossValidation,
  SurfaceStats,
  SurfaceTrend,
  SurfaceVariable,
  SurfaceVariogram,
} from "../types";
import { fitTrend, trendValue, trendVariance } from "./trend";

// ───────────────────────────── parameters ─────────────────────────────

export interface GridParams {
  /** Cell size, degrees (the same in longitude and latitude). */
  resolutionDeg: number;
  /** Bounds of the grid, degrees: cell edges. */
  extent: { west: number; south: number; east: number; north: number };
  /** Only cells whose centre is on land (lib/geo's 1:50m outlines) get values. */
  landOnly: boolean;
}

export interface BuildParameters {
  grid: GridParams;
  /** Nearest stations used per prediction (gstat's nmax). */
  maxNeighbors: number;
  /** Cells farther than this from the nearest station used are flagged as extrapolation, km. */
  extrapolationKm: number;
  /** gstat's fit.method for the variogram fits (7 = N/h², gstat's default). */
  fitMethod: 1 | 2 | 6 | 7;
  /** Candidate variogram models; the one with the smallest leave-one-out RMSE is used. */
  variogramModels: VariogramModelType[];
  /** Coverage rule overrides for the station means (lib/isotopes STATION_MEAN_RULES); {} = defaults. */
  stationMeanRules: Record<string, number>;
  /** How the δ2H variance treats the covariance of the δ18O and d-excess errors. */
  d2HCovariance: "loo-residual-correlation" | "independent";
  /** Elevation model (elevation_models.id) giving each cell its elevation; null = sea-level-equivalent surfaces. */
  elevationModelId: string | null;
}

export const GLOBAL_EXTENT = { west: -180, south: -90, east: 180, north: 90 } as const;

export function defaultBuildParameters(over: Partial<Omit<BuildParameters, "grid">> & { grid?: Partial<GridParams> } = {}): BuildParameters {
  return {
    maxNeighbors: 24,
    extrapolationKm: 1000,
    fitMethod: 7,
    variogramModels: [...VARIOGRAM_MODELS],
    stationMeanRules: {},
    d2HCovariance: "loo-residual-correlation",
    elevationModelId: null,
    ...over,
    grid: { resolutionDeg: 0.25, extent: { ...GLOBAL_EXTENT }, landOnly: true, ...(over.grid ?? {}) },
  };
}

/** Checks a parameter set; returns plain messages per field (empty when fine). */
export function checkBuildParameters(p: BuildParameters): Record<string, string> {
  const e: Record<string, string> = {};
  const g = p.grid;
  const r = g.resolutionDeg;
  if (!(r >= 0.05 && r <= 10)) e["grid.resolutionDeg"] = "The cell size must be between 0.05° and 10°.";
  const x = g.extent;
  if (!(x.west >= -180 && x.east <= 180 && x.west < x.east)) e["grid.extent"] = "West must be below east, both within −180…180.";
  else if (!(x.south >= -90 && x.north <= 90 && x.south < x.north)) e["grid.extent"] = "South must be below north, both within −90…90.";
  else if (!e["grid.resolutionDeg"]) {
    const cells = Math.round((x.east - x.west) / r) * Math.round((x.north - x.south) / r);
    if (cells > 4_000_000) e["grid.resolutionDeg"] = `That grid would have ${cells.toLocaleString("en")} cells; at most 4,000,000 are allowed. Use coarser cells or a smaller extent.`;
    if (cells < 1) e["grid.extent"] = "The extent holds no whole cell at that cell size.";
  }
  if (!(Number.isInteger(p.maxNeighbors) && p.maxNeighbors >= 4 && p.maxNeighbors <= 200)) e.maxNeighbors = "Use 4–200 neighbours.";
  if (!(p.extrapolationKm > 0 && p.extrapolationKm <= 20000)) e.extrapolationKm = "The extrapolation distance must be between 0 and 20,000 km.";
  if (!p.variogramModels.length || p.variogramModels.some((m) => !VARIOGRAM_MODELS.includes(m))) e.variogramModels = `Choose among ${VARIOGRAM_MODELS.join(", ")}.`;
  return e;
}

// ───────────────────────────── grid ─────────────────────────────

export interface GridContext {
  grid: LonLatGrid;
  /** 1 = the cell gets values. */
  mask: Uint8Array;
  cells: number;
  /** Cells with mask 1. */
  activeCells: number;
  /** Elevation per cell (m), or null: sea-level-equivalent surfaces (elevation term at 0 m). */
  elevation: Float32Array | null;
  /** Cell-centre latitude per row. */
  rowLat: Float64Array;
}

export function makeGrid(params: GridParams, elevation: Float32Array | null = null): GridContext {
  const { resolutionDeg: r, extent: x } = params;
  const nx = Math.max(1, Math.round((x.east - x.west) / r));
  const ny = Math.max(1, Math.round((x.north - x.south) / r));
  const grid: LonLatGrid = { lon0: x.west + r / 2, lat0: x.north - r / 2, dLon: r, dLat: r, nx, ny };
  const cells = nx * ny;
  const mask = params.landOnly ? landMask(grid) : new Uint8Array(cells).fill(1);
  let activeCells = 0;
  for (let i = 0; i < cells; i++) activeCells += mask[i];
  if (elevation && elevation.length !== cells) throw new RangeError(`elevation has ${elevation.length} cells; the grid has ${cells}`);
  const rowLat = new Float64Array(ny);
  for (let row = 0; row < ny; row++) rowLat[row] = grid.lat0 - row * grid.dLat;
  return { grid, mask, cells, activeCells, elevation, rowLat };
}

// ───────────────────────────── station inputs ─────────────────────────────

/** One station's frozen means for one period. */
export interface StationPeriodMean {
  code: string;
  lat: number;
  lon: number;
  elevationM: number;
  d18O: number | null;
  dExcess: number | null;
  precipMm: number | null;
  /** Passed the coverage rules (the isotope surfaces use only these). */
  included: boolean;
}

export interface PlaneSet {
  value: Float32Array;
  variance: Float32Array;
  extrapolation: Uint8Array;
}

export interface SurfaceResult {
  variable: SurfaceVariable;
  period: number;
  stats: SurfaceStats;
  trend: SurfaceTrend | null;
  variogram: SurfaceVariogram | null;
  crossValidation: SurfaceCrossValidation | null;
  model: SurfaceModelRecord | null;
  planes: PlaneSet;
}

// ───────────────────────────── per period ─────────────────────────────

export interface PeriodOptions {
  signal?: AbortSignal;
  threads?: number;
  onProgress?: (fraction: number) => void;
  /** Timings are added here (seconds per stage). */
  timings?: Record<string, number>;
}

interface KrigedVariable {
  variable: SurfaceVariable;
  codes: string[];
  stations: StationSet;
  lat: Float64Array;
  elevation: Float64Array;
  /** The kriged quantity (trend residual, or √P). */
  values: Float64Array;
  trend: ReturnType<typeof fitTrend> | null;
  variogram: SurfaceVariogram;
  model: KrigingModel;
  cv: CrossValidation;
  excluded: number;
}

function time<T>(timings: Record<string, number> | undefined, stage: string, f: () => T): T {
  const t0 = performance.now();
  const out = f();
  if (timings) timings[stage] = (timings[stage] ?? 0) + (performance.now() - t0) / 1000;
  return out;
}

/**
 * Fit every candidate variogram to the empirical variogram of `values`, krige with each, and keep
 * the one with the smallest leave-one-out RMSE (ties: mean squared z closest to 1).
 */
export function chooseVariogram(
  stations: StationSet,
  values: Float64Array,
  params: Pick<BuildParameters, "fitMethod" | "variogramModels" | "maxNeighbors">,
  of: SurfaceVariogram["of"],
): { record: SurfaceVariogram; model: KrigingModel; cv: CrossValidation } {
  const ev = empiricalVariogram({ stations, values });
  const fitted: FittedVariogramRecord[] = [];
  let best: { model: KrigingModel; cv: CrossValidation; type: VariogramModelType } | null = null;
  const failures: string[] = [];
  for (const type of params.variogramModels) {
    let fit;
    try {
      fit = fitVariogram(ev, { model: type, fitMethod: params.fitMethod });
    } catch (e) {
      failures.push(`${type}: ${e instanceof Error ? e.message : String(e)}`);
      continue;
    }
    let model: KrigingModel;
    let cv: CrossValidation;
    try {
      model = createKrigingModel({ stations, values, variogram: fit.variogram, maxNeighbors: params.maxNeighbors });
      cv = crossValidate(model);
    } catch (e) {
      // e.g. a gaussian model without nugget: its kriging systems can be numerically singular
      failures.push(`${type}: ${e instanceof Error ? e.message : String(e)}`);
      continue;
    }
    fitted.push({
      model: type,
      nugget: fit.variogram.nugget,
      psill: fit.variogram.psill,
      rangeKm: fit.variogram.range,
      sse: fit.sse,
      converged: fit.converged,
      warnings: fit.warnings,
      crossValidation: cvStats(cv),
    });
    const better =
      !best ||
      cv.rmse < best.cv.rmse - 1e-12 ||
      (Math.abs(cv.rmse - best.cv.rmse) <= 1e-12 && Math.abs(cv.meanZ2 - 1) < Math.abs(best.cv.meanZ2 - 1));
    if (better) best = { model, cv, type };
  }
  if (!best) throw new Error(`No variogram model could be fitted (${of}): ${failures.join("; ")}`);
  const empirical = Array.from(ev.gamma, (gamma, j) => ({ distanceKm: ev.dist[j], gamma, pairs: ev.np[j] }));
  return {
    model: best.model,
    cv: best.cv,
    record: {
      of,
      empirical,
      cutoffKm: ev.cutoff,
      fitted,
      chosen: best.type,
      rule: `Each model fitted by weighted least squares (gstat fit.method ${params.fitMethod}); the one with the smallest leave-one-out RMSE is used (ties: mean squared z-score closest to 1).${failures.length ? ` Not fitted: ${failures.join("; ")}.` : ""}`,
    },
  };
}

function cvStats(cv: CrossValidation): CrossValidationStats {
  return { n: cv.n, meanError: cv.meanError, rmse: cv.rmse, meanZ: cv.meanZ, meanZ2: cv.meanZ2 };
}

/** Stable key of a station list (for sharing one StationSet between variables). */
function setKey(codes: string[]): string {
  return codes.join("\u0000");
}

/** One period after the fits, ready to krige. */
export interface PreparedPeriod {
  period: number;
  kriged: KrigedVariable[];
  excludedIso: number;
}

/**
 * Build every surface of one month (1–12) or of the annual period (0). For the annual period the
 * precipitation surface is not made here (it is the sum of the months: `annualPrecipitation`).
 * The three phases — `preparePeriod` (trends, variograms, cross-validation; this thread),
 * `krigePeriod` (worker threads) and `assemblePeriod` (this thread) — can also be run separately so
 * one period's assembly overlaps the next period's kriging.
 */
export async function buildPeriodSurfaces(
  period: number,
  means: StationPeriodMean[],
  ctx: GridContext,
  params: BuildParameters,
  opts: PeriodOptions = {},
): Promise<SurfaceResult[]> {
  const prepared = preparePeriod(period, means, params, opts.timings);
  opts.signal?.throwIfAborted();
  const planes = await krigePeriod(prepared, ctx, opts);
  opts.signal?.throwIfAborted();
  return assemblePeriod(prepared, planes, ctx, params, opts.timings);
}

/** Phase 1: the period's station sets, trends, variograms (chosen by leave-one-out) and kriging models. */
export function preparePeriod(period: number, means: StationPeriodMean[], params: BuildParameters, timings?: Record<string, number>): PreparedPeriod {
  // stations sorted by code: the model order is independent of the query order
  const sorted = [...means].sort((a, b) => (a.code < b.code ? -1 : a.code > b.code ? 1 : 0));
  const iso = sorted.filter((m) => m.included && m.d18O !== null && m.dExcess !== null);
  const withSamples = sorted.filter((m) => m.d18O !== null || m.dExcess !== null || m.included);
  const excludedIso = withSamples.length - iso.length;
  // Precipitation from the same stations as the isotope surfaces (those with a mean amount): the
  // three surfaces then share one neighbour search, and a site's predicted amounts (which weight its
  // predicted water line) come from the stations its δ values come from.
  const precip = period === 0 ? [] : iso.filter((m) => m.precipMm !== null);
  if (iso.length < 8) throw new Error(`Period ${period}: only ${iso.length} stations pass the coverage rules; at least 8 are needed to fit a trend and a variogram.`);

  const sets = new Map<string, StationSet>();
  const stationSet = (list: StationPeriodMean[]) => {
    const key = setKey(list.map((m) => m.code));
    let s = sets.get(key);
    if (!s) {
      s = createStationSet({ coordinates: "lonlat", points: list.map((m) => [m.lon, m.lat]) });
      sets.set(key, s);
    }
    return s;
  };

  const kriged: KrigedVariable[] = [];
  time(timings, "fit", () => {
    const isoSet = stationSet(iso);
    const lat = Float64Array.from(iso, (m) => m.lat);
    const elev = Float64Array.from(iso, (m) => m.elevationM);
    for (const variable of ["d18O", "dExcess"] as const) {
      const y = Float64Array.from(iso, (m) => m[variable] as number);
      const trend = fitTrend(lat, elev, y);
      const chosen = chooseVariogram(isoSet, trend.residuals, params, "trend residuals");
      kriged.push({
        variable,
        codes: iso.map((m) => m.code),
        stations: isoSet,
        lat,
        elevation: elev,
        values: trend.residuals,
        trend,
        variogram: chosen.record,
        model: chosen.model,
        cv: chosen.cv,
        excluded: excludedIso,
      });
    }
    if (precip.length >= 8) {
      const pSet = stationSet(precip);
      const y = Float64Array.from(precip, (m) => Math.sqrt(Math.max(0, m.precipMm as number)));
      const chosen = chooseVariogram(pSet, y, params, "square root of precipitation");
      kriged.push({
        variable: "precipMm",
        codes: precip.map((m) => m.code),
        stations: pSet,
        lat: Float64Array.from(precip, (m) => m.lat),
        elevation: Float64Array.from(precip, (m) => m.elevationM),
        values: y,
        trend: null,
        variogram: chosen.record,
        model: chosen.model,
        cv: chosen.cv,
        excluded: iso.length - precip.length,
      });
    }
  });
  return { period, kriged, excludedIso };
}

export type PeriodPlanes = Map<SurfaceVariable, { value: Float32Array; variance: Float32Array }>;

/** Phase 2: krige each station set's models together (shared neighbour search), on worker threads. */
export async function krigePeriod(prepared: PreparedPeriod, ctx: GridContext, opts: PeriodOptions = {}): Promise<PeriodPlanes> {
  const { kriged } = prepared;
  const timings = opts.timings;
  const planes: PeriodPlanes = new Map();
  const t0 = performance.now();
  const groups = [...new Set(kriged.map((k) => k.stations))];
  let done = 0;
  for (const set of groups) {
    const members = kriged.filter((k) => k.stations === set);
    const out = await krigeGrid({
      grid: ctx.grid,
      models: members.map((m) => m.model),
      mask: ctx.mask,
      threads: opts.threads,
      signal: opts.signal,
      onProgress: opts.onProgress
        ? ({ done: d, total }) => opts.onProgress!((done + (d / total) * members.length) / kriged.length)
        : undefined,
    });
    members.forEach((m, i) => planes.set(m.variable, { value: out[i].value as Float32Array, variance: out[i].variance as Float32Array }));
    done += members.length;
  }
  if (timings) timings.krige = (timings.krige ?? 0) + (performance.now() - t0) / 1000;
  return planes;
}

/** Phase 3: trend and back-transforms on the grid, δ2H, extrapolation planes, statistics and records. */
export function assemblePeriod(
  prepared: PreparedPeriod,
  planes: PeriodPlanes,
  ctx: GridContext,
  params: BuildParameters,
  timings?: Record<string, number>,
): SurfaceResult[] {
  const { period, kriged, excludedIso } = prepared;
  return time(timings, "assemble", () => {
    const extrapolation = new Map<StationSet, Uint8Array>();
    const extrapolationOf = (set: StationSet) => {
      let e = extrapolation.get(set);
      if (!e) {
        e = extrapolationPlane(ctx, set, params.extrapolationKm);
        extrapolation.set(set, e);
      }
      return e;
    };
    const results: SurfaceResult[] = [];
    const byVar = new Map(kriged.map((k) => [k.variable, k]));
    for (const k of kriged) {
      const raw = planes.get(k.variable)!;
      const extra = extrapolationOf(k.stations);
      if (k.trend) {
        addTrend(ctx, raw.value, raw.variance, k.trend.coefficients, k.trend.record.covariance);
        results.push(
          surfaceResult(k, period, ctx, params, { value: raw.value, variance: raw.variance, extrapolation: extra }, "regression-kriging"),
        );
      } else {
        backTransformSqrt(raw.value, raw.variance);
        results.push(surfaceResult(k, period, ctx, params, { value: raw.value, variance: raw.variance, extrapolation: extra }, "sqrt-kriging"));
      }
    }
    // δ2H = d + 8·δ18O
    const o = byVar.get("d18O")!;
    const d = byVar.get("dExcess")!;
    const rho = params.d2HCovariance === "independent" ? 0 : residualCorrelation(o.cv, d.cv);
    const po = results.find((r) => r.variable === "d18O")!.planes;
    const pd = results.find((r) => r.variable === "dExcess")!.planes;
    const value = new Float32Array(ctx.cells);
    const variance = new Float32Array(ctx.cells);
    for (let c = 0; c < ctx.cells; c++) {
      const vo = po.variance[c];
      const vd = pd.variance[c];
      value[c] = pd.value[c] + 8 * po.value[c];
      // Var(d + 8·δ18O) = Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18 — propagation with correlated inputs, JCGM 100:2008 (GUM) §5.2.2 [mem]
      variance[c] = Math.max(0, vd + 64 * vo + 16 * rho * Math.sqrt(vd * vo));
    }
    const extra = new Uint8Array(ctx.cells);
    for (let c = 0; c < ctx.cells; c++) extra[c] = po.extrapolation[c] | pd.extrapolation[c];
    const usedD2H = o.codes.length;
    results.push({
      variable: "d2H",
      period,
      trend: null,
      variogram: null,
      crossValidation: null,
      model: null,
      planes: { value, variance, extrapolation: extra },
      stats: {
        method: "derived-d2H",
        units: "‰",
        ...planeStats(value, variance),
        stations: { used: usedD2H, excludedCoverage: excludedIso },
        seaLevelEquivalent: ctx.elevation === null,
        extrapolation: extrapolationStats(extra, ctx, params.extrapolationKm),
        d2HCorrelation: rho,
        note:
          `δ2H = d-excess + 8·δ18O (definition of d, Dansgaard 1964). Variance = Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18O ` +
          `(propagation with correlated inputs, JCGM 100:2008 §5.2.2 [mem]) with ρ = ${rho.toFixed(4)}, ` +
          (params.d2HCovariance === "independent"
            ? "the errors of the two surfaces taken as independent."
            : "the correlation of the two surfaces' leave-one-out residuals at the stations (assumed to hold for the prediction errors everywhere)."),
      },
    });
    return results;
  });
}

/** value += trend(cell), variance += xᵀCov(b)x (elevation from the grid, or 0 m). */
function addTrend(ctx: GridContext, value: Float32Array, variance: Float32Array, coef: number[], cov: number[]): void {
  const { nx, ny } = ctx.grid;
  for (let row = 0; row < ny; row++) {
    const lat = ctx.rowLat[row];
    const base = row * nx;
    const tv0 = ctx.elevation ? 0 : trendValue(coef, lat, 0);
    const tvar0 = ctx.elevation ? 0 : trendVariance(cov, lat, 0);
    for (let col = 0; col < nx; col++) {
      const c = base + col;
      if (!ctx.mask[c]) continue;
      if (ctx.elevation) {
        const e = ctx.elevation[c];
        const el = Number.isFinite(e) ? e : 0;
        value[c] += trendValue(coef, lat, el);
        variance[c] += trendVariance(cov, lat, el);
      } else {
        value[c] += tv0;
        variance[c] += tvar0;
      }
    }
  }
}

/** √P kriging back-transform: P = max(ẑ, 0)², Var(P) = 4ẑ²σ² + 2σ⁴ (variance of the square of a Gaussian [trade]). */
function backTransformSqrt(value: Float32Array, variance: Float32Array): void {
  for (let c = 0; c < value.length; c++) {
    const z = value[c];
    if (z !== z) continue;
    const s2 = variance[c];
    value[c] = z > 0 ? z * z : 0;
    variance[c] = 4 * z * z * s2 + 2 * s2 * s2;
  }
}

/** Pearson correlation of two leave-one-out residual series (same stations, same order) [trade]. */
function residualCorrelation(a: CrossValidation, b: CrossValidation): number {
  const n = a.n;
  if (n !== b.n || n < 3) return 0;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a.residual[i];
    mb += b.residual[i];
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const x = a.residual[i] - ma;
    const y = b.residual[i] - mb;
    sab += x * y;
    saa += x * x;
    sbb += y * y;
  }
  const r = saa > 0 && sbb > 0 ? sab / Math.sqrt(saa * sbb) : 0;
  return Math.max(-1, Math.min(1, r));
}

/**
 * 1 where the cell is active and its nearest station is farther than `km` (ellipsoidal distance, as
 * the kriging uses). Each station marks the cells within `km` of it: per grid row the longitude
 * half-width of the circle on the sphere (cos Δλ = (cos δ − sin φ1 sin φ2) / (cos φ1 cos φ2),
 * spherical law of cosines [trade]), widened by 1% for the ellipsoid, then each candidate cell is
 * checked with the exact distance.
 */
export function extrapolationPlane(ctx: GridContext, set: StationSet, km: number): Uint8Array {
  const { nx, ny, lon0, dLon, dLat } = ctx.grid;
  const near = new Uint8Array(ctx.cells);
  const R = 6371.0088;
  const delta = Math.min(Math.PI, (km * 1.01) / R);
  const cosD = Math.cos(delta);
  const rad = Math.PI / 180;
  const global = Math.abs(nx * dLon - 360) < 1e-9;
  for (let s = 0; s < set.count; s++) {
    const slon = set.xy[2 * s];
    const slat = set.xy[2 * s + 1];
    const latSpan = (delta / rad) + dLat;
    const r0 = Math.max(0, Math.floor((ctx.grid.lat0 - (slat + latSpan)) / dLat));
    const r1 = Math.min(ny - 1, Math.ceil((ctx.grid.lat0 - (slat - latSpan)) / dLat));
    const s1 = Math.sin(slat * rad);
    const c1 = Math.cos(slat * rad);
    for (let row = r0; row <= r1; row++) {
      const lat = ctx.rowLat[row];
      const c2 = Math.cos(lat * rad);
      const den = c1 * c2;
      let half: number; // degrees of longitude
      if (den < 1e-12) half = 180;
      else {
        const cl = (cosD - s1 * Math.sin(lat * rad)) / den;
        if (cl > 1) continue;
        half = cl < -1 ? 180 : Math.acos(cl) / rad;
      }
      half += dLon;
      let c0: number;
      let cN: number;
      if (half >= 180) {
        c0 = 0;
        cN = nx - 1;
      } else {
        c0 = Math.floor((slon - half - lon0) / dLon);
        cN = Math.ceil((slon + half - lon0) / dLon);
      }
      for (let cc = c0; cc <= cN; cc++) {
        let col = cc;
        if (col < 0 || col >= nx) {
          if (!global) continue;
          col = ((col % nx) + nx) % nx;
        }
        const c = row * nx + col;
        if (near[c] || !ctx.mask[c]) continue;
        if (greatCircleKm(slon, slat, lon0 + col * dLon, lat) <= km) near[c] = 1;
      }
    }
  }
  const out = new Uint8Array(ctx.cells);
  for (let c = 0; c < ctx.cells; c++) out[c] = ctx.mask[c] && !near[c] ? 1 : 0;
  return out;
}

function extrapolationStats(extra: Uint8Array, ctx: GridContext, km: number): SurfaceStats["extrapolation"] {
  let n = 0;
  for (let c = 0; c < extra.length; c++) n += extra[c];
  return { distanceKm: km, cells: n, fraction: ctx.activeCells ? n / ctx.activeCells : 0 };
}

const PERCENTILE_SAMPLE = 65_536;

/** Stats of one plane, optionally also of its square root (variance → standard deviation), in one pass. */
function statsPass(plane: Float32Array, withSqrt: boolean): { stats: PlaneStats; sqrt: PlaneStats | null } {
  const n = plane.length;
  // percentiles from every `step`-th cell (a deterministic subsample; the legend's range only)
  const step = Math.max(1, Math.floor(n / PERCENTILE_SAMPLE));
  const sample = new Float64Array(Math.ceil(n / step));
  let k = 0;
  let cells = 0;
  let min = Infinity;
  let max = -Infinity;
  let sum = 0;
  let sumSqrt = 0;
  for (let c = 0; c < n; c++) {
    const v = plane[c];
    if (v !== v) continue;
    cells++;
    if (v < min) min = v;
    if (v > max) max = v;
    sum += v;
    if (withSqrt) sumSqrt += Math.sqrt(v);
    if (c % step === 0) sample[k++] = v;
  }
  if (!cells) {
    const none = { cells: 0, min: NaN, max: NaN, mean: NaN, p02: NaN, p98: NaN };
    return { stats: none, sqrt: withSqrt ? none : null };
  }
  const s = sample.subarray(0, k).sort();
  const q = (p: number) => (k ? s[Math.min(k - 1, Math.max(0, Math.round(p * (k - 1))))] : NaN);
  const stats = { cells, min, max, mean: sum / cells, p02: q(0.02), p98: q(0.98) };
  // √ is monotone: its min, max and percentiles are the roots of the plane's
  const sqrt = withSqrt
    ? { cells, min: Math.sqrt(min), max: Math.sqrt(max), mean: sumSqrt / cells, p02: Math.sqrt(stats.p02), p98: Math.sqrt(stats.p98) }
    : null;
  return { stats, sqrt };
}

/**
 * min, max, mean over the cells with a value; the 2nd and 98th percentiles from every k-th cell
 * (k = ⌊cells / 65,536⌋, at least 1; a deterministic subsample for the legend's range).
 */
export function planeStatsOf(plane: Float32Array): PlaneStats {
  return statsPass(plane, false).stats;
}

function planeStats(value: Float32Array, variance: Float32Array): Pick<SurfaceStats, "value" | "variance" | "sd"> {
  const v = statsPass(variance, true);
  return { value: statsPass(value, false).stats, variance: v.stats, sd: v.sqrt! };
}

function surfaceResult(
  k: KrigedVariable,
  period: number,
  ctx: GridContext,
  params: BuildParameters,
  planes: PlaneSet,
  method: "regression-kriging" | "sqrt-kriging",
): SurfaceResult {
  const isPrecip = method === "sqrt-kriging";
  let crossValidation: SurfaceCrossValidation;
  if (!isPrecip) {
    // trend + kriged residual: observed − predicted equals the residual's leave-one-out error
    crossValidation = {
      ...cvStats(k.cv),
      points: k.codes.map((code, i) => {
        const t = trendValue(k.trend!.coefficients, k.lat[i], k.elevation[i]);
        return {
          stationCode: code,
          observed: k.cv.observed[i] + t,
          predicted: k.cv.predicted[i] + t,
          variance: k.cv.variance[i],
          residual: k.cv.residual[i],
          z: k.cv.zScore[i],
        };
      }),
    };
  } else {
    // back-transformed to mm: P = max(ẑ, 0)², Var = 4ẑ²σ² + 2σ⁴
    const points = k.codes.map((code, i) => {
      const z = k.cv.predicted[i];
      const s2 = k.cv.variance[i];
      const observed = k.cv.observed[i] ** 2;
      const predicted = z > 0 ? z * z : 0;
      const variance = 4 * z * z * s2 + 2 * s2 * s2;
      const residual = observed - predicted;
      return { stationCode: code, observed, predicted, variance, residual, z: residual / Math.sqrt(variance) };
    });
    const n = points.length;
    const mean = (f: (p: (typeof points)[number]) => number) => points.reduce((s, p) => s + f(p), 0) / n;
    crossValidation = {
      n,
      meanError: mean((p) => p.residual),
      rmse: Math.sqrt(mean((p) => p.residual ** 2)),
      meanZ: mean((p) => p.z),
      meanZ2: mean((p) => p.z ** 2),
      points,
    };
  }
  return {
    variable: k.variable,
    period,
    trend: k.trend?.record ?? null,
    variogram: k.variogram,
    crossValidation,
    model: { kind: method, stationCodes: k.codes, kriging: krigingModelToJSON(k.model), extrapolationKm: params.extrapolationKm },
    planes,
    stats: {
      method,
      units: isPrecip ? "mm" : "‰",
      ...planeStats(planes.value, planes.variance),
      stations: { used: k.codes.length, excludedCoverage: k.excluded },
      seaLevelEquivalent: ctx.elevation === null,
      extrapolation: extrapolationStats(planes.extrapolation, ctx, params.extrapolationKm),
      note: isPrecip
        ? "Mean monthly precipitation: ordinary kriging of √P, back-transformed P = max(ẑ, 0)², variance 4ẑ²σ² + 2σ⁴. Cross-validation in mm after the back-transform."
        : ctx.elevation === null
          ? "Sea-level-equivalent: the trend's elevation term is taken at 0 m on the grid; site lookups apply the fitted elevation gradient at the site's elevation."
          : "The trend uses the elevation model's value in each cell.",
    },
  };
}

/**
 * The annual precipitation surface: the sum of the twelve monthly surfaces (mm per year); the
 * variance is the sum of the monthly variances (months' errors taken as independent — an assumption).
 */
export function annualPrecipitation(
  months: { value: Float32Array; variance: Float32Array; extrapolation: Uint8Array; stations: number }[],
  ctx: GridContext,
  params: BuildParameters,
): SurfaceResult {
  if (months.length !== 12) throw new RangeError("annualPrecipitation needs the twelve monthly surfaces");
  const value = new Float32Array(ctx.cells);
  const variance = new Float32Array(ctx.cells);
  const extrapolation = new Uint8Array(ctx.cells);
  for (let c = 0; c < ctx.cells; c++) {
    if (!ctx.mask[c]) {
      value[c] = NaN;
      variance[c] = NaN;
      continue;
    }
    let v = 0;
    let s2 = 0;
    let e = 0;
    for (const m of months) {
      v += m.value[c];
      s2 += m.variance[c];
      e |= m.extrapolation[c];
    }
    value[c] = v;
    variance[c] = s2;
    extrapolation[c] = e;
  }
  return {
    variable: "precipMm",
    period: 0,
    trend: null,
    variogram: null,
    crossValidation: null,
    model: null,
    planes: { value, variance, extrapolation },
    stats: {
      method: "derived-annual-sum",
      units: "mm",
      ...planeStats(value, variance),
      stations: { used: Math.min(...months.map((m) => m.stations)), excludedCoverage: 0 },
      seaLevelEquivalent: ctx.elevation === null,
      extrapolation: extrapolationStats(extrapolation, ctx, params.extrapolationKm),
      note: "Annual precipitation = the sum of the twelve monthly surfaces; variance = the sum of the monthly variances (months' errors taken as independent).",
    },
  };
}
