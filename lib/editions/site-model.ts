import { type KrigingModel, type StationSet, SurfaceBatch, restoreKrigingModel } from "@/lib/geostats";
import { permuteRows, spatialOrder } from "@/lib/geostats/order";
import { fitWaterLine, type WaterLineMethod } from "@/lib/isotopes";
import type { EditionPredictor, Estimate, InformingStation, PeriodPrediction, SiteInput, SitePrediction, SurfaceModelRecord } from "./prediction";
import type { SurfaceStats, SurfaceTrend, SurfaceVariable } from "./types";

// Site predictions from an edition's stored models (the contract is
// lib/editions/prediction.ts). Values are computed exactly at the site, never
// read from the grid:
//   δ18O, d-excess: regression-kriging — trend b·[1, |lat|, lat², elevation] + OK residual;
//     variance = kriging variance + xᵀ·Cov(b)·x — regression-kriging prediction variance,
//     Hengl, Heuvelink & Rossiter (2007), Computers & Geosciences 33:1301–1315 [mem], with the
//     trend and the residual field treated as independent (the trend is fitted by OLS first).
//   δ2H = d-excess + 8·δ18O — Dansgaard (1964), Tellus 16:436 [pub]; variance
//     Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18O — propagation with correlated inputs, JCGM 100:2008
//     §5.2.2 [mem] — with the ρ each period's d2H surface states in stats.note ("ρ = 0.1234", as the
//     edition build writes it); no ρ stated → 0, the two kriging errors treated as independent.
//   precipitation: ordinary kriging of √P, P = max(z, 0)² — square-root transform [trade].
//   95% interval: value ± 1.959964·sd (Gaussian) [trade]; precipitation: the z interval squared.
// Pure (no database, no server-only imports): lib/editions/predictor.ts loads an edition's
// EditionSource and caches its predictor; the prediction worker threads
// (lib/editions/predict-pool.ts) build the same predictor from the same source.

/** 97.5% quantile of the standard normal distribution [trade]. */
export const Z95 = 1.959964;

/** Informing stations listed per site (nearest first; the weights of a global neighbourhood beyond these are small). */
export const MAX_LISTED_STATIONS = 12;


type Kind = SurfaceModelRecord["kind"];

interface KrigedSurface {
  variable: SurfaceVariable;
  period: number;
  kind: Kind;
  model: KrigingModel;
  /** Trend coefficients [b0, b|lat|, blat², belev] and their 4×4 covariance (regression-kriging only). */
  beta: Float64Array | null;
  betaCov: Float64Array | null;
  codes: string[];
  extrapolationKm: number;
}

interface SurfaceGroup {
  stations: StationSet;
  surfaces: KrigedSurface[];
}

/** The edition's facts a page or answer cites. */
export interface EditionInfo {
  id: string;
  publishedAt: Date | null;
  isDemo: boolean;
  withdrawnAt: Date | null;
  withdrawnReason: string | null;
  /** What the edition says about how δ2H's variance was combined (annual d2H surface's stats.note), if anything. */
  d2HNote: string | null;
  /** Correlation ρ of the δ18O and d-excess errors used for δ2H's variance, per period 0–12 (0 = independent). */
  d2HCorrelation: number[];
  /** True when the edition stores monthly precipitation models (the line is then precipitation-weighted). */
  hasPrecipitation: boolean;
}

export interface LoadedEditionPredictor extends EditionPredictor {
  edition: EditionInfo;
}

const TREND_ORDER = ["intercept", "absLat", "lat2", "elevation"] as const;

function isTrend(t: unknown): t is SurfaceTrend {
  return !!t && typeof t === "object" && Array.isArray((t as SurfaceTrend).terms) && Array.isArray((t as SurfaceTrend).covariance);
}

/** Trend coefficients in the order [1, |lat|, lat², elevation], with their covariance. */
function readTrend(t: SurfaceTrend, where: string): { beta: Float64Array; cov: Float64Array } {
  const p = t.terms.length;
  const beta = new Float64Array(4);
  const cov = new Float64Array(16);
  const pos = t.terms.map((term) => TREND_ORDER.indexOf(term.name));
  if (pos.some((i) => i < 0) || t.covariance.length !== p * p) throw new Error(`${where}: the stored trend does not have the terms [intercept, absLat, lat2, elevation] with a ${p}×${p} covariance`);
  for (let i = 0; i < p; i++) {
    beta[pos[i]] = t.terms[i].estimate;
    for (let j = 0; j < p; j++) cov[pos[i] * 4 + pos[j]] = t.covariance[i * p + j];
  }
  return { beta, cov };
}

