import { describe, expect, it } from "vitest";
import { createStationSet, greatCircleKm, normalizeLon, planarDistance } from "@/lib/geostats";
import { greatCircleKmTrig, greatCircleKmUnit } from "@/lib/geostats/distance";
import { lonlat, relClose, rng } from "./fixtures";

const DEG = Math.PI / 180;
const trig = (lon1: number, lat1: number, lon2: number, lat2: number) =>
  greatCircleKmTrig(Math.sin(lat1 * DEG), Math.cos(lat1 * DEG), Math.sin(lon1 * DEG), Math.cos(lon1 * DEG), Math.sin(lat2 * DEG), Math.cos(lat2 * DEG), Math.sin(lon2 * DEG), Math.cos(lon2 * DEG));
const unit = (lon1: number, lat1: number, lon2: number, lat2: number) => {
  const [s1, c1, sl1, cl1] = [Math.sin(lat1 * DEG), Math.cos(lat1 * DEG), Math.sin(lon1 * DEG), Math.cos(lon1 * DEG)];
  const [s2, c2, sl2, cl2] = [Math.sin(lat2 * DEG), Math.cos(lat2 * DEG), Math.sin(lon2 * DEG), Math.cos(lon2 * DEG)];
  return greatCircleKmUnit(s1, c1, sl1, cl1, c1 * cl1, c1 * sl1, s1, s2, c2, sl2, cl2, c2 * cl2, c2 * sl2, s2);
};

describe("great-circle distance (Andoyer–Lambert on WGS84)", () => {
  const fx = lonlat();
  const p = fx.distancePairs;

  it("matches R sp::spDists(longlat = TRUE) for the fixture pairs, incl. poles, antimeridian and metre-scale pairs [gstat/sp reference]", () => {
    for (let i = 0; i < p.km.length; i++) {
      const d = greatCircleKm(normalizeLon(p.lon1[i]), p.lat1[i], normalizeLon(p.lon2[i]), p.lat2[i]);
      // relative 1e-9, or 1 mm absolute for (near-)coincident pairs
      expect(Math.abs(d - p.km[i]), `pair ${i}`).toBeLessThanOrEqual(Math.max(1e-9 * p.km[i], 1e-6));
      const t = trig(p.lon1[i], p.lat1[i], p.lon2[i], p.lat2[i]);
      expect(Math.abs(t - p.km[i]), `pair ${i} (trig form)`).toBeLessThanOrEqual(Math.max(1e-9 * p.km[i], 1e-6));
      const u = unit(p.lon1[i], p.lat1[i], p.lon2[i], p.lat2[i]);
      expect(Math.abs(u - p.km[i]), `pair ${i} (unit-vector form)`).toBeLessThanOrEqual(Math.max(1e-9 * p.km[i], 1e-6));
    }
  });

  it("the station distance matrix matches spDists rows for sampled stations [sp reference]", () => {
    const set = createStationSet({ coordinates: "lonlat", points: fx.stations.lon.map((x, i) => [x, fx.stations.lat[i]]) });
    const n = set.count;
    const d = set.distanceMatrix();
    fx.stationDistanceSample.i.forEach((i, r) => {
      for (let j = 0; j < n; j++) {
        const ref = fx.stationDistanceSample.km[r][j];
        if (ref === null) continue; // the diagonal is stored as Inf → null
        expect(relClose(d[i * n + j], ref, 1e-9), `station ${i} → ${j}`).toBe(true);
      }
    });
  });

  it("the precomputed-trigonometry and unit-vector forms agree with the direct formula to rounding, from millimetres to antipodes", () => {
    const r = rng(7);
    for (let k = 0; k < 5000; k++) {
      const lon1 = 360 * r() - 180;
      const lat1 = 180 * r() - 90;
      const scale = [1e-8, 1e-5, 1e-2, 1, 90][k % 5];
      const lon2 = normalizeLon(lon1 + scale * (2 * r() - 1) * 2);
      const lat2 = Math.max(-90, Math.min(90, lat1 + scale * (2 * r() - 1)));
      const a = greatCircleKm(lon1, lat1, lon2, lat2);
      const b = trig(lon1, lat1, lon2, lat2);
      expect(Math.abs(a - b)).toBeLessThanOrEqual(1e-9 * a + 1e-9);
      const c = unit(lon1, lat1, lon2, lat2);
      expect(Math.abs(a - c)).toBeLessThanOrEqual(1e-9 * a + 1e-9);
    }
  });

  it("is zero for identical points and for the two spellings of the antimeridian, and symmetric", () => {
    expect(greatCircleKm(12.5, 47.1, 12.5, 47.1)).toBe(0);
    expect(greatCircleKm(normalizeLon(-180), 10, normalizeLon(180), 10)).toBe(0);
    expect(normalizeLon(-180)).toBe(180);
    expect(normalizeLon(190)).toBe(-170);
    expect(greatCircleKm(10, 50, 11, 51)).toBe(greatCircleKm(11, 51, 10, 50));
    // one degree of longitude on the equator: a·π/180 = 111.319 km on the WGS84 equator [trade]
    expect(greatCircleKm(0, 0, 1, 0)).toBeCloseTo(111.3195, 3);
  });

  it("planar distance is Euclidean", () => {
    expect(planarDistance(0, 0, 3, 4)).toBe(5);
  });
});
