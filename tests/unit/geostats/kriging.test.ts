import { describe, expect, it } from "vitest";
import {
  type KrigingModel,
  type VariogramModel,
  covariance,
  createKrigingModel,
  createStationSet,
  distance,
  krigingModelToJSON,
  predictSurfaces,
  restoreKrigingModel,
  serializeKrigingModel,
} from "@/lib/geostats";
import { type FixtureKrige, lonlat, maxRel, meuse, rng } from "./fixtures";

const m = meuse();
const meusePts = m.points.x.map((x, i) => [x, m.points.y[i]]);
const meuseTargets = m.targets.x.map((x, i) => [x, m.targets.y[i]]);
const l = lonlat();
const llPts = l.stations.lon.map((x, i) => [x, l.stations.lat[i]]);
const llTargets = l.targets.lon.map((x, i) => [x, l.targets.lat[i]]);
const llDrift = l.stations.absLat.map((v, i) => [v, l.stations.lat2[i], l.stations.elev[i]]);
const llTargetDrift = l.targets.absLat.map((v, i) => [v, l.targets.lat2[i], l.targets.elev[i]]);

/**
 * Predictions and variances agree with gstat to 1e-6 relative [gstat krige]. Variances at a
 * station without nugget are round-off (gstat ±1e-13, ours clamped to ≥ 0): relative to at least
 * 1e-6 × sill there.
 */
function expectGstat(
  out: { value: ArrayLike<number>; variance: ArrayLike<number> | null },
  ref: FixtureKrige,
  sill: number,
  skip: boolean[] = [],
): void {
  const keep = (a: ArrayLike<number>) => Array.from(a).filter((_, i) => !skip[i]);
  expect(maxRel(keep(out.value), keep(ref.pred))).toBeLessThan(1e-6);
  expect(maxRel(keep(out.variance as ArrayLike<number>), keep(ref.var), 1e-6 * sill)).toBeLessThan(1e-6);
  for (const v of Array.from(out.variance as ArrayLike<number>)) expect(v).toBeGreaterThanOrEqual(0);
}
const sillOf = (v: { nugget: number; psill: number }) => v.nugget + v.psill;

describe("ordinary kriging against gstat::krige — meuse log(zinc), planar", () => {
  const stations = createStationSet({ coordinates: "planar", points: meusePts });
  for (const k of m.kriging) {
    it(`${k.variogram.model}: global neighbourhood [gstat]`, () => {
      const model = createKrigingModel({ stations, values: m.points.value, variogram: k.variogram });
      expectGstat(model.predictMany(meuseTargets), k.global, sillOf(k.variogram));
    });
    it(`${k.variogram.model}: nmax = ${m.nmax} [gstat]`, () => {
      const model = createKrigingModel({ stations, values: m.points.value, variogram: k.variogram, maxNeighbors: m.nmax });
      expect(m.targets.nmaxTie.some(Boolean)).toBe(false); // no ambiguous neighbour sets in this fixture
      expectGstat(model.predictMany(meuseTargets), k.nmax, sillOf(k.variogram));
    });
    it(`${k.variogram.model}: at data points the prediction is the datum and the variance 0 (nugget is part of the process, as in gstat) [gstat]`, () => {
      const model = createKrigingModel({ stations, values: m.points.value, variogram: k.variogram });
      const out = model.predictMany(m.atData.x.map((x, i) => [x, m.atData.y[i]]));
      m.atData.index.forEach((idx, i) => {
        expect(out.value[i]).toBeCloseTo(m.points.value[idx], 10);
        expect(out.value[i]).toBeCloseTo(k.atData.pred[i], 10);
        expect(Math.abs((out.variance as Float64Array)[i] - k.atData.var[i])).toBeLessThan(1e-9);
        expect((out.variance as Float64Array)[i]).toBeGreaterThanOrEqual(0);
      });
    });
  }
});

describe("universal kriging (external drift) against gstat::krige", () => {
  it("meuse log(zinc) ~ sqrt(dist), global and nmax [gstat]", () => {
    const stations = createStationSet({ coordinates: "planar", points: meusePts });
    const drift = { points: m.points.sqrtDist.map((v) => [v]) };
    const targetDrift = m.targets.sqrtDist.map((v) => [v]);
    const global = createKrigingModel({ stations, values: m.points.value, variogram: m.universal.variogram, drift });
    expectGstat(global.predictMany(meuseTargets, { drift: targetDrift }), m.universal.global, sillOf(m.universal.variogram));
    const local = createKrigingModel({ stations, values: m.points.value, variogram: m.universal.variogram, drift, maxNeighbors: m.nmax });
    expectGstat(local.predictMany(meuseTargets, { drift: targetDrift }), m.universal.nmax, sillOf(m.universal.variogram));
  });
});