export function estimate(value: number, variance: number): Estimate {
  const sd = Math.sqrt(Math.max(0, variance));
  return { value, sd, lower95: value - Z95 * sd, upper95: value + Z95 * sd };
}

/** √P kriged as z ± σ → P = max(z, 0)²; sd from Var(z²) = 4μ²σ² + 2σ⁴ for a normal z [trade]; interval = the z interval squared. */
function precipEstimate(z: number, variance: number): Estimate {
  const v = Math.max(0, variance);
  const s = Math.sqrt(v);
  const zp = Math.max(z, 0);
  const lo = Math.max(z - Z95 * s, 0);
  const hi = Math.max(z + Z95 * s, 0);
  return { value: zp * zp, sd: Math.sqrt(4 * zp * zp * v + 2 * v * v), lower95: lo * lo, upper95: hi * hi };
}

function checkSite(site: SiteInput, i: number): void {
  const { lat, lon } = site;
  const at = i >= 0 ? ` (site ${i + 1})` : "";
  if (typeof lat !== "number" || !Number.isFinite(lat) || lat < -90 || lat > 90) throw new RangeError(`Latitude must be a number from −90 to 90${at}.`);
  if (typeof lon !== "number" || !Number.isFinite(lon) || lon < -180 || lon > 180) throw new RangeError(`Longitude must be a number from −180 to 180${at}.`);
  const e = site.elevationM;
  if (e !== null && e !== undefined && (typeof e !== "number" || !Number.isFinite(e) || e < -500 || e > 9000)) {
    throw new RangeError(`Elevation must be a number of metres from −500 to 9000${at}.`);
  }
}

class Predictor implements LoadedEditionPredictor {
  readonly editionId: string;
  readonly edition: EditionInfo;
  private readonly groups: SurfaceGroup[];
  /** [variable][period] → position in its group: (group, index) */
  private readonly where = new Map<string, { g: number; i: number }>();
  private readonly anchor: KrigedSurface;
  private readonly names: Map<string, string>;
  /**
   * One SurfaceBatch per station set, kept for the predictor's life: its evaluators, WebAssembly
   * workspaces and factorisation caches are reused by every request (calls are synchronous, so
   * never interleaved). Caches only save work; answers are the same as with a fresh batch.
   */
  private readonly batches: SurfaceBatch[];
  private readonly noDrift: null[][];
  private single: { value: Float64Array; variance: Float64Array }[][] | null = null;

  constructor(edition: EditionInfo, groups: SurfaceGroup[], names: Map<string, string>) {
    this.editionId = edition.id;
    this.edition = edition;
    this.groups = groups;
    this.names = names;
    groups.forEach((g, gi) => g.surfaces.forEach((s, si) => this.where.set(`${s.variable}:${s.period}`, { g: gi, i: si })));
    for (const v of ["d18O", "dExcess"] as const) {
      for (let p = 0; p <= 12; p++) if (!this.where.has(`${v}:${p}`)) throw new Error(`edition ${edition.id}: no stored model for ${v}, period ${p}`);
    }
    const a = this.where.get("d18O:0")!;
    this.anchor = groups[a.g].surfaces[a.i];
    this.batches = groups.map((g) => new SurfaceBatch(g.surfaces.map((s) => s.model)));
    this.noDrift = groups.map((g) => g.surfaces.map(() => null));
  }

  /** Every surface's kriged value and variance at the sites, per group: sites in kd order (neighbouring sites reuse factorised systems), answers in the caller's order. */
  private krige(xy: Float64Array, n: number): { value: Float64Array; variance: Float64Array }[][] {
    if (n === 1) {
      // a single site (the common request): reuse the one-element outputs, read before the next call
      this.single ??= this.groups.map((g) => g.surfaces.map(() => ({ value: new Float64Array(1), variance: new Float64Array(1) })));
      this.batches.forEach((b, gi) => b.run({ kind: "points", xy }, 0, 1, this.noDrift[gi], this.single![gi]));
      return this.single;
    }
    const order = spatialOrder(xy);
    const src = order ? permuteRows(xy, order, 2) : xy;
    return this.batches.map((b, gi) => {
      const outs = this.groups[gi].surfaces.map(() => ({ value: new Float64Array(n), variance: new Float64Array(n) }));
      b.run({ kind: "points", xy: src }, 0, n, this.noDrift[gi], outs);
      if (!order) return outs;
      return outs.map((o) => {
        const value = new Float64Array(n);
        const variance = new Float64Array(n);
        for (let j = 0; j < n; j++) {
          value[order[j]] = o.value[j];
          variance[order[j]] = o.variance[j];
        }
        return { value, variance };
      });
    });
  }

  predict(site: SiteInput): SitePrediction {
    return this.predictMany([site])[0];
  }

