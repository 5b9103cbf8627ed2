import "server-only";
import { desc, eq, ne } from "drizzle-orm";
import { fromArrayBuffer } from "geotiff";
import { getDb } from "@/db";
import { elevationModels } from "@/db/schema";
import { errors } from "@/lib/errors";
import type { LonLatGrid } from "@/lib/geo";

// Elevation models for elevation-aware edition grids: an admin uploads a single-band GeoTIFF in
// WGS84 longitude/latitude (EPSG:4326), read with the `geotiff` package; the raster is stored as
// Float32 (NaN = no data) with its grid of cell centres, north-up. The newest upload becomes the
// active model; builds started afterwards record its id in their parameters and give each cell the
// elevation of the raster cell holding its centre.

/** Largest upload accepted, bytes. */
export const MAX_ELEVATION_BYTES = 64 * 1024 * 1024;
/** Elevations outside this range (m) are treated as no data [trade: Dead Sea shore ≈ −430 m, Everest ≈ 8849 m]. */
const PLAUSIBLE_M = { min: -500, max: 9000 };

export interface ParsedElevation {
  grid: LonLatGrid;
  data: Float32Array;
  /** Cells with a value. */
  cells: number;
}

/** Parse an elevation GeoTIFF; a clear 400 for anything that is not a usable lon/lat raster. */
export async function parseElevationGeoTiff(bytes: Uint8Array): Promise<ParsedElevation> {
  const bad = (detail: string) => errors.invalid(detail, { file: [detail] });
  let image;
  try {
    const buf = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength) as ArrayBuffer;
    image = await (await fromArrayBuffer(buf)).getImage(0);
  } catch {
    throw bad("The file is not a readable GeoTIFF.");
  }
  const keys = (image.getGeoKeys() ?? {}) as Record<string, number | undefined>;
  if (keys.ProjectedCSTypeGeoKey || (keys.GTModelTypeGeoKey !== undefined && keys.GTModelTypeGeoKey !== 2))
    throw bad("The elevation model must be in geographic longitude/latitude (EPSG:4326), not a projected system.");
  if (keys.GeographicTypeGeoKey !== undefined && keys.GeographicTypeGeoKey !== 4326)
    throw bad(`The elevation model must use WGS84 (EPSG:4326); this one says ${keys.GeographicTypeGeoKey}.`);
  let origin: number[];
  let res: number[];
  try {
    origin = image.getOrigin();
    res = image.getResolution();
  } catch {
    throw bad("The GeoTIFF has no georeferencing (tie point and pixel scale).");
  }
  const nx = image.getWidth();
  const ny = image.getHeight();
  const dLon = res[0];
  const dLat = -res[1];
  if (!(dLon > 0 && dLat > 0)) throw bad("The raster must be north-up with square-ish positive cell sizes.");
  if (nx * ny > 50_000_000) throw bad(`The raster has ${(nx * ny).toLocaleString("en")} cells; at most 50,000,000 are accepted.`);
  const grid: LonLatGrid = { lon0: origin[0] + dLon / 2, lat0: origin[1] - dLat / 2, dLon, dLat, nx, ny };
  if (grid.lat0 > 90 || grid.lat0 - (ny - 1) * dLat < -90 || grid.lon0 < -180.0001 || grid.lon0 + (nx - 1) * dLon > 180.0001)
    throw bad("The raster reaches outside longitude −180…180 / latitude −90…90.");
  const [band] = (await image.readRasters({ samples: [0] })) as unknown as ArrayLike<number>[];
  const noData = image.getGDALNoData();
  const data = new Float32Array(nx * ny);
  let cells = 0;
  for (let i = 0; i < data.length; i++) {
    const v = Number(band[i]);
    if (!Number.isFinite(v) || v === noData || v < PLAUSIBLE_M.min || v > PLAUSIBLE_M.max) data[i] = NaN;
    else {
      data[i] = v;
      cells++;
    }
  }
  if (!cells) throw bad("The raster holds no elevation between −500 and 9000 m.");
  return { grid, data, cells };
}

/** Store an uploaded model and make it the active one (one transaction). */
export async function saveElevationModel(name: string, parsed: ParsedElevation, uploadedBy: string): Promise<{ id: string }> {
  return getDb().transaction(async (tx) => {
    const row = await tx
      .insert(elevationModels)
      .values({
        name,
        uploadedBy,
        grid: parsed.grid,
        data: Buffer.from(parsed.data.buffer, parsed.data.byteOffset, parsed.data.byteLength),
        active: true,
      })
      .returning({ id: elevationModels.id })
      .get();
    await tx.update(elevationModels).set({ active: false }).where(ne(elevationModels.id, row.id));
    return row;
  });
}

/** Turn a model on (and every other off) or off; 404 for an unknown id. */
export async function setElevationModelActive(id: string, active: boolean): Promise<void> {
  await getDb().transaction(async (tx) => {
    const row = await tx.update(elevationModels).set({ active }).where(eq(elevationModels.id, id)).returning({ id: elevationModels.id }).get();
    if (!row) throw errors.notFound("There is no elevation model with this id.");
    if (active) await tx.update(elevationModels).set({ active: false }).where(ne(elevationModels.id, id));
  });
}

/** The active model's id, or null (builds are then sea-level-equivalent). */
export async function activeElevationModelId(): Promise<string | null> {
  return (await getDb().select({ id: elevationModels.id }).from(elevationModels).where(eq(elevationModels.active, true)).get())?.id ?? null;
}

export async function listElevationModels() {
  return getDb()
    .select({ id: elevationModels.id, name: elevationModels.name, grid: elevationModels.grid, active: elevationModels.active, createdAt: elevationModels.createdAt })
    .from(elevationModels)
    .orderBy(desc(elevationModels.createdAt))
    .all();
}
