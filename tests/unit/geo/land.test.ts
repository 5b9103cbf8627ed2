// lib/geo land outlines, point-in-land and land masks.
// Timing note: no test here asserts a duration (the machine is shared and noisy);
// `npm run bench:geo` prints medians for landMask on the global 0.25° grid, isOnLand
// and distanceToCoastKm.
import * as turf from "@turf/turf";
import { describe, expect, it } from "vitest";
import {
  coastlines,
  coastlinesGeoJSON,
  globalGrid,
  isOnLand,
  landGeoJSON,
  landMask,
  splitRing,
  type LandDetail,
  type LonLatGrid,
} from "@/lib/geo";
import { distanceToCoastKm } from "@/lib/geo";
import { mulberry32 } from "@/lib/demo/prng";
import { buildReference, randomPoints } from "./reference";

describe("antimeridian-safe outlines", () => {
  for (const detail of ["50m", "110m"] as LandDetail[]) {
    it(`land ${detail}: every ring closed, inside [-180, 180], no edge spanning half the map`, () => {
      const polys = landGeoJSON({ detail }).features[0].geometry.coordinates;
      expect(polys.length).toBeGreaterThan(100);
      let edges = 0;
      const problems: string[] = [];
      for (const poly of polys) {
        for (const ring of poly) {
          if (ring.length < 4) problems.push(`short ring ${JSON.stringify(ring)}`);
          const [a, b] = [ring[0], ring[ring.length - 1]];
          if (a[0] !== b[0] || a[1] !== b[1]) problems.push(`open ring at ${a}`);
          for (let i = 0; i < ring.length; i++) {
            if (Math.abs(ring[i][0]) > 180 || Math.abs(ring[i][1]) > 90) problems.push(`outside the globe: ${ring[i]}`);
            if (i > 0) {
              edges++;
              if (Math.abs(ring[i][0] - ring[i - 1][0]) > 90) problems.push(`long edge ${ring[i - 1]} → ${ring[i]}`);
            }
          }
        }
      }
      expect(problems).toEqual([]);
      expect(edges).toBeGreaterThan(detail === "50m" ? 50_000 : 4_000);
    });

    it(`coastlines ${detail}: no edge longer than 180° of longitude and none along the ±180 cut`, () => {
      const lines = coastlines({ detail });
      const problems: string[] = [];
      for (const line of lines) {
        for (let i = 1; i < line.length; i++) {
          if (Math.abs(line[i][0] - line[i - 1][0]) >= 180) problems.push(`long edge ${line[i - 1]} → ${line[i]}`);
          if (Math.abs(line[i][0]) === 180 && Math.abs(line[i - 1][0]) === 180) problems.push(`edge along the cut at ${line[i]}`);
        }
      }
      expect(problems).toEqual([]);
      expect(lines.length).toBeGreaterThan(100);
      expect(coastlinesGeoJSON({ detail }).geometry.coordinates.length).toBe(lines.length);
    });
  }

  it("splits a ring crossing ±180 into one piece on each side (synthetic Fiji-like island)", () => {
    const ring = [
      [179, -17],
      [-179, -17],
      [-179, -16],
      [179, -16],
      [179, -17],
    ];
    const pieces = splitRing(ring).map((p) => p.ring);
    expect(pieces).toHaveLength(2);
    const east = pieces.find((r) => r.every((q) => q[0] >= 179))!;
    const west = pieces.find((r) => r.every((q) => q[0] <= -179))!;
    expect(turf.area(turf.polygon([east]))).toBeCloseTo(turf.area(turf.polygon([west])), -3);
    expect(east.some((q) => q[0] === 180)).toBe(true);
    expect(west.some((q) => q[0] === -180)).toBe(true);
  });

  it("closes a ring that runs around a pole through that pole", () => {
    // A ring at 70°S running once around the globe.
    const ring: number[][] = [];
    for (let lon = -170; lon <= 170; lon += 20) ring.push([lon, -70]);
    ring.push(ring[0]);
    const pieces = splitRing(ring);
    expect(pieces.length).toBeGreaterThanOrEqual(1);
    const all = pieces.flatMap((p) => p.ring);
    expect(all.some((q) => q[1] === -90)).toBe(true);
    expect(all.every((q) => Math.abs(q[0]) <= 180)).toBe(true);
  });
});

