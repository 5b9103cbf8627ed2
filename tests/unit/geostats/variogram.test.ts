import { describe, expect, it } from "vitest";
import {
  type EmpiricalVariogram,
  createStationSet,
  covariance,
  empiricalVariogram,
  fitVariogram,
  fitVariogramBest,
  semivariance,
} from "@/lib/geostats";
import { type FixtureEv, type FixtureFit, lonlat, maxRel, meuse, relClose } from "./fixtures";

function expectEv(ev: EmpiricalVariogram, ref: FixtureEv): void {
  expect(Array.from(ev.np)).toEqual(ref.np);
  expect(maxRel(ev.dist, ref.dist)).toBeLessThan(1e-10);
  expect(maxRel(ev.gamma, ref.gamma)).toBeLessThan(1e-10);
  expect(maxRel(ev.boundaries, ref.boundaries)).toBeLessThan(1e-10);
}

const m = meuse();
const meuseStations = createStationSet({ coordinates: "planar", points: m.points.x.map((x, i) => [x, m.points.y[i]]) });
const evMeuse = empiricalVariogram({ stations: meuseStations, values: m.points.value });
const evMeuseUk = empiricalVariogram({ stations: meuseStations, values: m.points.value, drift: { points: m.points.sqrtDist.map((v) => [v]) } });
const l = lonlat();
const llStations = createStationSet({ coordinates: "lonlat", points: l.stations.lon.map((x, i) => [x, l.stations.lat[i]]) });
const evLl = empiricalVariogram({ stations: llStations, values: l.stations.valueOK });
const evLlUk = empiricalVariogram({
  stations: llStations,
  values: l.stations.value,
  drift: { points: l.stations.absLat.map((v, i) => [v, l.stations.lat2[i], l.stations.elev[i]]) },
});

describe("variogram models (gstat conventions [pub])", () => {
  it("spherical, exponential and gaussian with nugget and partial sill", () => {
    const sph = { model: "spherical" as const, nugget: 0.1, psill: 1, range: 100 };
    expect(semivariance(sph, 0)).toBe(0);
    expect(semivariance(sph, 50)).toBeCloseTo(0.1 + 1 * (1.5 * 0.5 - 0.5 * 0.125), 14);
    expect(semivariance(sph, 100)).toBeCloseTo(1.1, 14);
    expect(semivariance(sph, 500)).toBeCloseTo(1.1, 14);
    const exp = { model: "exponential" as const, nugget: 0, psill: 2, range: 10 };
    expect(semivariance(exp, 10)).toBeCloseTo(2 * (1 - Math.exp(-1)), 14);
    const gau = { model: "gaussian" as const, nugget: 0.5, psill: 1, range: 10 };
    expect(semivariance(gau, 20)).toBeCloseTo(0.5 + 1 - Math.exp(-4), 14);
    expect(covariance(gau, 0)).toBe(1.5);
    expect(covariance(gau, 20)).toBeCloseTo(Math.exp(-4), 14);
  });
});

describe("empirical variogram against gstat::variogram", () => {
  it("meuse log(zinc), default cutoff (0.33333 × bounding-box diagonal) and 15 bins [gstat]", () => {
    expectEv(evMeuse, m.variogram.default);
  });
  it("meuse with cutoff 1000 m and width 50 m [gstat]", () => {
    expectEv(empiricalVariogram({ stations: meuseStations, values: m.points.value, cutoff: 1000, width: 50 }), m.variogram.user);
  });
  it("meuse residuals of log(zinc) ~ sqrt(dist) (ordinary least squares, as gstat) [gstat]", () => {
    expectEv(evMeuseUk, m.variogram.universal);
  });
  it("long/lat network: great-circle distances in km, cutoff from the ellipsoidal box diagonal [gstat]", () => {
    expectEv(evLl, l.variogram.default);
    expect(relClose(evLl.cutoff, 0.33333 * l.variogram.bboxDiagonalKm, 1e-12)).toBe(true);
    expectEv(evLlUk, l.variogram.universal);
  });
});

function checkGstatFit(ev: EmpiricalVariogram, f: FixtureFit, tol: number): void {
  const fit = fitVariogram(ev, { model: f.model, fitMethod: f.fitMethod });
  expect(fit.algorithm).toBe("gstat");
  expect(relClose(fit.variogram.nugget, f.fitted.nugget, tol, 1e-9), `${f.model}/${f.fitMethod} nugget`).toBe(true);
  expect(relClose(fit.variogram.psill, f.fitted.psill, tol), `${f.model}/${f.fitMethod} psill`).toBe(true);
  expect(relClose(fit.variogram.range, f.fitted.range, tol), `${f.model}/${f.fitMethod} range`).toBe(true);
  expect(relClose(fit.sse, f.sse, Math.max(tol, 1e-6))).toBe(true);
  expect(fit.initial.nugget).toBeCloseTo(f.initial.nugget, 12);
  expect(fit.initial.psill).toBeCloseTo(f.initial.psill, 12);
  expect(fit.initial.range).toBeCloseTo(f.initial.range, 9);
}

