import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, surfaces } from "@/db/schema";
import { seedDemoData } from "@/db/seed/demo-data";
import { surfaceToGeoTiff } from "@/lib/downloads/geotiff";
import { defaultBuildParameters } from "@/lib/editions/build/compute";
import { runEditionBuild } from "@/lib/editions/build/pipeline";
import { activeElevationModelId, parseElevationGeoTiff, saveElevationModel, setElevationModelActive } from "@/lib/editions/elevation-models";
import type { SurfaceGridSpec, SurfaceStats, SurfaceTrend } from "@/lib/editions/types";
import { isAppError } from "@/lib/errors";
import { readSurfacePlaneData } from "@/lib/surfaces/store";
import { countRows, freshDb } from "../helpers/db";

// An uploaded elevation GeoTIFF makes elevation-aware grids: the kriged residuals are the same as
// in the sea-level-equivalent build, so the two grids differ by exactly b_elevation × elevation.

const grid = { lon0: -19.5, lat0: 69.5, dLon: 1, dLat: 1, nx: 80, ny: 40 }; // 1° cells over Europe/N Africa
const elevation = new Float32Array(grid.nx * grid.ny).map((_, i) => 100 + 20 * (i % grid.nx) + 5 * Math.floor(i / grid.nx));

function tiff(values: Float32Array, g = grid): Uint8Array {
  return surfaceToGeoTiff({ grid: g, values, meta: { editionId: "dem", variable: "d18O", period: 0, plane: "value", isDemo: true } });
}

beforeAll(async () => {
  await freshDb();
  await seedDemoData({ profile: "test" });
}, 120_000);

describe("elevation models", () => {
  it("reads a WGS84 GeoTIFF: grid of cell centres and values", async () => {
    const p = await parseElevationGeoTiff(tiff(elevation));
    expect(p.grid.nx).toBe(80);
    expect(p.grid.ny).toBe(40);
    expect(p.grid.lon0).toBeCloseTo(grid.lon0, 9);
    expect(p.grid.lat0).toBeCloseTo(grid.lat0, 9);
    expect(p.grid.dLon).toBeCloseTo(1, 12);
    expect(Array.from(p.data.subarray(0, 5))).toEqual(Array.from(elevation.subarray(0, 5)));
    expect(p.cells).toBe(elevation.length);
  });

  it("refuses what is not a usable raster, with a message, and stores nothing", async () => {
    const before = await countRows("elevation_models");
    for (const bytes of [new Uint8Array(), new TextEncoder().encode("not a tiff"), tiff(new Float32Array(grid.nx * grid.ny).fill(20000))]) {
      const e = await parseElevationGeoTiff(bytes).catch((x) => x);
      expect(isAppError(e) && e.status).toBe(400);
      expect(String(e.message)).not.toBe("");
    }
    expect(await countRows("elevation_models")).toBe(before);
  });

  it("an active model makes the grid trend use each cell's elevation", async () => {
    const parsed = await parseElevationGeoTiff(tiff(elevation));
    const user = (await getDb().query.users.findFirst())?.id ?? null;
    const { id } = await saveElevationModel("test relief", parsed, user as string);
    expect(await activeElevationModelId()).toBe(id);
    const g = { resolutionDeg: 1, extent: { west: -20, south: 30, east: 60, north: 70 } };
    for (const [eid, modelId] of [["sle", null], ["dem", id]] as const) {
      await getDb().insert(editions).values({ id: eid, status: "building", parameters: defaultBuildParameters({ grid: g, elevationModelId: modelId }), isDemo: true });
      await runEditionBuild(eid, { threads: 1 });
    }
    const surf = async (eid: string) =>
      (await getDb().select().from(surfaces).where(and(eq(surfaces.editionId, eid), eq(surfaces.variable, "d18O"), eq(surfaces.period, 0))).get())!;
    const [a, b] = [await surf("sle"), await surf("dem")];
    expect((a.stats as SurfaceStats).seaLevelEquivalent).toBe(true);
    expect((b.stats as SurfaceStats).seaLevelEquivalent).toBe(false);
    const slope = (b.trend as SurfaceTrend).terms[3].estimate;
    expect(slope).toBeLessThan(0); // the altitude effect
    const [va, vb] = await Promise.all([readSurfacePlaneData(a.id, a.grid as SurfaceGridSpec, "value"), readSurfacePlaneData(b.id, b.grid as SurfaceGridSpec, "value")]);
    let n = 0;
    for (let c = 0; c < va.length; c++) {
      if (Number.isNaN(va[c])) continue;
      n++;
      expect(vb[c] - va[c]).toBeCloseTo(slope * elevation[c], 3);
    }
    expect(n).toBeGreaterThan(500);
    await setElevationModelActive(id, false);
    expect(await activeElevationModelId()).toBeNull();
  }, 120_000);
});