describe("isOnLand at named places (coordinates [mem], checked to be ≥ 5 km from the 1:50m coast)", () => {
  const land: [string, number, number][] = [
    ["Viti Levu interior, Fiji (west of 180°)", 177.95, -17.75],
    ["Vanua Levu, Fiji", 179.0, -16.55],
    ["Chukotka east of 180° (-174.5°)", -174.5, 66.0],
    ["Chukotka near the Anadyr basin (west of 180°)", 175.0, 65.5],
    ["Wrangel Island (east of 180°)", -179.4, 71.3],
    ["Antarctica at 0°E", 0, -80],
    ["Antarctica on the antimeridian", 180, -87],
    ["Antarctica just west of the antimeridian", -179.5, -85.5],
    ["near the South Pole", 45, -89.99],
    ["Paris", 2.35, 48.85],
    ["central Australia", 134, -25],
    ["Amazon basin", -60, -5],
  ];
  const sea: [string, number, number][] = [
    ["Ross Ice Shelf front area (ice shelves are not land in Natural Earth)", -179.9, -80],
    ["Bering Sea", -178, 60],
    ["South Pacific next to Fiji's meridian", 179.5, -25],
    ["North Pole (Arctic Ocean)", 0, 89.9],
    ["Gulf of Guinea (0, 0)", 0, 0],
    ["Caspian Sea (a hole in the land outline)", 51, 42],
  ];
  for (const [name, lon, lat] of land) it(`land: ${name}`, () => expect(isOnLand(lon, lat)).toBe(true));
  for (const [name, lon, lat] of sea) it(`not land: ${name}`, () => expect(isOnLand(lon, lat)).toBe(false));

  it("wraps longitudes and refuses impossible latitudes with a clear message", () => {
    expect(isOnLand(2.35 + 360, 48.85)).toBe(true);
    expect(isOnLand(-174.5 - 720, 66)).toBe(true);
    expect(() => isOnLand(0, 91)).toThrow(/Latitude must be between -90 and 90/);
    expect(() => isOnLand(Number.NaN, 0)).toThrow(/finite/);
  });
});

describe("isOnLand against brute-force @turf/turf", () => {
  const reference = buildReference("50m");
  const rand = mulberry32(20240601);
  const check = (points: [number, number][], minCoastKm: number) => {
    let compared = 0;
    let land = 0;
    const mismatches: string[] = [];
    for (const [lon, lat] of points) {
      if (distanceToCoastKm(lon, lat) < minCoastKm) continue;
      compared++;
      const want = reference(lon, lat);
      if (want) land++;
      if (isOnLand(lon, lat) !== want) mismatches.push(`${lon.toFixed(4)},${lat.toFixed(4)} want ${want}`);
    }
    return { compared, land, mismatches };
  };

  it("agrees on 3000 random points on the globe", () => {
    const r = check(randomPoints(rand, 3000), 3);
    expect(r.mismatches).toEqual([]);
    expect(r.compared).toBeGreaterThan(2900);
    // About 29% of the Earth's surface is land [trade]; Natural Earth land incl. Antarctica.
    expect(r.land / r.compared).toBeGreaterThan(0.25);
    expect(r.land / r.compared).toBeLessThan(0.33);
  });

  it("agrees on 1500 random points within 4° of the antimeridian (Fiji, Chukotka, Wrangel, Antarctica)", () => {
    const west = randomPoints(rand, 750, { lonMin: 176, lonMax: 180, latMin: -90, latMax: 80 });
    const east = randomPoints(rand, 750, { lonMin: -180, lonMax: -176, latMin: -90, latMax: 80 });
    const r = check([...west, ...east], 3);
    expect(r.mismatches).toEqual([]);
    expect(r.land).toBeGreaterThan(20);
  });

  it("agrees on 800 random points in Fiji's and Chukotka's boxes", () => {
    const fiji = randomPoints(rand, 400, { lonMin: 176.5, lonMax: 181.5, latMin: -19.5, latMax: -15.5 }).map(
      ([x, y]): [number, number] => [x > 180 ? x - 360 : x, y],
    );
    const chukotka = randomPoints(rand, 400, { lonMin: 170, lonMax: 194, latMin: 62, latMax: 72 }).map(
      ([x, y]): [number, number] => [x > 180 ? x - 360 : x, y],
    );
    const r = check([...fiji, ...chukotka], 1);
    expect(r.mismatches).toEqual([]);
    expect(r.land).toBeGreaterThan(150);
  });

  it("agrees on 800 random points south of 60°S (Antarctica around the pole)", () => {
    const r = check(randomPoints(rand, 800, { lonMin: -180, lonMax: 180, latMin: -90, latMax: -60 }), 3);
    expect(r.mismatches).toEqual([]);
    expect(r.land).toBeGreaterThan(250);
  });

  it("agrees with turf run on lib/geo's own GeoJSON for every point (index vs brute force)", () => {
    const polys = landGeoJSON().features[0].geometry.coordinates.map((p) => {
      const b = turf.bbox(turf.polygon(p));
      return { f: turf.polygon(p), b };
    });
    const pts = randomPoints(rand, 2000);
    const mismatches: string[] = [];
    for (const [lon, lat] of pts) {
      const want = polys.some(
        ({ f, b }) => lon >= b[0] && lon <= b[2] && lat >= b[1] && lat <= b[3] && turf.booleanPointInPolygon([lon, lat], f),
      );
      if (want !== isOnLand(lon, lat)) mismatches.push(`${lon},${lat}`);
    }
    expect(mismatches).toEqual([]);
  });
});

