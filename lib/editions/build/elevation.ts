import "server-only";
import { eq } from "drizzle-orm";
import { getDb } from "@/db";
import { elevationModels } from "@/db/schema";
import type { LonLatGrid } from "@/lib/geo";
import type { BuildParameters, GridParams } from "./compute";

// Elevation for edition grids. Without an active elevation model the surfaces are
// sea-level-equivalent (the trend's elevation term at 0 m). An admin-uploaded model
// (elevation_models, a Float32 raster on its own lon/lat grid) gives each cell the elevation of
// the raster cell holding its centre (nearest neighbour).

export interface CellElevation {
  modelId: string;
  cells: Float32Array;
}

/** Elevation per cell of the build's grid from the elevation model named in the parameters, or null. */
export async function loadActiveElevation(params: BuildParameters): Promise<CellElevation | null> {
  const id = params.elevationModelId;
  if (!id) return null;
  const row = await getDb().select().from(elevationModels).where(eq(elevationModels.id, id)).get();
  if (!row) throw new Error(`The elevation model ${id} named in the build parameters no longer exists.`);
  const src = row.grid as LonLatGrid;
  const data = new Float32Array(row.data.buffer.slice(row.data.byteOffset, row.data.byteOffset + row.data.byteLength));
  return { modelId: id, cells: resampleNearest(src, data, params.grid) };
}

/** Nearest-neighbour resampling of a north-up raster onto the build grid (NaN outside it). */
export function resampleNearest(src: LonLatGrid, data: Float32Array, grid: GridParams): Float32Array {
  const r = grid.resolutionDeg;
  const nx = Math.max(1, Math.round((grid.extent.east - grid.extent.west) / r));
  const ny = Math.max(1, Math.round((grid.extent.north - grid.extent.south) / r));
  const out = new Float32Array(nx * ny).fill(NaN);
  for (let row = 0; row < ny; row++) {
    const lat = grid.extent.north - r / 2 - row * r;
    const sr = Math.round((src.lat0 - lat) / src.dLat);
    if (sr < 0 || sr >= src.ny) continue;
    for (let col = 0; col < nx; col++) {
      const lon = grid.extent.west + r / 2 + col * r;
      let sc = Math.round((lon - src.lon0) / src.dLon);
      if (sc < 0 || sc >= src.nx) {
        // a global raster wraps in longitude
        if (Math.abs(src.nx * src.dLon - 360) < 1e-6) sc = ((sc % src.nx) + src.nx) % src.nx;
        else continue;
      }
      out[row * nx + col] = data[sr * src.nx + sc];
    }
  }
  return out;
}
