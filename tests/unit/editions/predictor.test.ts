import { beforeAll, describe, expect, it } from "vitest";
import { AppError } from "@/lib/errors";
import { forgetEditionPredictors, loadEditionPredictor, statedCorrelation, Z95 } from "@/lib/editions/predictor";
import { createKrigingModel } from "@/lib/geostats";
import { fitWaterLine } from "@/lib/isotopes";
import { freshDb } from "../helpers/db";
import { insertTestEdition, insertTestStations } from "../helpers/edition";
import { fitTrend, testStations, testStationValue, type TestStation } from "../../shared/test-edition";

// The site predictor against the engine computed directly (lib/geostats + the trend), on a small
// invented edition (synthetic test data) written to this file's temporary database.

const ALPS = testStations("RP-PRD", 40, { lat: [44, 49], lon: [5, 12] }, 7);
const VG = { model: "exponential" as const, nugget: 0.1, psill: 1, range: 800 };

beforeAll(async () => {
  await freshDb();
  await insertTestStations(ALPS);
  await insertTestEdition({ id: "2026.01.1", stations: ALPS, variogram: VG, publishedAt: new Date("2026-01-10T00:00:00Z") });
  // the same stations without a nugget (exact interpolation), and local neighbourhoods
  await insertTestEdition({ id: "2026.02.1", stations: ALPS, variogram: { ...VG, nugget: 0 }, maxNeighbors: 12, publishedAt: new Date("2026-02-10T00:00:00Z") });
  await insertTestEdition({ id: "2026.03.1", stations: ALPS, status: "ready" });
  await insertTestEdition({ id: "2025.12.1", stations: ALPS, variogram: VG, d2HRho: -0.35, publishedAt: new Date("2025-12-10T00:00:00Z") });
  forgetEditionPredictors();
});

/** Regression-kriging computed directly: trend(site) + OK residual, variance = kriging variance + xᵀCov(b)x. */
function direct(variable: "d18O" | "dExcess", period: number, site: { lat: number; lon: number; elevationM: number | null }, nugget = 0.1, maxNeighbors: number | null = null) {
  const { trend, residuals } = fitTrend(ALPS, ALPS.map((s) => testStationValue(variable, period, s)));
  const model = createKrigingModel({ coordinates: "lonlat", points: ALPS.map((s) => [s.lon, s.lat]), values: residuals, variogram: { ...VG, nugget }, maxNeighbors });
  const k = model.predict(site.lon, site.lat);
  const x = [1, Math.abs(site.lat), site.lat ** 2, site.elevationM ?? 0];
  const b = trend.terms.map((t) => t.estimate);
  const C = trend.covariance;
  let tv = 0;
  for (let i = 0; i < 4; i++) for (let j = 0; j < 4; j++) tv += x[i] * C[i * 4 + j] * x[j];
  return { value: x.reduce((a, xi, i) => a + xi * b[i], 0) + k.value, variance: k.variance + tv, neighbours: k.neighbours };
}

const SITE = { lat: 46.504, lon: 7.208, elevationM: 1200 };

