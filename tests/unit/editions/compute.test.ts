import { describe, expect, it } from "vitest";
import { createStationSet, greatCircleKm } from "@/lib/geostats";
import { extrapolationPlane, makeGrid, planeStatsOf } from "@/lib/editions/build/compute";
import { fitTrend, trendVariance } from "@/lib/editions/build/trend";
import { mulberry32 } from "@/lib/isotopes";

describe("fitTrend (ordinary least squares on [1, |lat|, lat², elevation])", () => {
  const rnd = mulberry32(11);
  const n = 60;
  const lat = Array.from({ length: n }, () => 140 * rnd() - 70);
  const elev = Array.from({ length: n }, () => 3000 * rnd());
  // coefficients of the Bowen & Wilkinson (2002) form as used by the synthetic demo model [mem]
  const b = [-5.247, 0.1805, -0.0051, -0.0028];
  const exact = lat.map((l, i) => b[0] + b[1] * Math.abs(l) + b[2] * l * l + b[3] * elev[i]);

  it("recovers the coefficients of noiseless data", () => {
    const f = fitTrend(lat, elev, exact);
    f.coefficients.forEach((c, k) => expect(c).toBeCloseTo(b[k], 9));
    expect(f.record.rSquared).toBeCloseTo(1, 12);
  });

  it("meets the least-squares identities: Xᵀe = 0 and Cov·(XᵀX) = s²·I [trade]", () => {
    const y = exact.map((v) => v + (rnd() - 0.5));
    const f = fitTrend(lat, elev, y);
    const X = lat.map((l, i) => [1, Math.abs(l), l * l, elev[i]]);
    for (let a = 0; a < 4; a++) {
      const dot = X.reduce((s, row, i) => s + row[a] * f.residuals[i], 0);
      const scale = X.reduce((s, row) => s + Math.abs(row[a]), 0);
      expect(Math.abs(dot) / scale).toBeLessThan(1e-10);
    }
    const s2 = f.record.residualSE ** 2;
    expect(f.record.df).toBe(n - 4);
    expect(s2).toBeCloseTo(f.residuals.reduce((s, e) => s + e * e, 0) / (n - 4), 12);
    for (let a = 0; a < 4; a++)
      for (let c = 0; c < 4; c++) {
        let v = 0;
        for (let k = 0; k < 4; k++) v += f.record.covariance[a * 4 + k] * X.reduce((s, row) => s + row[k] * row[c], 0);
        expect(v / s2).toBeCloseTo(a === c ? 1 : 0, 6);
      }
    // the trend variance at a station is xᵀCov x ≥ 0
    expect(trendVariance(f.record.covariance, 45, 500)).toBeGreaterThan(0);
  });

  it("fixes the elevation term at 0 when every station is at one elevation, and refuses too few stations", () => {
    const f = fitTrend(lat, lat.map(() => 0), exact);
    expect(f.record.terms[3]).toEqual({ name: "elevation", estimate: 0, standardError: 0 });
    expect(f.record.formula).toMatch(/fixed at 0/);
    expect(() => fitTrend([1, 2, 3], [0, 1, 2], [1, 2, 3])).toThrow(/at least 5/);
  });
});

describe("extrapolationPlane", () => {
  it("equals a brute-force nearest-station search at every cell (2° global land grid, across ±180°)", () => {
    const ctx = makeGrid({ resolutionDeg: 2, extent: { west: -180, south: -90, east: 180, north: 90 }, landOnly: true });
    const rnd = mulberry32(5);
    const pts = Array.from({ length: 40 }, () => [360 * rnd() - 180, 160 * rnd() - 80]);
    pts.push([179.5, 65], [-179.5, -17], [10, 89.5]);
    const set = createStationSet({ coordinates: "lonlat", points: pts });
    for (const km of [300, 1000, 2500]) {
      const plane = extrapolationPlane(ctx, set, km);
      let flagged = 0;
      for (let row = 0; row < ctx.grid.ny; row++)
        for (let col = 0; col < ctx.grid.nx; col++) {
          const c = row * ctx.grid.nx + col;
          const lon = ctx.grid.lon0 + col * ctx.grid.dLon;
          const lat = ctx.rowLat[row];
          const nearest = Math.min(...pts.map(([x, y]) => greatCircleKm(x, y, lon, lat)));
          expect(plane[c], `cell ${row},${col} at ${km} km`).toBe(ctx.mask[c] && nearest > km ? 1 : 0);
          flagged += plane[c];
        }
      expect(flagged).toBeGreaterThan(0);
    }
  });
});

describe("planeStatsOf", () => {
  it("gives min, max, mean over the cells with values and the 2nd/98th percentiles", () => {
    const v = new Float32Array(1000).fill(NaN);
    for (let i = 0; i < 101; i++) v[i * 9] = i; // 0 … 100
    const s = planeStatsOf(v);
    expect(s).toMatchObject({ cells: 101, min: 0, max: 100, mean: 50, p02: 2, p98: 98 });
  });
});
