// Web-mercator (EPSG:3857) tile arithmetic for 256-pixel tiles in the XYZ scheme (x east,
// y south, tile 0/0/0 covers ±180° and ±85.0511°) — the "slippy map" convention [trade]
// (OpenStreetMap wiki, "Slippy map tilenames"). Pure and client-safe.

export const TILE_SIZE = 256;
/** Deepest zoom served: a 0.25° cell is ~110 pixels wide at z 12; deeper adds nothing. */
export const MAX_ZOOM = 12;

/** Longitude of the west edge of global pixel column `gx` (may be fractional) at zoom z. */
export function pixelLon(z: number, gx: number): number {
  return (gx / (TILE_SIZE * 2 ** z)) * 360 - 180;
}

/** Latitude at global pixel row `gy` at zoom z: φ = atan(sinh(π − 2π·gy/(256·2^z))). */
export function pixelLat(z: number, gy: number): number {
  const n = Math.PI - (2 * Math.PI * gy) / (TILE_SIZE * 2 ** z);
  return (Math.atan(Math.sinh(n)) * 180) / Math.PI;
}

/** Tile numbers (x, y) holding the point at zoom z. */
export function lonLatToTile(z: number, lon: number, lat: number): { x: number; y: number } {
  const n = 2 ** z;
  const φ = (lat * Math.PI) / 180;
  const x = Math.floor(((lon + 180) / 360) * n);
  const y = Math.floor(((1 - Math.log(Math.tan(φ) + 1 / Math.cos(φ)) / Math.PI) / 2) * n);
  return { x: Math.min(n - 1, Math.max(0, x)), y: Math.min(n - 1, Math.max(0, y)) };
}

/** True for a tile address that exists: integers with 0 ≤ z ≤ MAX_ZOOM and 0 ≤ x, y < 2^z. */
export function isValidTile(z: number, x: number, y: number): boolean {
  if (![z, x, y].every(Number.isInteger)) return false;
  if (z < 0 || z > MAX_ZOOM) return false;
  const n = 2 ** z;
  return x >= 0 && x < n && y >= 0 && y < n;
}