  predictMany(sites: SiteInput[]): SitePrediction[] {
    const n = sites.length;
    const xy = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      checkSite(sites[i], n > 1 ? i : -1);
      xy[2 * i] = sites[i].lon;
      xy[2 * i + 1] = sites[i].lat;
    }
    // one neighbour search per site and station set, shared by all of the set's surfaces
    const planes = this.krige(xy, n);
    const at = (variable: SurfaceVariable, period: number) => {
      const w = this.where.get(`${variable}:${period}`);
      return w ? { s: this.groups[w.g].surfaces[w.i], out: planes[w.g][w.i] } : null;
    };
    const d18O = Array.from({ length: 13 }, (_, p) => at("d18O", p)!);
    const dex = Array.from({ length: 13 }, (_, p) => at("dExcess", p)!);
    const precip = Array.from({ length: 13 }, (_, p) => (p === 0 ? null : at("precipMm", p)));
    const hasPrecip = precip.slice(1).every((x) => x !== null);

    const results: SitePrediction[] = new Array(n);
    const x = new Float64Array(4);
    const rk = (r: { s: KrigedSurface; out: { value: ArrayLike<number>; variance: ArrayLike<number> | null } }, t: number) => {
      const beta = r.s.beta!;
      const C = r.s.betaCov!;
      let trend = 0;
      let tv = 0;
      for (let a = 0; a < 4; a++) {
        trend += beta[a] * x[a];
        let row = 0;
        for (let b = 0; b < 4; b++) row += C[a * 4 + b] * x[b];
        tv += x[a] * row;
      }
      return { value: trend + r.out.value[t], variance: (r.out.variance ? r.out.variance[t] : 0) + Math.max(0, tv) };
    };
    for (let t = 0; t < n; t++) {
      const site = sites[t];
      const elev = site.elevationM ?? null;
      x[0] = 1;
      x[1] = Math.abs(site.lat);
      x[2] = site.lat * site.lat;
      x[3] = elev ?? 0;
      const periods: PeriodPrediction[] = new Array(13);
      let annualP = 0;
      let annualPVar = 0;
      for (let p = 0; p <= 12; p++) {
        const o = rk(d18O[p], t);
        const d = rk(dex[p], t);
        let pm: Estimate | null = null;
        const pr = precip[p];
        if (pr) {
          pm = precipEstimate(pr.out.value[t], pr.out.variance ? pr.out.variance[t] : 0);
          annualP += pm.value;
          annualPVar += pm.sd * pm.sd;
        }
        const rho = this.edition.d2HCorrelation[p];
        periods[p] = {
          d18O: estimate(o.value, o.variance),
          // δ2H = d + 8·δ18O — Dansgaard (1964); Var = Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18O — JCGM 100:2008 §5.2.2 [mem]
          d2H: estimate(d.value + 8 * o.value, Math.max(0, d.variance + 64 * o.variance + 16 * rho * Math.sqrt(d.variance * o.variance))),
          dExcess: estimate(d.value, d.variance),
          precipMm: pm,
        };
      }
      if (hasPrecip) {
        // annual amount = Σ months; variances added (months treated as independent)
        const sd = Math.sqrt(annualPVar);
        periods[0].precipMm = { value: annualP, sd, lower95: Math.max(0, annualP - Z95 * sd), upper95: annualP + Z95 * sd };
      }
      const monthly: SitePrediction["monthly"] = new Array(12);
      for (let m = 1; m <= 12; m++) {
        const q = periods[m];
        monthly[m - 1] = { month: m, d18O: q.d18O, d2H: q.d2H, dExcess: q.dExcess, precipMm: q.precipMm };
      }
      // informing stations: the annual δ18O residual model's neighbours and OK weights
      const k = this.anchor.model.predict(site.lon, site.lat);
      const listed: InformingStation[] = [];
      for (let j = 0; j < k.neighbours.length && j < MAX_LISTED_STATIONS; j++) {
        const nb = k.neighbours[j];
        const code = this.anchor.codes[nb.index];
        listed.push({ code, name: this.names.get(code) ?? code, distanceKm: nb.distance, weight: nb.weight });
      }
      const nearest = k.neighbours.length ? k.neighbours[0].distance : Infinity;
      results[t] = {
        edition: this.editionId,
        site: {
          lat: site.lat,
          lon: site.lon,
          elevationM: elev,
          extrapolation: nearest > this.anchor.extrapolationKm,
          nearestStationKm: nearest,
          extrapolationKm: this.anchor.extrapolationKm,
        },
        annual: periods[0],
        monthly,
        waterLine: waterLineOf(monthly, hasPrecip),
        stations: listed,
      };
    }
    return results;
  }
}

