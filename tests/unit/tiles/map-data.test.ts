// The map's data routes (app/api/map/legend, stations, readout, land) against an edition written
// into this file's temporary database: legend ranges from the surface statistics, stations with
// their frozen means as GeoJSON, and the click readout = the stored cell ± 1.96·√variance
// (two-sided 95% normal interval [trade]).
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editionStationMeans, editions, stations, surfaces } from "@/db/schema";
import type { PlaneStats, SurfaceStats } from "@/lib/editions/types";
import { writeSurfacePlanes } from "@/lib/surfaces/store";
import { rampStops } from "@/lib/tiles/ramps";
import { freshDb } from "../helpers/db";

const COLLECTOR = "wet-only" as const;
const grid = { lon0: -9.5, lat0: 9.5, dLon: 1, dLat: 1, nx: 20, ny: 20, chunk: 128 };
const n = grid.nx * grid.ny;
const range = (p02: number, p98: number): PlaneStats => ({ cells: n, min: p02, max: p98, mean: (p02 + p98) / 2, p02, p98 });
const stats = (units: "‰" | "mm", value: PlaneStats, sd: PlaneStats, note?: string): SurfaceStats => ({
  method: "regression-kriging", units, value, variance: sd, sd, stations: { used: 3, excludedCoverage: 0 }, seaLevelEquivalent: true,
  extrapolation: { distanceKm: 800, cells: 20, fraction: 0.05 }, ...(note ? { note } : {}),
});

async function addSurface(variable: "d18O" | "d2H" | "dExcess" | "precipMm", period: number, f: (r: number, c: number) => [number, number, number], s: SurfaceStats) {
  const value = new Float32Array(n), variance = new Float32Array(n), extrapolation = new Uint8Array(n);
  for (let r = 0; r < grid.ny; r++) for (let c = 0; c < grid.nx; c++) [value[r * 20 + c], variance[r * 20 + c], extrapolation[r * 20 + c]] = f(r, c);
  const row = await getDb().insert(surfaces).values({ editionId: "2026.12.1", variable, period, grid, stats: s }).returning({ id: surfaces.id }).get();
  await writeSurfacePlanes(row.id, grid, { value, variance, extrapolation });
}

async function call(name: "legend" | "stations" | "readout" | "land", query = ""): Promise<Response> {
  const mod = await import(`@/app/api/map/${name}/route`);
  return mod.GET(new Request(`http://localhost/api/map/${name}${query}`), { params: Promise.resolve({}) });
}

beforeAll(async () => {
  await freshDb();
  const db = getDb();
  await db.insert(editions).values([{ id: "2026.12.1", status: "published", isDemo: true, publishedAt: new Date() }, { id: "2027.1.1", status: "building" }]);
  const [a, b] = await db.insert(stations).values([
    { code: "DEMO-A", name: "Alder Ridge", lat: 4, lon: 2, elevationM: 350, isDemo: true, status: "approved", collectorType: COLLECTOR },
    { code: "DEMO-B", name: "Birch Flats", lat: -3, lon: -6, elevationM: 20, isDemo: true, status: "approved", collectorType: COLLECTOR },
  ]).returning({ id: stations.id }).all();
  await db.insert(editionStationMeans).values([
    { editionId: "2026.12.1", stationId: a.id, period: 0, d18O: -6.123, d2H: -38.46, dExcess: 10.524, precipMm: 812.4, included: true, lat: 4, lon: 2, elevationM: 350 },
    { editionId: "2026.12.1", stationId: b.id, period: 0, d18O: null, d2H: null, dExcess: null, precipMm: 400, included: false, lat: -3, lon: -6, elevationM: 20 },
    { editionId: "2026.12.1", stationId: a.id, period: 7, d18O: -3, d2H: -14, dExcess: 10, precipMm: 90, included: true },
  ]);
  // δ18O annual = −(row + col)/2 ‰, variance 0.25 (sd 0.5); rows ≥ 18 extrapolated; the NE corner cell is sea.
  await addSurface("d18O", 0, (r, c) => (r === 0 && c === 19 ? [NaN, NaN, 0] : [-(r + c) / 2, 0.25, r >= 18 ? 1 : 0]), stats("‰", range(-19, 0), range(0.5, 0.5)));
  await addSurface("d18O", 7, () => [-2, 1, 0], stats("‰", range(-25, -2), range(1, 1)));
  await addSurface("dExcess", 0, () => [12, 4, 0], stats("‰", range(4, 13), range(2, 2)));
  await addSurface("d2H", 0, (r, c) => [8 * (-(r + c) / 2) + 12, 25, 0], stats("‰", range(-140, 12), range(5, 5), "δ2H = d-excess + 8·δ18O"));
  await addSurface("precipMm", 0, () => [30, 400, 0], stats("mm", range(20, 40), range(20, 20)));
});