describe("fitVariogram against gstat::fit.variogram", () => {
  const converged = m.fits.filter((f) => f.warnings.length === 0);
  const notConverged = m.fits.filter((f) => f.warnings.length > 0);

  it("meuse: every fit gstat converges reproduces gstat's nugget, partial sill and range (contract 1%; we get 1e-6) [gstat]", () => {
    expect(converged.length).toBe(9);
    for (const f of converged) checkGstatFit(evMeuse, f, 1e-6);
    checkGstatFit(evMeuseUk, m.fitUniversal, 1e-6);
    checkGstatFit(empiricalVariogram({ stations: meuseStations, values: m.points.value, cutoff: 1000, width: 50 }), m.fitUser, 1e-6);
  });

  it("long/lat network fits (exponential, spherical, universal residuals) [gstat]", () => {
    for (const f of l.fits) checkGstatFit(evLl, f, 1e-6);
    checkGstatFit(evLlUk, l.fitUniversal, 1e-6);
  });

  it("where gstat does not converge (meuse gaussian, fit methods 1, 2, 6) the engine says so and returns the better weighted least-squares optimum [gstat]", () => {
    expect(notConverged.map((f) => `${f.model}/${f.fitMethod}`)).toEqual(["gaussian/1", "gaussian/2", "gaussian/6"]);
    for (const f of notConverged) {
      const strict = fitVariogram(evMeuse, { model: f.model, fitMethod: f.fitMethod, fallback: false });
      expect(strict.converged).toBe(false);
      expect(strict.warnings.join(" ")).toMatch(/No convergence after 200 iterations/);
      const fit = fitVariogram(evMeuse, { model: f.model, fitMethod: f.fitMethod });
      expect(fit.algorithm).toBe("optimal");
      expect(fit.warnings.join(" ")).toMatch(/Gauss–Newton fit failed/);
      expect(fit.sse).toBeLessThan(f.sse);
    }
  });

  it("the 'optimal' algorithm never fits worse than gstat for fixed weights (methods 1, 6, 7) and agrees within 1% where gstat converged", () => {
    for (const f of m.fits) {
      if (f.fitMethod === 2) continue; // method 2 weights come from the starting model, which gstat's restart changes
      const fit = fitVariogram(evMeuse, { model: f.model, fitMethod: f.fitMethod, algorithm: "optimal" });
      expect(fit.sse).toBeLessThanOrEqual(f.sse * (1 + 1e-9));
      if (f.warnings.length === 0 && f.model !== "gaussian") {
        expect(relClose(fit.variogram.psill, f.fitted.psill, 0.01)).toBe(true);
        expect(relClose(fit.variogram.range, f.fitted.range, 0.01)).toBe(true);
      }
    }
  });

  it("gstat's gaussian fit with method 7 stops short of the optimum; the engine keeps gstat's answer and notes the better one", () => {
    const f = m.fits.find((x) => x.model === "gaussian" && x.fitMethod === 7) as FixtureFit;
    const fit = fitVariogram(evMeuse, { model: "gaussian", fitMethod: 7 });
    expect(relClose(fit.variogram.range, f.fitted.range, 1e-6)).toBe(true);
    expect(fit.warnings.join(" ")).toMatch(/optimum fits better/);
  });

  it("fitVariogramBest picks the model with the smallest SSE", () => {
    const best = fitVariogramBest(evMeuse, {});
    const sses = (["spherical", "exponential", "gaussian"] as const).map((model) => fitVariogram(evMeuse, { model }).sse);
    expect(best.sse).toBe(Math.min(...sses));
  });

  it("fixed nugget and fixed range", () => {
    const fit = fitVariogram(evMeuse, { model: "exponential", fixNugget: 0, algorithm: "optimal" });
    expect(fit.variogram.nugget).toBe(0);
    const fr = fitVariogram(evMeuse, { model: "spherical", fixRange: 900 });
    expect(fr.variogram.range).toBe(900);
  });
});

describe("fits that should warn or fail", () => {
  const flat = (gamma: number[], dist?: number[]): EmpiricalVariogram => ({
    np: Float64Array.from(gamma, () => 100),
    dist: Float64Array.from(dist ?? gamma.map((_, i) => 10 * (i + 1))),
    gamma: Float64Array.from(gamma),
    boundaries: Float64Array.from([0, 160]),
    cutoff: 160,
    width: 10,
  });

  it("no spatial structure: a flat variogram fits a pure nugget, with a warning", () => {
    const fit = fitVariogram(flat(Array(15).fill(2)), { model: "spherical", algorithm: "optimal" });
    expect(fit.variogram.psill).toBeLessThan(1e-9);
    expect(fit.variogram.nugget).toBeCloseTo(2, 9);
    expect(fit.warnings.join(" ")).toMatch(/no spatial structure/);
  });

  it("no sill within the cutoff: a linear variogram drives the range to the search bound, with a warning", () => {
    const fit = fitVariogram(flat(Array.from({ length: 15 }, (_, i) => 0.1 * (i + 1))), { model: "exponential", algorithm: "optimal" });
    expect(fit.converged).toBe(false);
    expect(fit.warnings.join(" ")).toMatch(/no sill/);
  });

  it("clear errors: too few bins, constant values, zero-distance bin with method 7", () => {
    expect(() => fitVariogram(flat([1, 2]), { model: "spherical" })).toThrow(/too few points/);
    expect(() => fitVariogram(flat([0, 0, 0, 0]), { model: "spherical" })).toThrow(/do not vary/);
    expect(() => fitVariogram(flat([1, 2, 3], [0, 10, 20]), { model: "spherical" })).toThrow(/zero-distance/);
    expect(() => fitVariogram(flat([1, 2, 3]), { model: "cubic" as never })).toThrow(/variogram.model/);
  });
});