describe("landMask", () => {
  const sameAsIsOnLand = (grid: LonLatGrid, mask: Uint8Array, rows: number[]) => {
    const mismatches: string[] = [];
    let n = 0;
    for (const r of rows) {
      for (let c = 0; c < grid.nx; c++) {
        const lon = grid.lon0 + c * grid.dLon;
        const lat = grid.lat0 - r * grid.dLat;
        if (mask[r * grid.nx + c] !== (isOnLand(lon, lat) ? 1 : 0)) mismatches.push(`row ${r} col ${c} (${lon}, ${lat})`);
        n++;
      }
    }
    expect(mismatches).toEqual([]);
    return n;
  };

  it("is north-up: row 0 is the northernmost row, index = row * nx + col", () => {
    // Row 0 at 50°N 10°E (Germany, land), row 1 at 50°S 10°E (Southern Ocean).
    const m = landMask({ lon0: 10, lat0: 50, dLon: 1, dLat: 100, nx: 1, ny: 2 });
    expect(Array.from(m)).toEqual([1, 0]);
    // Two columns: 10°E (Germany) and 40°W (Atlantic) at 50°N.
    const m2 = landMask({ lon0: -40, lat0: 50, dLon: 50, dLat: 1, nx: 2, ny: 1 });
    expect(Array.from(m2)).toEqual([0, 1]);
  });

  it("global 1° grid equals isOnLand at every cell centre", () => {
    const g = globalGrid(1);
    expect(g).toEqual({ lon0: -179.5, lat0: 89.5, dLon: 1, dLat: 1, nx: 360, ny: 180 });
    const m = landMask(g);
    const n = sameAsIsOnLand(g, m, Array.from({ length: g.ny }, (_, r) => r));
    expect(n).toBe(360 * 180);
  });

  it("global 0.25° grid (1440 × 720) equals isOnLand on 40 random rows and has a plausible land share", () => {
    const g = globalGrid(0.25);
    expect([g.nx, g.ny]).toEqual([1440, 720]);
    const m = landMask(g);
    expect(m.length).toBe(1440 * 720);
    const rand = mulberry32(7);
    const rows = Array.from({ length: 40 }, () => Math.floor(rand() * g.ny));
    sameAsIsOnLand(g, m, rows);
    // Area-weighted land share ≈ 0.29 of the globe [trade].
    let land = 0;
    let total = 0;
    for (let r = 0; r < g.ny; r++) {
      const w = Math.cos(((g.lat0 - r * g.dLat) * Math.PI) / 180);
      for (let c = 0; c < g.nx; c++) {
        total += w;
        if (m[r * g.nx + c]) land += w;
      }
    }
    expect(land / total).toBeGreaterThan(0.27);
    expect(land / total).toBeLessThan(0.31);
  });

  it("handles a grid that runs across the antimeridian (longitudes wrapped)", () => {
    const g: LonLatGrid = { lon0: 170.05, lat0: 72, dLon: 0.1, dLat: 0.1, nx: 240, ny: 120 };
    const m = landMask(g);
    sameAsIsOnLand(g, m, Array.from({ length: g.ny }, (_, r) => r));
    expect(m.reduce((s, v) => s + v, 0)).toBeGreaterThan(1000);
  });

  it("the coarse 110m outline gives the same answer as isOnLand with the same detail", () => {
    const g = globalGrid(2);
    const m = landMask(g, { detail: "110m" });
    let mismatches = 0;
    let land = 0;
    for (let r = 0; r < g.ny; r++)
      for (let c = 0; c < g.nx; c++) {
        const want = isOnLand(g.lon0 + c * g.dLon, g.lat0 - r * g.dLat, { detail: "110m" }) ? 1 : 0;
        if (m[r * g.nx + c] !== want) mismatches++;
        land += want;
      }
    expect(mismatches).toBe(0);
    expect(land).toBeGreaterThan(1000);
  });

  it("refuses a malformed grid with a clear message", () => {
    expect(() => landMask({ lon0: 0, lat0: 0, dLon: -1, dLat: 1, nx: 2, ny: 2 })).toThrow(/positive dLon and dLat/);
    expect(() => landMask({ lon0: 0, lat0: 0, dLon: 1, dLat: 1, nx: 1.5, ny: 2 })).toThrow(/integer nx and ny/);
    expect(() => landMask({ lon0: 0, lat0: 0, dLon: 1, dLat: 1, nx: 100_000, ny: 100_000 })).toThrow(/larger than the limit/);
    expect(() => globalGrid(0.7)).toThrow(/divide 180/);
  });
});
