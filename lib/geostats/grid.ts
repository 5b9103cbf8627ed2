/**
 * Regular longitude/latitude grids of cell centres.
 *
 * Layout (north-up, the order of GeoTIFF and PNG rasters): cell (row, col) is stored at
 * index = row·nx + col; row 0 is the northernmost row, col 0 the westernmost column.
 * `lon0, lat0` is the centre of cell (0, 0) — the north-west cell; the centre of cell (row, col)
 * is lon = lon0 + col·dLon, lat = lat0 − row·dLat (dLon, dLat > 0, degrees).
 * For planar models read lon/lat as x/y (y decreasing down the rows).
 */
import { GeostatsError } from "./errors";

export interface GridSpec {
  /** Longitude of the centre of the north-west cell (degrees). */
  lon0: number;
  /** Latitude of the centre of the north-west cell (degrees). */
  lat0: number;
  /** Cell width in degrees of longitude (> 0); columns go east. */
  dLon: number;
  /** Cell height in degrees of latitude (> 0); rows go south. */
  dLat: number;
  /** Columns. */
  nx: number;
  /** Rows. */
  ny: number;
}

export function checkGrid(g: GridSpec, field = "grid"): GridSpec {
  for (const k of ["lon0", "lat0", "dLon", "dLat"] as const) {
    if (typeof g?.[k] !== "number" || !Number.isFinite(g[k])) throw new GeostatsError("invalid-input", `${field}.${k} must be a finite number`, `${field}.${k}`);
  }
  for (const k of ["nx", "ny"] as const) {
    if (!Number.isInteger(g[k]) || g[k] < 1) throw new GeostatsError("invalid-input", `${field}.${k} must be a positive integer`, `${field}.${k}`);
  }
  if (!(g.dLon > 0)) throw new GeostatsError("invalid-input", `${field}.dLon must be positive`, `${field}.dLon`);
  if (!(g.dLat > 0)) throw new GeostatsError("invalid-input", `${field}.dLat must be positive`, `${field}.dLat`);
  return { lon0: g.lon0, lat0: g.lat0, dLon: g.dLon, dLat: g.dLat, nx: g.nx, ny: g.ny };
}

export function gridCellCount(g: GridSpec): number {
  return g.nx * g.ny;
}

/** Centre [lon, lat] of the cell at `index` (row-major, north-up). */
export function gridCellCentre(g: GridSpec, index: number): [number, number] {
  const row = Math.floor(index / g.nx);
  const col = index - row * g.nx;
  return [g.lon0 + col * g.dLon, g.lat0 - row * g.dLat];
}

/** Writes the centres of cells [from, to) interleaved into out[0 … 2(to − from)). */
export function gridCellCentres(g: GridSpec, from: number, to: number, out: Float64Array): void {
  let row = Math.floor(from / g.nx);
  let col = from - row * g.nx;
  for (let i = from, o = 0; i < to; i++, o += 2) {
    out[o] = g.lon0 + col * g.dLon;
    out[o + 1] = g.lat0 - row * g.dLat;
    if (++col === g.nx) {
      col = 0;
      row++;
    }
  }
}

/** The grid of nx × ny equal cells filling a lon/lat box (cell centres inside the box). */
export function gridFromBounds(b: { west: number; south: number; east: number; north: number; nx: number; ny: number }): GridSpec {
  const dLon = (b.east - b.west) / b.nx;
  const dLat = (b.north - b.south) / b.ny;
  return checkGrid({ lon0: b.west + dLon / 2, lat0: b.north - dLat / 2, dLon, dLat, nx: b.nx, ny: b.ny });
}