describe("kriging on the ellipsoid against gstat (long/lat network, synthetic demo data)", () => {
  const stations = createStationSet({ coordinates: "lonlat", points: llPts });
  it("ordinary kriging, global and nmax, incl. targets at the poles, across the antimeridian and at stations [gstat]", () => {
    const g = createKrigingModel({ stations, values: l.stations.valueOK, variogram: l.ordinary.variogram });
    expectGstat(g.predictMany(llTargets), l.ordinary.global, sillOf(l.ordinary.variogram));
    const n = createKrigingModel({ stations, values: l.stations.valueOK, variogram: l.ordinary.variogram, maxNeighbors: l.nmax });
    expectGstat(n.predictMany(llTargets), l.ordinary.nmax, sillOf(l.ordinary.variogram), l.targets.nmaxTie);
  });
  it("universal kriging with |lat|, lat² and elevation as drift, global and nmax [gstat]", () => {
    const g = createKrigingModel({ stations, values: l.stations.value, variogram: l.universal.variogram, drift: { points: llDrift } });
    expectGstat(g.predictMany(llTargets, { drift: llTargetDrift }), l.universal.global, sillOf(l.universal.variogram));
    const n = createKrigingModel({ stations, values: l.stations.value, variogram: l.universal.variogram, drift: { points: llDrift }, maxNeighbors: l.nmax });
    expectGstat(n.predictMany(llTargets, { drift: llTargetDrift }), l.universal.nmax, sillOf(l.universal.variogram), l.targets.nmaxTie);
  });
});

