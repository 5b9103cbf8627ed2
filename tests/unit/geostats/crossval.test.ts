import { describe, expect, it } from "vitest";
import { type CrossValidation, createKrigingModel, createStationSet, crossValidate } from "@/lib/geostats";
import { type FixtureCv, lonlat, maxRel, meuse, rng } from "./fixtures";

function expectCv(cv: CrossValidation, ref: FixtureCv): void {
  expect(maxRel(cv.predicted, ref.pred)).toBeLessThan(1e-6);
  expect(maxRel(cv.variance, ref.var)).toBeLessThan(1e-6);
  expect(maxRel(cv.observed, ref.observed)).toBe(0);
  // residuals and z-scores can be near zero: compare against their spread
  const scale = Math.max(...ref.residual.map(Math.abs));
  for (let i = 0; i < cv.n; i++) {
    expect(Math.abs(cv.residual[i] - ref.residual[i])).toBeLessThan(1e-6 * scale);
    expect(Math.abs(cv.zScore[i] - ref.zscore[i])).toBeLessThan(1e-6 * Math.max(1, Math.abs(ref.zscore[i])));
  }
  const s = ref.summary;
  expect(Math.abs(cv.meanError - s.meanError)).toBeLessThan(1e-8);
  expect(cv.rmse).toBeCloseTo(s.rmse, 8);
  expect(Math.abs(cv.meanZ - s.meanZ)).toBeLessThan(1e-8);
  expect(cv.meanZ2).toBeCloseTo(s.meanZ2, 8);
}

describe("leave-one-out cross-validation against gstat::krige.cv", () => {
  const m = meuse();
  const stations = createStationSet({ coordinates: "planar", points: m.points.x.map((x, i) => [x, m.points.y[i]]) });
  it("meuse ordinary kriging, global neighbourhood [gstat]", () => {
    expectCv(crossValidate(createKrigingModel({ stations, values: m.points.value, variogram: m.crossValidation.variogram })), m.crossValidation.global);
  });
  it(`meuse ordinary kriging, nmax = ${m.nmax} [gstat]`, () => {
    expect(m.crossValidation.cvTie.some(Boolean)).toBe(false);
    const model = createKrigingModel({ stations, values: m.points.value, variogram: m.crossValidation.variogram, maxNeighbors: m.nmax });
    expectCv(crossValidate(model), m.crossValidation.nmax);
  });
  it("meuse universal kriging with sqrt(dist), global [gstat]", () => {
    const model = createKrigingModel({
      stations,
      values: m.points.value,
      variogram: m.crossValidation.universalVariogram,
      drift: { points: m.points.sqrtDist.map((v) => [v]) },
    });
    expectCv(crossValidate(model), m.crossValidation.universal);
  });

  const l = lonlat();
  const ll = createStationSet({ coordinates: "lonlat", points: l.stations.lon.map((x, i) => [x, l.stations.lat[i]]) });
  it("long/lat network: ordinary (nmax and global) and universal kriging [gstat]", () => {
    expectCv(crossValidate(createKrigingModel({ stations: ll, values: l.stations.valueOK, variogram: l.ordinary.variogram, maxNeighbors: l.nmax })), l.crossValidation.ordinaryNmax);
    expectCv(crossValidate(createKrigingModel({ stations: ll, values: l.stations.valueOK, variogram: l.ordinary.variogram })), l.crossValidation.ordinaryGlobal);
    const drift = { points: l.stations.absLat.map((v, i) => [v, l.stations.lat2[i], l.stations.elev[i]]) };
    expectCv(crossValidate(createKrigingModel({ stations: ll, values: l.stations.value, variogram: l.universal.variogram, drift })), l.crossValidation.universalGlobal);
  });
});

describe("the closed-form global leave-one-out (Dubrule 1983 [mem]) equals refitting without each station", () => {
  it("ordinary and universal kriging", () => {
    const r = rng(21);
    const pts: number[][] = [];
    for (let i = 0; i < 40; i++) pts.push([100 * r(), 100 * r()]);
    const vals = pts.map((p) => Math.cos(p[0] / 30) + 0.2 * r());
    const drift = pts.map((p) => [p[1] / 100]);
    const vgm = { model: "spherical" as const, nugget: 0.02, psill: 0.5, range: 60 };
    for (const withDrift of [false, true]) {
      const model = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm, drift: withDrift ? { points: drift } : undefined });
      const cv = crossValidate(model);
      for (let i = 0; i < pts.length; i++) {
        const keep = pts.map((_, j) => j).filter((j) => j !== i);
        const without = createKrigingModel({
          coordinates: "planar",
          points: keep.map((j) => pts[j]),
          values: keep.map((j) => vals[j]),
          variogram: vgm,
          drift: withDrift ? { points: keep.map((j) => drift[j]) } : undefined,
        });
        const p = without.predict(pts[i][0], pts[i][1], withDrift ? drift[i] : undefined);
        expect(cv.predicted[i]).toBeCloseTo(p.value, 9);
        expect(cv.variance[i]).toBeCloseTo(p.variance, 9);
      }
    }
  });
});