/** The predicted LMWL through the 12 monthly predictions, weighted by predicted monthly precipitation (Hughes & Crawford 2012, PWLSR). */
function waterLineOf(monthly: (PeriodPrediction & { month: number })[], weighted: boolean): SitePrediction["waterLine"] {
  const pts = monthly.map((m) => ({ d18O: m.d18O.value, d2H: m.d2H.value, amountMm: m.precipMm?.value ?? null }));
  const tryFit = (method: WaterLineMethod) => {
    const f = fitWaterLine(pts, method);
    return { slope: f.slope, intercept: f.intercept, slopeSE: f.slopeSE, interceptSE: f.interceptSE, r2: f.r2, method };
  };
  try {
    return tryFit(weighted ? "pwlsr" : "ols");
  } catch (e) {
    if (!(e instanceof RangeError)) throw e;
    // no seasonal spread (or no rain in most months): no line can be fitted at this site
    return { slope: Number.NaN, intercept: Number.NaN, slopeSE: Number.NaN, interceptSE: Number.NaN, r2: Number.NaN, method: "none" };
  }
}

/** The ρ a d2H surface's note states ("… with ρ = 0.1234, …"); 0 when none is stated (independent errors). */
export function statedCorrelation(note: string): number {
  const m = /ρ\s*=\s*([+-−]?\d+(?:\.\d+)?)/.exec(note);
  if (!m) return 0;
  const rho = Number(m[1].replace("−", "-"));
  return Number.isFinite(rho) && rho >= -1 && rho <= 1 ? rho : 0;
}


/** What a predictor is built from: the edition's facts, its stored surface rows and the names of their stations (structured-cloneable). */
export interface EditionSource {
  edition: { id: string; publishedAt: Date | null; isDemo: boolean; withdrawnAt: Date | null; withdrawnReason: string | null };
  rows: { variable: SurfaceVariable; period: number; trend: unknown; stats: unknown; model: unknown }[];
  /** [code, name] of every station the models name. */
  names: [string, string][];
}

/** Station codes the source's models name (their names are looked up for the answer). */
export function sourceStationCodes(rows: EditionSource["rows"]): string[] {
  const codes = new Set<string>();
  for (const r of rows) for (const c of (r.model as SurfaceModelRecord | null)?.stationCodes ?? []) codes.add(c);
  return [...codes];
}

/** The site predictor of an edition, from its source. */
export function predictorFromSource(source: EditionSource): LoadedEditionPredictor {
  const e = source.edition;
  const rows = source.rows;
  const groups: SurfaceGroup[] = [];
  const byPoints = new Map<string, SurfaceGroup>();
  let d2HNote: string | null = null;
  const d2HCorrelation = new Array<number>(13).fill(0);
  for (const r of rows) {
    const stats = r.stats as SurfaceStats | null;
    if (r.variable === "d2H" && stats) {
      if (r.period === 0 && stats.note) d2HNote = stats.note;
      // the exact ρ the build used; editions stored before it was recorded state it (rounded) in the note
      d2HCorrelation[r.period] = typeof stats.d2HCorrelation === "number" ? stats.d2HCorrelation : statedCorrelation(stats.note ?? "");
    }
    const rec = r.model as SurfaceModelRecord | null;
    if (!rec) continue; // derived surfaces (δ2H, annual precipitation)
    const where = `edition ${e.id}, ${r.variable} period ${r.period}`;
    const pts = rec.kriging.arrays.points;
    const key = `${rec.kriging.header.coordinates}:${pts.length}:${pts.join(",")}`;
    let g = byPoints.get(key);
    const model = restoreKrigingModel(rec.kriging, g ? { stations: g.stations } : {});
    if (model.driftCovariates !== 0) throw new Error(`${where}: the stored residual model has drift; site predictions expect ordinary kriging of the residuals`);
    if (!g) {
      g = { stations: model.stations, surfaces: [] };
      byPoints.set(key, g);
      groups.push(g);
    }
    let beta: Float64Array | null = null;
    let betaCov: Float64Array | null = null;
    if (rec.kind === "regression-kriging") {
      if (!isTrend(r.trend)) throw new Error(`${where}: a regression-kriging surface without a stored trend`);
      ({ beta, cov: betaCov } = readTrend(r.trend, where));
    }
    g.surfaces.push({ variable: r.variable, period: r.period, kind: rec.kind, model, beta, betaCov, codes: rec.stationCodes, extrapolationKm: rec.extrapolationKm });
  }
  const hasPrecipitation = rows.some((r) => r.variable === "precipMm" && r.period > 0 && r.model);
  return new Predictor({ ...e, d2HNote, d2HCorrelation, hasPrecipitation }, groups, new Map(source.names));
}
