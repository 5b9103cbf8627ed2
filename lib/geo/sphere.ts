// Spherical helpers for lib/geo. Plain numbers in, plain numbers out.

/** Mean Earth radius R1 = 6371.0088 km (IUGG; the radius @turf/turf uses) [mem]. */
export const EARTH_RADIUS_KM = 6371.0088;

export const DEG = Math.PI / 180;

/** Wrap a longitude in degrees to [-180, 180). */
export function wrapLon(lon: number): number {
  if (lon >= -180 && lon < 180) return lon;
  const w = ((((lon + 180) % 360) + 360) % 360) - 180;
  return w;
}

/** Difference b − a of two longitudes in degrees, wrapped to (-180, 180]. */
export function lonDelta(a: number, b: number): number {
  let d = b - a;
  while (d > 180) d -= 360;
  while (d <= -180) d += 360;
  return d;
}

/**
 * Great-circle distance in km on a sphere of radius EARTH_RADIUS_KM.
 * Haversine formula (Sinnott 1984, Sky & Telescope 68:159) [mem]; within ~0.5% of
 * the WGS84 ellipsoidal distance [trade]. lib/geostats has the ellipsoidal distance
 * used for kriging; this one serves geometry (spacing, coast distance).
 */
export function greatCircleKm(lon1: number, lat1: number, lon2: number, lat2: number): number {
  const p1 = lat1 * DEG;
  const p2 = lat2 * DEG;
  const dp = p2 - p1;
  const dl = (lon2 - lon1) * DEG;
  const h = Math.sin(dp / 2) ** 2 + Math.cos(p1) * Math.cos(p2) * Math.sin(dl / 2) ** 2;
  return 2 * EARTH_RADIUS_KM * Math.asin(Math.min(1, Math.sqrt(h)));
}

/** Throws a RangeError with a plain message unless lon/lat are usable coordinates. */
export function assertLonLat(lon: number, lat: number): void {
  if (!Number.isFinite(lon) || !Number.isFinite(lat)) {
    throw new RangeError(`Coordinates must be finite numbers (got lon=${lon}, lat=${lat}).`);
  }
  if (lat < -90 || lat > 90) {
    throw new RangeError(`Latitude must be between -90 and 90 degrees (got ${lat}).`);
  }
}