describe("loadEditionPredictor", () => {
  it("equals the engine's direct computation (trend + ordinary-kriged residual; variances added) for every period", async () => {
    const p = await loadEditionPredictor("2026.01.1");
    const r = p.predict(SITE);
    expect(r.edition).toBe("2026.01.1");
    for (let period = 0; period <= 12; period++) {
      const got = period === 0 ? r.annual : r.monthly[period - 1];
      for (const v of ["d18O", "dExcess"] as const) {
        const d = direct(v, period, SITE);
        expect(got[v].value).toBeCloseTo(d.value, 9);
        expect(got[v].sd).toBeCloseTo(Math.sqrt(d.variance), 9);
        expect(got[v].lower95).toBeCloseTo(d.value - Z95 * Math.sqrt(d.variance), 9);
        expect(got[v].upper95).toBeCloseTo(d.value + Z95 * Math.sqrt(d.variance), 9);
      }
    }
    expect(r.monthly.map((m) => m.month)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
  });

  it("without an elevation predicts the sea-level equivalent (elevation term at 0 m)", async () => {
    const p = await loadEditionPredictor("2026.01.1");
    const r = p.predict({ lat: SITE.lat, lon: SITE.lon });
    expect(r.site.elevationM).toBeNull();
    expect(r.annual.d18O.value).toBeCloseTo(direct("d18O", 0, { ...SITE, elevationM: null }).value, 9);
    // higher up is lighter: the fitted gradient is the toy model's −0.0028 ‰/m (Poage & Chamberlain 2001 [mem])
    expect(p.predict(SITE).annual.d18O.value).toBeLessThan(r.annual.d18O.value);
  });

  it("derives δ2H = d-excess + 8·δ18O (Dansgaard 1964) with Var(d) + 64·Var(δ18O) when the edition states no correlation", async () => {
    const r = (await loadEditionPredictor("2026.01.1")).predict(SITE);
    for (const m of [r.annual, ...r.monthly]) {
      expect(m.d2H.value).toBeCloseTo(m.dExcess.value + 8 * m.d18O.value, 9);
      expect(m.d2H.sd ** 2).toBeCloseTo(m.dExcess.sd ** 2 + 64 * m.d18O.sd ** 2, 9);
      expect(m.dExcess.value).toBeCloseTo(m.d2H.value - 8 * m.d18O.value, 9);
    }
  });

  it("uses the correlation the edition states for δ2H: Var(d) + 64·Var(δ18O) + 16·ρ·σd·σ18O (JCGM 100:2008 §5.2.2 [mem])", async () => {
    const p = await loadEditionPredictor("2025.12.1");
    expect(p.edition.d2HCorrelation).toEqual(new Array(13).fill(-0.35));
    const r = p.predict(SITE);
    for (const m of [r.annual, ...r.monthly]) {
      expect(m.d2H.sd ** 2).toBeCloseTo(m.dExcess.sd ** 2 + 64 * m.d18O.sd ** 2 + 16 * -0.35 * m.dExcess.sd * m.d18O.sd, 9);
    }
    // the same models without a stated ρ give the independent combination
    const indep = (await loadEditionPredictor("2026.01.1")).predict(SITE);
    expect(indep.annual.d18O.value).toBeCloseTo(r.annual.d18O.value, 12);
    expect(indep.annual.d2H.sd).toBeGreaterThan(r.annual.d2H.sd);
    expect(statedCorrelation("… with ρ = 0.1234, the correlation …")).toBe(0.1234);
    expect(statedCorrelation("errors taken as independent")).toBe(0);
  });

  it("at a station with no nugget returns that station's mean", async () => {
    const p = await loadEditionPredictor("2026.02.1");
    const s: TestStation = ALPS[5];
    const r = p.predict({ lat: s.lat, lon: s.lon, elevationM: s.elevationM });
    expect(r.annual.d18O.value).toBeCloseTo(testStationValue("d18O", 0, s), 9);
    expect(r.monthly[6].dExcess.value).toBeCloseTo(testStationValue("dExcess", 7, s), 9);
    expect(r.site.nearestStationKm).toBeCloseTo(0, 9);
    expect(r.stations[0]).toMatchObject({ code: s.code, name: `Test station ${s.code}` });
    expect(r.stations[0].weight).toBeCloseTo(1, 9);
    // and the engine with 12 neighbours agrees away from stations too
    const d = direct("d18O", 0, SITE, 0, 12);
    expect(p.predict(SITE).annual.d18O.value).toBeCloseTo(d.value, 9);
  });

  it("gives a site far from every station a wider interval than one beside a station, and flags extrapolation", async () => {
    const p = await loadEditionPredictor("2026.01.1");
    const near = p.predict({ lat: ALPS[0].lat + 0.01, lon: ALPS[0].lon, elevationM: 500 });
    const far = p.predict({ lat: 20, lon: 40, elevationM: 500 });
    expect(far.annual.d18O.upper95 - far.annual.d18O.lower95).toBeGreaterThan(near.annual.d18O.upper95 - near.annual.d18O.lower95);
    expect(far.annual.d2H.sd).toBeGreaterThan(near.annual.d2H.sd);
    expect(near.site.extrapolation).toBe(false);
    expect(far.site.extrapolation).toBe(true);
    expect(far.site.nearestStationKm).toBeGreaterThan(far.site.extrapolationKm);
  });

  it("lists the informing stations nearest first with their ordinary-kriging weights (the engine's)", async () => {
    const r = (await loadEditionPredictor("2026.01.1")).predict(SITE);
    const d = direct("d18O", 0, SITE);
    expect(r.stations.length).toBe(12);
    r.stations.forEach((s, i) => {
      expect(s.code).toBe(ALPS[d.neighbours[i].index].code);
      expect(s.distanceKm).toBeCloseTo(d.neighbours[i].distance, 9);
      expect(s.weight).toBeCloseTo(d.neighbours[i].weight, 9);
    });
    for (let i = 1; i < r.stations.length; i++) expect(r.stations[i].distanceKm).toBeGreaterThanOrEqual(r.stations[i - 1].distanceKm);
  });

  it("fits the predicted LMWL through the 12 monthly predictions weighted by predicted precipitation (PWLSR, Hughes & Crawford 2012)", async () => {
    const r = (await loadEditionPredictor("2026.01.1")).predict(SITE);
    const pts = r.monthly.map((m) => ({ x: m.d18O.value, y: m.d2H.value, p: m.precipMm!.value }));
    // Hughes & Crawford (2012) eqs 9–10 written out [pub]
    const sp = pts.reduce((a, q) => a + q.p, 0);
    const spx = pts.reduce((a, q) => a + q.p * q.x, 0);
    const spy = pts.reduce((a, q) => a + q.p * q.y, 0);
    const spxy = pts.reduce((a, q) => a + q.p * q.x * q.y, 0);
    const spx2 = pts.reduce((a, q) => a + q.p * q.x * q.x, 0);
    const slope = (spxy - (spx * spy) / sp) / (spx2 - (spx * spx) / sp);
    expect(r.waterLine.method).toBe("pwlsr");
    expect(r.waterLine.slope).toBeCloseTo(slope, 9);
    expect(r.waterLine.intercept).toBeCloseTo((spy - slope * spx) / sp, 9);
    expect(r.waterLine.slopeSE).toBeCloseTo(fitWaterLine(pts.map((q) => ({ d18O: q.x, d2H: q.y, amountMm: q.p })), "pwlsr").slopeSE, 9);
  });

  it("predicts precipitation from √P kriging, P = max(z, 0)², with the annual amount the sum of the months", async () => {
    const r = (await loadEditionPredictor("2026.01.1")).predict(SITE);
    const z = createKrigingModel({ coordinates: "lonlat", points: ALPS.map((s) => [s.lon, s.lat]), values: ALPS.map((s) => Math.sqrt(testStationValue("precipMm", 3, s))), variogram: { model: "exponential", nugget: 0.2, psill: 2, range: 1000 } }).predict(SITE.lon, SITE.lat);
    const m3 = r.monthly[2].precipMm!;
    expect(m3.value).toBeCloseTo(Math.max(z.value, 0) ** 2, 9);
    expect(m3.lower95).toBeCloseTo(Math.max(z.value - Z95 * Math.sqrt(z.variance), 0) ** 2, 9);
    expect(m3.upper95).toBeCloseTo((z.value + Z95 * Math.sqrt(z.variance)) ** 2, 9);
    expect(r.annual.precipMm!.value).toBeCloseTo(r.monthly.reduce((a, m) => a + m.precipMm!.value, 0), 9);
  });

  it("predictMany gives the same numbers as predict, site by site", async () => {
    const p = await loadEditionPredictor("2026.02.1");
    const sites = [SITE, { lat: 45.1, lon: 6.2, elevationM: null }, { lat: -30, lon: 150 }, { lat: 48.9, lon: 11.9, elevationM: 300 }];
    const many = p.predictMany(sites);
    sites.forEach((s, i) => expect(many[i]).toEqual(p.predict(s)));
  });

  it("defaults to the current (newest published) edition and caches predictors", async () => {
    const cur = await loadEditionPredictor();
    expect(cur.editionId).toBe("2026.02.1");
    expect(await loadEditionPredictor("2026.02.1")).toBe(cur);
  });

  it("refuses unknown and unpublished editions with the typed unknown-edition error (404)", async () => {
    for (const id of ["1999.1.1", "2026.03.1"]) {
      const e = await loadEditionPredictor(id).then(
        () => null,
        (x: unknown) => x,
      );
      expect(e).toBeInstanceOf(AppError);
      expect(e).toMatchObject({ type: "unknown-edition", status: 404 });
    }
  });

  it("refuses impossible coordinates with a clear message", async () => {
    const p = await loadEditionPredictor("2026.01.1");
    expect(() => p.predict({ lat: 91, lon: 0 })).toThrow(/Latitude must be a number from −90 to 90/);
    expect(() => p.predict({ lat: 0, lon: 181 })).toThrow(/Longitude/);
    expect(() => p.predictMany([SITE, { lat: Number.NaN, lon: 0 }])).toThrow(/site 2/);
  });
});