/** Dense solve by Gaussian elimination with partial pivoting (independent of the engine). */
function solve(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((r, i) => [...r, b[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(M[r][c]) > Math.abs(M[p][c])) p = r;
    [M[c], M[p]] = [M[p], M[c]];
    for (let r = c + 1; r < n; r++) {
      const f = M[r][c] / M[c][c];
      for (let k = c; k <= n; k++) M[r][k] -= f * M[c][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = M[r][n];
    for (let k = r + 1; k < n; k++) s -= M[r][k] * x[k];
    x[r] = s / M[r][r];
  }
  return x;
}

describe("properties", () => {
  const r = rng(11);
  const pts: number[][] = [];
  const vals: number[] = [];
  const cov: number[][] = [];
  for (let i = 0; i < 60; i++) {
    pts.push([1000 * r(), 1000 * r()]);
    vals.push(5 + Math.sin(pts[i][0] / 200) + 0.3 * r());
  }
  const vgm: VariogramModel = { model: "exponential", nugget: 0.05, psill: 1.2, range: 250 };
  for (let i = 0; i < 60; i++) cov.push(pts.map((p) => covariance(vgm, distance("planar", pts[i][0], pts[i][1], p[0], p[1]))));

  it("a far-away target tends to the generalised-least-squares mean, with variance C(0) + Var(GLS mean) [Cressie 1993 mem]", () => {
    const model = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm });
    const ones = vals.map(() => 1);
    const kInvZ = solve(cov, vals);
    const kInv1 = solve(cov, ones);
    const s1 = kInv1.reduce((a, b) => a + b, 0);
    const gls = kInvZ.reduce((a, b) => a + b, 0) / s1;
    const far = model.predict(1e9, 1e9);
    expect(far.value).toBeCloseTo(gls, 10);
    expect(far.variance).toBeCloseTo(vgm.nugget + vgm.psill + 1 / s1, 10);
    // and the approach is monotone-ish: 5 ranges away the prediction is already close
    expect(Math.abs(model.predict(500 + 5 * 250 * 10, 500).value - gls)).toBeLessThan(1e-6);
  });

  it("universal kriging far away tends to the GLS trend f0ᵀβ", () => {
    const drift = pts.map((p) => [p[0] / 1000]);
    const model = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm, drift: { points: drift } });
    const F = pts.map((p) => [1, p[0] / 1000]);
    const KinvF = [0, 1].map((c) => solve(cov, F.map((row) => row[c])));
    const KinvZ = solve(cov, vals);
    const FtKF = [0, 1].map((a) => [0, 1].map((b) => F.reduce((s, row, i) => s + row[a] * KinvF[b][i], 0)));
    const FtKz = [0, 1].map((a) => F.reduce((s, row, i) => s + row[a] * KinvZ[i], 0));
    const beta = solve(FtKF, FtKz);
    const f0 = 3.5;
    expect(model.predict(1e9, 1e9, [f0]).value).toBeCloseTo(beta[0] + beta[1] * f0, 9);
  });

  it("exact interpolation at the stations without nugget; variances are never negative", () => {
    const v0: VariogramModel = { model: "spherical", nugget: 0, psill: 1.2, range: 300 };
    const model = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: v0 });
    const out = model.predictMany(pts);
    for (let i = 0; i < pts.length; i++) {
      expect(out.value[i]).toBeCloseTo(vals[i], 9);
      expect((out.variance as Float64Array)[i]).toBeGreaterThanOrEqual(0);
      expect((out.variance as Float64Array)[i]).toBeLessThan(1e-9);
    }
    const many: number[][] = [];
    for (let i = 0; i < 2000; i++) {
      const s = pts[i % pts.length];
      const eps = [1e-9, 1e-6, 1e-3, 1, 50][i % 5];
      many.push([s[0] + eps * (r() - 0.5), s[1] + eps * (r() - 0.5)]);
    }
    for (const mm of [model, createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm, maxNeighbors: 12 })]) {
      const o = mm.predictMany(many);
      for (const v of o.variance as Float64Array) expect(v).toBeGreaterThanOrEqual(0);
    }
  });

  it("weights: ordinary kriging weights sum to 1; universal weights reproduce the drift; the prediction is Σλz", () => {
    const ok = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm, maxNeighbors: 16 });
    const p = ok.predict(420, 380);
    expect(p.neighbours).toHaveLength(16);
    expect(p.distanceUnit).toBe("coordinate");
    expect(p.neighbours.reduce((a, b) => a + b.weight, 0)).toBeCloseTo(1, 12);
    expect(p.neighbours.reduce((a, b) => a + b.weight * vals[b.index], 0)).toBeCloseTo(p.value, 10);
    for (let i = 1; i < 16; i++) expect(p.neighbours[i].distance).toBeGreaterThanOrEqual(p.neighbours[i - 1].distance);
    const drift = pts.map((q) => [q[0] / 1000, q[1] / 1000]);
    const uk = createKrigingModel({ coordinates: "planar", points: pts, values: vals, variogram: vgm, drift: { points: drift } });
    const pu = uk.predict(420, 380, [0.42, 0.38]);
    expect(pu.neighbours.reduce((a, b) => a + b.weight, 0)).toBeCloseTo(1, 10);
    expect(pu.neighbours.reduce((a, b) => a + b.weight * drift[b.index][0], 0)).toBeCloseTo(0.42, 10);
    expect(pu.neighbours.reduce((a, b) => a + b.weight * drift[b.index][1], 0)).toBeCloseTo(0.38, 10);
    expect(pu.neighbours.reduce((a, b) => a + b.weight * vals[b.index], 0)).toBeCloseTo(pu.value, 9);
  });

  it("predict, predictMany and a shared neighbour table give identical results", () => {
    const stations = createStationSet({ coordinates: "planar", points: pts });
    const a = createKrigingModel({ stations, values: vals, variogram: vgm, maxNeighbors: 10 });
    const b = createKrigingModel({ stations, values: vals.map((v) => 2 * v), variogram: { ...vgm, model: "spherical" }, maxNeighbors: 6 });
    const c = createKrigingModel({ stations, values: vals, variogram: vgm });
    const targets: number[][] = [];
    for (let i = 0; i < 300; i++) targets.push([1000 * r(), 1000 * r()]);
    const [sa, sb, sc] = predictSurfaces([a, b, c], targets);
    const xy = Float64Array.from(targets.flat());
    const table = stations.neighbourTable(xy, 10);
    const ta = a.predictMany(targets, { neighbours: table });
    const tb = b.predictMany(targets, { neighbours: table });
    const ia = a.predictMany(targets);
    const ib = b.predictMany(targets);
    const ic = c.predictMany(targets);
    for (let i = 0; i < targets.length; i++) {
      expect(sa.value[i]).toBe(ia.value[i]);
      expect(ta.value[i]).toBe(ia.value[i]);
      expect(sb.value[i]).toBe(ib.value[i]);
      expect(tb.variance?.[i]).toBe(ib.variance?.[i]);
      expect(sc.value[i]).toBeCloseTo(ic.value[i], 12);
      expect(sc.variance?.[i]).toBeCloseTo(ic.variance?.[i] as number, 12);
      const one = a.predict(targets[i][0], targets[i][1]);
      expect(one.value).toBeCloseTo(ia.value[i], 12);
      expect(one.variance).toBeCloseTo((ia.variance as Float64Array)[i], 12);
    }
    const f32 = a.predictMany(targets, { precision: "float32" });
    expect(f32.value).toBeInstanceOf(Float32Array);
    expect(maxRel(f32.value, ia.value)).toBeLessThan(1e-6);
  });
});

