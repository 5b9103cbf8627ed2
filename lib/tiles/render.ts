import type { LonLatGrid } from "@/lib/geo";
import type { CellWindow } from "@/lib/surfaces/store";
import { pixelLat, pixelLon, TILE_SIZE } from "./mercator";
import { EXTRAPOLATION_STYLE, LUT_SIZE, rampLut } from "./ramps";
import { scalePosition, type ColourScale } from "./scale";

// Drawing one 256-pixel web-mercator tile from a surface plane. Each pixel takes the
// value of the grid cell whose centre is nearest to the pixel's centre (nearest-neighbour:
// every pixel shows a stored cell's value, and land/no-data edges stay crisp); cells with
// no value (sea, outside the grid) are transparent. Extrapolation cells are veiled and
// hatched (EXTRAPOLATION_STYLE). Pure: the planes are passed in.

/** The cells a tile needs (inclusive of a one-cell margin), or null when it misses the grid. */
export function tileCellWindow(grid: LonLatGrid, z: number, x: number, y: number): CellWindow | null {
  const west = pixelLon(z, x * TILE_SIZE);
  const east = pixelLon(z, (x + 1) * TILE_SIZE);
  const north = pixelLat(z, y * TILE_SIZE);
  const south = pixelLat(z, (y + 1) * TILE_SIZE);
  const col0 = Math.max(0, Math.floor((west - grid.lon0) / grid.dLon) - 1);
  const col1 = Math.min(grid.nx - 1, Math.ceil((east - grid.lon0) / grid.dLon) + 1);
  const row0 = Math.max(0, Math.floor((grid.lat0 - north) / grid.dLat) - 1);
  const row1 = Math.min(grid.ny - 1, Math.ceil((grid.lat0 - south) / grid.dLat) + 1);
  if (col1 < col0 || row1 < row0) return null;
  return { col0, row0, cols: col1 - col0 + 1, rows: row1 - row0 + 1 };
}

export interface TilePlanes {
  /** Values of the window's cells (row-major, window.cols wide); NaN = no value. */
  values: Float32Array;
  /** 1 = extrapolation, same layout; omitted = none. */
  extrapolation?: Uint8Array;
  window: CellWindow;
}

/** RGBA pixels (256 × 256 × 4, row-major from the north-west corner). */
export function renderTile(grid: LonLatGrid, z: number, x: number, y: number, planes: TilePlanes | null, scale: ColourScale): Uint8Array {
  const rgba = new Uint8Array(TILE_SIZE * TILE_SIZE * 4);
  if (!planes) return rgba;
  const { values, extrapolation, window: win } = planes;
  // Window column / row of each pixel column / row; −1 = outside the grid.
  const colOf = new Int32Array(TILE_SIZE);
  const rowOf = new Int32Array(TILE_SIZE);
  for (let p = 0; p < TILE_SIZE; p++) {
    const c = Math.round((pixelLon(z, x * TILE_SIZE + p + 0.5) - grid.lon0) / grid.dLon);
    colOf[p] = c >= 0 && c < grid.nx && c >= win.col0 && c < win.col0 + win.cols ? c - win.col0 : -1;
    const r = Math.round((grid.lat0 - pixelLat(z, y * TILE_SIZE + p + 0.5)) / grid.dLat);
    rowOf[p] = r >= 0 && r < grid.ny && r >= win.row0 && r < win.row0 + win.rows ? r - win.row0 : -1;
  }
  const lut = rampLut(scale.ramp);
  const { veil, ink, spacing, width } = EXTRAPOLATION_STYLE;
  const gx0 = x * TILE_SIZE;
  const gy0 = y * TILE_SIZE;
  for (let py = 0; py < TILE_SIZE; py++) {
    const r = rowOf[py];
    if (r < 0) continue;
    for (let px = 0; px < TILE_SIZE; px++) {
      const c = colOf[px];
      if (c < 0) continue;
      const cell = r * win.cols + c;
      const v = values[cell];
      if (v !== v) continue;
      const li = 3 * Math.round(scalePosition(scale, v) * (LUT_SIZE - 1));
      const o = 4 * (py * TILE_SIZE + px);
      if (extrapolation && extrapolation[cell]) {
        if ((gx0 + px + gy0 + py) % spacing < width) {
          rgba[o] = ink[0];
          rgba[o + 1] = ink[1];
          rgba[o + 2] = ink[2];
        } else {
          rgba[o] = Math.round(lut[li] + veil * (255 - lut[li]));
          rgba[o + 1] = Math.round(lut[li + 1] + veil * (255 - lut[li + 1]));
          rgba[o + 2] = Math.round(lut[li + 2] + veil * (255 - lut[li + 2]));
        }
      } else {
        rgba[o] = lut[li];
        rgba[o + 1] = lut[li + 1];
        rgba[o + 2] = lut[li + 2];
      }
      rgba[o + 3] = 255;
    }
  }
  return rgba;
}
