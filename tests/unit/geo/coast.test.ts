// distanceToCoastKm against a brute-force reference: @turf/turf's nearestPointOnLine
// (great-circle nearest point on every segment, 6371.0088 km sphere) over all coastlines.
// No timed assertions; `npm run bench:geo` prints timings.
import * as turf from "@turf/turf";
import { describe, expect, it } from "vitest";
import { coastlines, coastlinesGeoJSON, distanceToCoastKm, greatCircleKm, isOnLand } from "@/lib/geo";
import { mulberry32 } from "@/lib/demo/prng";
import { randomPoints } from "./reference";

function bruteForceKm(lon: number, lat: number): number {
  const lines = coastlinesGeoJSON();
  const p = turf.nearestPointOnLine(lines, turf.point([lon, lat]), { units: "kilometers" });
  return p.properties.pointDistance;
}

describe("distanceToCoastKm", () => {
  it("matches turf's brute-force nearest point on 30 random points (land and sea)", () => {
    const pts = randomPoints(mulberry32(99), 30);
    for (const [lon, lat] of pts) {
      const want = bruteForceKm(lon, lat);
      const got = distanceToCoastKm(lon, lat);
      expect(Math.abs(got - want), `${lon},${lat}: ${got} vs ${want}`).toBeLessThan(1e-6 * want + 0.01);
    }
  });

  it("matches turf near the antimeridian and the poles", () => {
    const pts: [number, number][] = [
      [179.99, -17.5],
      [-179.99, -17.5],
      [-179.5, 66],
      [179.5, 66],
      [180, -80],
      [0, -89.9],
      [0, 89.9],
      [-170, 75],
    ];
    for (const [lon, lat] of pts) {
      const want = bruteForceKm(lon, lat);
      expect(Math.abs(distanceToCoastKm(lon, lat) - want), `${lon},${lat}`).toBeLessThan(1e-6 * want + 0.01);
    }
  });

  it("is zero on a coastline vertex and small next to it", () => {
    const line = coastlines()[0];
    const [lon, lat] = line[Math.floor(line.length / 2)];
    expect(distanceToCoastKm(lon, lat)).toBeLessThan(1e-6);
    // 0.05° north of a vertex is at most 0.05° of arc (≈ 5.56 km) from it.
    expect(distanceToCoastKm(lon, lat + 0.05)).toBeLessThanOrEqual(greatCircleKm(lon, lat, lon, lat + 0.05) + 1e-9);
  });

  it("gives the distance across the antimeridian, not around the world", () => {
    // A point just east of 180° in the Fiji group: its nearest coast is a few km away,
    // whether that coast is drawn at +179.9° or −179.9°.
    expect(distanceToCoastKm(-179.99, -16.8)).toBeLessThan(60);
    expect(distanceToCoastKm(179.99, -16.8)).toBeLessThan(60);
  });

  it("is near published far-from-coast distances (loose: the published values used other coastlines)", () => {
    // Eurasian pole of inaccessibility 46.28°N 86.67°E, ≈2510 km from the ocean —
    // Garcia-Castellanos & Lombardo (2007), Scottish Geographical Journal 123:227 [mem].
    const eurasia = distanceToCoastKm(86.67, 46.28);
    expect(isOnLand(86.67, 46.28)).toBe(true);
    expect(Math.abs(eurasia - 2510) / 2510).toBeLessThan(0.1);
    // Oceanic pole of inaccessibility ("Point Nemo") 48.88°S 123.39°W, ≈2688 km from land [mem].
    const nemo = distanceToCoastKm(-123.39, -48.88);
    expect(Math.abs(nemo - 2688) / 2688).toBeLessThan(0.03);
  });

  it("refuses impossible coordinates", () => {
    expect(() => distanceToCoastKm(0, -95)).toThrow(/Latitude/);
  });
});

describe("greatCircleKm", () => {
  it("one degree of a meridian ≈ 111.195 km on the 6371.0088 km sphere [trade: 2πR/360]", () => {
    expect(greatCircleKm(0, 0, 0, 1)).toBeCloseTo((2 * Math.PI * 6371.0088) / 360, 6);
  });
  it("agrees with turf.distance", () => {
    expect(greatCircleKm(2.35, 48.85, -74, 40.7)).toBeCloseTo(turf.distance([2.35, 48.85], [-74, 40.7]), 6);
  });
});