describe("clear errors instead of NaN", () => {
  const vgm: VariogramModel = { model: "exponential", nugget: 0.1, psill: 1, range: 10 };
  it("duplicate locations", () => {
    expect(() => createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0], [0, 0]], values: [1, 2, 3], variogram: vgm })).toThrow(
      expect.objectContaining({ code: "duplicate-locations", field: "points", message: expect.stringMatching(/stations 0 and 2/) }),
    );
    expect(() => createKrigingModel({ coordinates: "lonlat", points: [[-180, 10], [180, 10], [5, 5]], values: [1, 2, 3], variogram: vgm })).toThrow(/same location/);
  });
  it("collinear drift covariates", () => {
    const pts = [[0, 0], [1, 0], [0, 1], [1, 1], [2, 3]];
    const model = createKrigingModel({ coordinates: "planar", points: pts, values: [1, 2, 3, 4, 5], variogram: vgm, drift: { points: pts.map((p) => [p[0], 2 * p[0]]) } });
    expect(() => model.predict(0.5, 0.5, [0.5, 1])).toThrow(expect.objectContaining({ code: "singular-drift", field: "drift.points" }));
  });
  it("too few points for the drift, or a neighbourhood smaller than the drift", () => {
    expect(() => createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0]], values: [1, 2], variogram: vgm, drift: { points: [[1, 2], [3, 4]] } })).toThrow(
      expect.objectContaining({ code: "too-few-points" }),
    );
    expect(() =>
      createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0], [2, 0], [3, 1]], values: [1, 2, 3, 4], variogram: vgm, drift: { points: [[1], [2], [3], [5]] }, maxNeighbors: 1 }),
    ).toThrow(expect.objectContaining({ field: "maxNeighbors" }));
  });
  it("missing or malformed drift at targets, bad values, bad variogram", () => {
    const model = createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0], [2, 0], [3, 1]], values: [1, 2, 3, 4], variogram: vgm, drift: { points: [[1], [2], [3], [5]] } });
    expect(() => model.predictMany([[1, 1]])).toThrow(expect.objectContaining({ field: "drift.targets" }));
    expect(() => model.predictMany([[1, 1]], { drift: [[1, 2]] })).toThrow(/covariates/);
    expect(() => createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0]], values: [1, NaN], variogram: vgm })).toThrow(expect.objectContaining({ field: "values" }));
    expect(() => createKrigingModel({ coordinates: "planar", points: [[0, 0], [1, 0]], values: [1, 2], variogram: { ...vgm, range: -1 } })).toThrow(
      expect.objectContaining({ field: "variogram.range" }),
    );
    expect(() => createKrigingModel({ coordinates: "lonlat", points: [[0, 95], [1, 0]], values: [1, 2], variogram: vgm })).toThrow(/latitude/);
  });
  it("a numerically singular covariance matrix (gaussian model, no nugget, close stations) is an error, not NaN", () => {
    const pts: number[][] = [];
    for (let i = 0; i < 30; i++) pts.push([i * 0.01, 0]);
    const model = createKrigingModel({ coordinates: "planar", points: pts, values: pts.map((_, i) => i), variogram: { model: "gaussian", nugget: 0, psill: 1, range: 100 } });
    expect(() => model.predict(0.05, 0.1)).toThrow(expect.objectContaining({ code: "ill-conditioned" }));
  });
});

describe("storing and restoring models", () => {
  const stations = createStationSet({ coordinates: "lonlat", points: llPts });
  const model = createKrigingModel({ stations, values: l.stations.value, variogram: l.universal.variogram, drift: { points: llDrift }, maxNeighbors: 12 });
  const same = (a: KrigingModel, b: KrigingModel) => {
    const pa = a.predictMany(llTargets, { drift: llTargetDrift });
    const pb = b.predictMany(llTargets, { drift: llTargetDrift });
    expect(Array.from(pb.value)).toEqual(Array.from(pa.value));
    expect(Array.from(pb.variance as Float64Array)).toEqual(Array.from(pa.variance as Float64Array));
  };
  it("round-trips through plain JSON text bit for bit", () => {
    const text = JSON.stringify(krigingModelToJSON(model));
    same(model, restoreKrigingModel(JSON.parse(text)));
  });
  it("round-trips as header + typed arrays, onto a shared StationSet", () => {
    const s = serializeKrigingModel(model);
    expect(s.arrays.points).toBeInstanceOf(Float64Array);
    const back = restoreKrigingModel(s, { stations });
    expect(back.stations).toBe(stations);
    same(model, back);
  });
  it("refuses a foreign StationSet and unknown formats", () => {
    const other = createStationSet({ coordinates: "lonlat", points: [[0, 0], [1, 1]] });
    expect(() => restoreKrigingModel(serializeKrigingModel(model), { stations: other })).toThrow(/StationSet/);
    expect(() => restoreKrigingModel({ header: { format: "x" } } as never)).toThrow(/rainprint.kriging-model/);
  });
});