describe("map legend", () => {
  it("gives the scale shared by all periods of a δ layer, with ramp stops and units", async () => {
    const res = await call("legend", "?edition=2026.12.1&layer=d18O&period=0");
    expect(res.status).toBe(200);
    const body = await res.json();
    // p02/p98 over annual (−19…0) and July (−25…−2) → −25…0 in steps of 5
    expect(body).toMatchObject({ edition: "2026.12.1", layer: "d18O", title: "δ18O", units: "‰", min: -25, max: 0, centre: null, ticks: [-25, -20, -15, -10, -5, 0], synthetic: true, seaLevelEquivalent: true, ramp: { id: "meltwater", kind: "sequential" } });
    expect(body.stops).toEqual(rampStops("meltwater", 32));
    expect(body.extrapolation.distanceKm).toBe(800);
  });

  it("centres d-excess on +10 ‰ and names the uncertainty layer", async () => {
    const dx = await (await call("legend", "?edition=2026.12.1&layer=dExcess")).json();
    expect(dx).toMatchObject({ centre: 10, min: 4, max: 16, ramp: { id: "moisture-source", kind: "diverging" } });
    const sd = await (await call("legend", "?edition=2026.12.1&layer=d18O-sd&period=7")).json();
    expect(sd).toMatchObject({ kind: "sd", title: "Uncertainty of δ18O (1 standard deviation)", ramp: { id: "haze" } });
  });

  it("refuses unknown layers (400), editions and surfaces (404), and bad periods (400)", async () => {
    expect((await call("legend", "?edition=2026.12.1&layer=d17O")).status).toBe(400);
    expect((await call("legend", "?edition=2027.1.1&layer=d18O")).status).toBe(404);
    expect((await call("legend", "?edition=2026.12.1&layer=d2H&period=3")).status).toBe(404);
    const bad = await call("legend", "?edition=2026.12.1&layer=d18O&period=13");
    expect(bad.status).toBe(400);
    expect(bad.headers.get("content-type")).toContain("application/problem+json");
  });
});

describe("map stations", () => {
  it("lists the edition's stations for a period as GeoJSON with rounded means", async () => {
    const res = await call("stations", "?edition=2026.12.1&period=0");
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/geo+json");
    const fc = await res.json();
    expect(fc).toMatchObject({ type: "FeatureCollection", synthetic: true, notice: expect.stringContaining("synthetic demo data") });
    expect(fc.features).toHaveLength(2);
    expect(fc.features[0]).toEqual({
      type: "Feature", geometry: { type: "Point", coordinates: [2, 4] },
      properties: { code: "DEMO-A", name: "Alder Ridge", elevationM: 350, d18O: -6.12, d2H: -38.5, dExcess: 10.5, precipMm: 812, included: true, synthetic: true },
    });
    expect(fc.features[1].properties).toMatchObject({ code: "DEMO-B", d18O: null, included: false });
    const july = await (await call("stations", "?edition=2026.12.1&period=7")).json();
    expect(july.features.map((f: { properties: { code: string } }) => f.properties.code)).toEqual(["DEMO-A"]);
  });

  it("answers 404 for an unpublished edition", async () => {
    expect((await call("stations", "?edition=2027.1.1")).status).toBe(404);
  });
});

describe("map readout", () => {
  it("reads the cell holding the point: value ± 1.96·sd, with the extrapolation flag", async () => {
    // (lat 4.2, lon 2.4) → row round(9.5 − 4.2) = 5, col round(2.4 + 9.5) = 12 → δ18O = −8.5
    const res = await call("readout", "?edition=2026.12.1&lat=4.2&lon=2.4");
    expect(res.status).toBe(200);
    const r = await res.json();
    expect(r.cell).toEqual({ lat: 4.5, lon: 2.5 });
    expect(r.values.d18O).toEqual({ value: -8.5, sd: 0.5, lower: -8.5 - 1.959964 * 0.5, upper: -8.5 + 1.959964 * 0.5, units: "‰", extrapolation: false });
    expect(r.values.d2H.value).toBeCloseTo(8 * -8.5 + 12, 5);
    expect(r.values.dExcess).toMatchObject({ value: 12, sd: 2 });
    expect(r.values.precipMm.lower).toBe(0); // 30 − 1.96·20 < 0 → 0
    expect(r).toMatchObject({ extrapolation: false, extrapolationDistanceKm: 800, seaLevelEquivalent: true, synthetic: true, notes: ["δ2H = d-excess + 8·δ18O"] });
  });

  it("flags extrapolation cells and gives null where there is no value", async () => {
    const far = await (await call("readout", "?edition=2026.12.1&lat=-8.7&lon=0")).json();
    expect(far.values.d18O.extrapolation).toBe(true);
    expect(far.extrapolation).toBe(true);
    const sea = await (await call("readout", "?edition=2026.12.1&lat=9.5&lon=9.5")).json();
    expect(sea.values.d18O).toBeNull();
    const outside = await (await call("readout", "?edition=2026.12.1&lat=50&lon=50")).json();
    expect(outside.cell).toBeNull();
    expect(Object.values(outside.values).every((v) => v === null)).toBe(true);
  });

  it("refuses bad coordinates with field messages", async () => {
    const res = await call("readout", "?edition=2026.12.1&lat=95&lon=0");
    expect(res.status).toBe(400);
    expect(JSON.stringify(await res.json())).toContain("lat is a latitude in degrees");
    expect((await call("readout", "?edition=2026.12.1&lat=abc&lon=0")).status).toBe(400);
    expect((await call("readout", "?edition=2026.12.1&lat=1&lon=0&extra=1")).status).toBe(400);
  });
});

describe("map basemap", () => {
  it("serves the bundled land outlines as GeoJSON inside ±180°", async () => {
    const res = await call("land");
    expect(res.status).toBe(200);
    const fc = await res.json();
    expect(fc.type).toBe("FeatureCollection");
    const lons = fc.features.flatMap((f: { geometry: { coordinates: number[][][][] } }) => f.geometry.coordinates.flat(2).map((p: number[]) => p[0]));
    expect(Math.min(...lons)).toBeGreaterThanOrEqual(-180);
    expect(Math.max(...lons)).toBeLessThanOrEqual(180);
  });
});
