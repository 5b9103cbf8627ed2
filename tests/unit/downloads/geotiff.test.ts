// The GeoTIFF writer (lib/downloads/geotiff.ts), decoded with the `geotiff`
// package as a GIS reader would. Expected georeferencing follows the GeoTIFF
// 1.0 specification [pub] (http://geotiff.maptools.org/spec/geotiff2.4.html):
// with RasterPixelIsArea, raster point (0, 0) is the outer corner of the first
// pixel, so the tie point is the north-west corner of the north-west cell,
// (lon0 − dLon/2, lat0 + dLat/2); ModelPixelScale is (dLon, dLat, 0); EPSG
// 4326 is WGS 84 [pub, EPSG registry]. GDAL_NODATA and GDAL_METADATA are
// GDAL's TIFF tags 42113 and 42112 [pub, GDAL GTiff driver documentation].
import { fromArrayBuffer, type GeoTIFFImage } from "geotiff";
import { describe, expect, it } from "vitest";
import { HEADER_BLOCK_BYTES, headerBytes, NODATA_VALUE, surfaceToGeoTiff } from "@/lib/downloads/geotiff";
import type { SurfacePlane } from "@/lib/downloads/surface";

// A 7 × 5 grid of 0.5° cells whose north-west cell centre is at (−3.25°, 47.75°):
// it straddles the prime meridian. Each cell's value encodes its own centre.
const grid = { lon0: -3.25, lat0: 47.75, dLon: 0.5, dLat: 0.5, nx: 7, ny: 5 };
const valueAt = (lon: number, lat: number) => lat * 10 + lon * 0.1;
function plane(overrides: Partial<SurfacePlane["meta"]> = {}): SurfacePlane {
  const values = new Float32Array(grid.nx * grid.ny);
  for (let r = 0; r < grid.ny; r++)
    for (let c = 0; c < grid.nx; c++) values[r * grid.nx + c] = valueAt(grid.lon0 + c * grid.dLon, grid.lat0 - r * grid.dLat);
  values[1 * grid.nx + 2] = Number.NaN; // no value at row 1, column 2
  values[4 * grid.nx + 6] = Number.NaN; // … and in the south-east corner
  return { grid, values, meta: { editionId: "2026.12.1", variable: "d18O", period: 0, plane: "value", isDemo: true, ...overrides } };
}

async function open(bytes: Uint8Array): Promise<GeoTIFFImage> {
  const copy = bytes.slice().buffer;
  return (await fromArrayBuffer(copy)).getImage();
}

describe("surfaceToGeoTiff", () => {
  it("writes one Float32 band of the grid's size", async () => {
    const img = await open(surfaceToGeoTiff(plane()));
    expect(img.getWidth()).toBe(7);
    expect(img.getHeight()).toBe(5);
    expect(img.getSamplesPerPixel()).toBe(1);
    expect(Array.from(img.getFileDirectory().getValue("SampleFormat") as ArrayLike<number>)).toEqual([3]);
    expect(Array.from(img.getFileDirectory().getValue("BitsPerSample") as ArrayLike<number>)).toEqual([32]);
  });

  it("is georeferenced: pixel scale, tie point at the NW corner of the NW cell, WGS 84, pixel is area", async () => {
    const img = await open(surfaceToGeoTiff(plane()));
    expect(img.getResolution()).toEqual([0.5, -0.5, 0]);
    expect(img.getOrigin()).toEqual([-3.5, 48, 0]); // −3.25 − 0.25, 47.75 + 0.25
    expect(img.getBoundingBox()).toEqual([-3.5, 45.5, 0, 48]);
    expect(img.getGeoKeys()).toMatchObject({ GTModelTypeGeoKey: 2, GTRasterTypeGeoKey: 1, GeographicTypeGeoKey: 4326, GeogAngularUnitsGeoKey: 9102 });
    expect(img.pixelIsArea()).toBe(true);
  });

  it("puts every value at its cell: the centre of pixel (c + ½, r + ½) maps to the cell's own lon/lat", async () => {
    const img = await open(surfaceToGeoTiff(plane()));
    const [band] = (await img.readRasters()) as unknown as Float32Array[];
    const [x0, y0] = img.getOrigin();
    const [sx, sy] = img.getResolution();
    for (const [r, c] of [[0, 0], [0, 6], [2, 3], [4, 0], [3, 5]]) {
      const lon = x0 + (c + 0.5) * sx;
      const lat = y0 + (r + 0.5) * sy;
      expect(lon).toBeCloseTo(grid.lon0 + c * grid.dLon, 12);
      expect(lat).toBeCloseTo(grid.lat0 - r * grid.dLat, 12);
      expect(band[r * 7 + c]).toBeCloseTo(Math.fround(valueAt(lon, lat)), 4);
    }
  });

  it("writes no-value cells as the GDAL_NODATA value", async () => {
    const img = await open(surfaceToGeoTiff(plane()));
    expect(img.getGDALNoData()).toBe(NODATA_VALUE);
    const [band] = (await img.readRasters()) as unknown as Float32Array[];
    expect(band[1 * 7 + 2]).toBe(NODATA_VALUE);
    expect(band[4 * 7 + 6]).toBe(NODATA_VALUE);
    expect([...band].filter((v) => v === NODATA_VALUE)).toHaveLength(2);
  });

  it("names edition, variable, period, units and licence in GDAL metadata, with the band's unit", async () => {
    const img = await open(surfaceToGeoTiff(plane({ variable: "dExcess", period: 7 })));
    expect(await img.getGDALMetadata()).toEqual({
      EDITION: "2026.12.1",
      VARIABLE: "dExcess",
      PERIOD: "7",
      PLANE: "value",
      UNITS: "per mil",
      LICENCE: "CC-BY-4.0",
      NOTE: "synthetic demo data",
    });
    expect(await img.getGDALMetadata(0)).toEqual({ DESCRIPTION: "dExcess value", UNITS: "per mil" });
    expect(await img.getFileDirectory().loadValue("Copyright")).toMatch(/^CC BY 4\.0 https:\/\/creativecommons\.org\/licenses\/by\/4\.0\//);
  });

  it("labels synthetic demo data only when the edition is demo data", async () => {
    const img = await open(surfaceToGeoTiff(plane({ isDemo: false })));
    expect(await img.getGDALMetadata()).not.toHaveProperty("NOTE");
  });

  it("keeps the header inside the writer's 1000-byte block for the longest edition id and units", () => {
    const bytes = surfaceToGeoTiff(plane({ editionId: "x".repeat(32), variable: "precipMm", period: 12, plane: "variance" }));
    expect(headerBytes(bytes)).toBeLessThanOrEqual(HEADER_BLOCK_BYTES);
    // 1000 header bytes, then 35 Float32 samples.
    expect(bytes.byteLength).toBe(HEADER_BLOCK_BYTES + 35 * 4);
  });

  it("refuses metadata that would not fit rather than writing cut-off tags", () => {
    expect(() => surfaceToGeoTiff(plane({ editionId: "y".repeat(300) }))).toThrow(/header needs \d+ bytes/);
  });

  it("refuses inconsistent grids and non-ASCII tags with a plain message", () => {
    const p = plane();
    expect(() => surfaceToGeoTiff({ ...p, values: p.values.subarray(1) })).toThrow(RangeError);
    expect(() => surfaceToGeoTiff({ ...p, grid: { ...grid, dLat: -0.5 } })).toThrow(/positive/);
    expect(() => surfaceToGeoTiff({ ...p, meta: { ...p.meta, editionId: "2026·12" } })).toThrow(/ASCII/);
  });
});
