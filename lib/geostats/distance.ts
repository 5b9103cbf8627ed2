/**
 * Distances between stations and targets.
 *
 * - "planar": Euclidean distance in coordinate units.
 * - "lonlat": longitude/latitude in decimal degrees (WGS84); distance in km on the WGS84
 *   ellipsoid with Andoyer–Lambert's first-order flattening correction, the convention of R's
 *   sp (`spDists(..., longlat = TRUE)`) and gstat for long/lat data.
 */

/** WGS84 equatorial radius in km — the WGS84 defining parameter, as in sp/gstat's gcdist.c [pub]. */
export const WGS84_A_KM = 6378.137;
/** WGS84 flattening — the WGS84 defining parameter, as in sp/gstat's gcdist.c [pub]. */
export const WGS84_F = 1 / 298.257223563;

const DEG = Math.PI / 180;

export type CoordinateSystem = "lonlat" | "planar";

/**
 * Ellipsoidal great-circle distance in km between two long/lat points (degrees), written from the
 * published formula: Andoyer–Lambert first-order flattening correction (Lambert 1942,
 * J. Washington Acad. Sci. 32:125–130 [mem]) in the form used by R sp's `spDists(longlat = TRUE)`
 * and gstat [pub]. Identical points give exactly 0.
 * Near-antipodal points carry the formula's own error (about f); use for geostatistics, not geodesy.
 */
export function greatCircleKm(lon1: number, lat1: number, lon2: number, lat2: number): number {
  if (lon1 === lon2 && lat1 === lat2) return 0;
  const F = ((lat1 + lat2) / 2) * DEG;
  const G = ((lat1 - lat2) / 2) * DEG;
  const L = ((lon1 - lon2) / 2) * DEG;
  const sinG2 = Math.sin(G) ** 2;
  const cosG2 = Math.cos(G) ** 2;
  const sinF2 = Math.sin(F) ** 2;
  const cosF2 = Math.cos(F) ** 2;
  const sinL2 = Math.sin(L) ** 2;
  const cosL2 = Math.cos(L) ** 2;
  return andoyerLambert(sinG2, cosG2, sinF2, cosF2, sinL2, cosL2);
}

/**
 * The common tail of the Andoyer–Lambert formula from the squared half-angle sines and cosines:
 * S = sin²G·cos²L + cos²F·sin²L, C = cos²G·cos²L + sin²F·sin²L, w = atan√(S/C), R = √(SC)/w,
 * D = 2wa, H1 = (3R−1)/(2C), H2 = (3R+1)/(2S), d = D(1 + f·H1·sin²F·cos²G − f·H2·cos²F·sin²G)
 * — Lambert (1942) [mem], the form of R sp/gstat [pub].
 */
function andoyerLambert(sinG2: number, cosG2: number, sinF2: number, cosF2: number, sinL2: number, cosL2: number): number {
  const S = sinG2 * cosL2 + cosF2 * sinL2;
  if (S <= 1e-290) return 0; // the same place (also lon ±180 and different longitudes at a pole)
  const C = cosG2 * cosL2 + sinF2 * sinL2;
  const w = Math.atan(Math.sqrt(S / C));
  const R = Math.sqrt(S * C) / w;
  const D = 2 * w * WGS84_A_KM;
  const H1 = (3 * R - 1) / (2 * C);
  const H2 = (3 * R + 1) / (2 * S);
  return D * (1 + WGS84_F * (H1 * sinF2 * cosG2 - H2 * cosF2 * sinG2));
}

/**
 * The same distance from precomputed sines and cosines of both points' latitude and longitude,
 * so a distance costs one atan and two square roots and no other trigonometry. The squared
 * half-angle functions come from sin/cos of the sum and difference angles with the
 * cancellation-free identity sin²(θ/2) = sin²θ / (2(1 + cos θ)) when cos θ ≥ 0 (else
 * (1 − cos θ)/2, and cos²(θ/2) = 1 − sin²(θ/2) when that is ≥ ½), which keeps full relative
 * precision down to millimetre distances.
 */
export function greatCircleKmTrig(
  sinLat1: number,
  cosLat1: number,
  sinLon1: number,
  cosLon1: number,
  sinLat2: number,
  cosLat2: number,
  sinLon2: number,
  cosLon2: number,
): number {
  // difference of latitudes: 2G
  const sD = sinLat1 * cosLat2 - cosLat1 * sinLat2;
  const cD = cosLat1 * cosLat2 + sinLat1 * sinLat2;
  // sum of latitudes: 2F
  const sS = sinLat1 * cosLat2 + cosLat1 * sinLat2;
  const cS = cosLat1 * cosLat2 - sinLat1 * sinLat2;
  // difference of longitudes: 2L
  const sL = sinLon1 * cosLon2 - cosLon1 * sinLon2;
  const cL = cosLon1 * cosLon2 + sinLon1 * sinLon2;
  let sinG2: number, cosG2: number, sinF2: number, cosF2: number, sinL2: number, cosL2: number;
  if (cD >= 0) {
    sinG2 = (sD * sD) / (2 * (1 + cD));
    cosG2 = 1 - sinG2;
  } else {
    cosG2 = (sD * sD) / (2 * (1 - cD));
    sinG2 = 1 - cosG2;
  }
  if (cS >= 0) {
    sinF2 = (sS * sS) / (2 * (1 + cS));
    cosF2 = 1 - sinF2;
  } else {
    cosF2 = (sS * sS) / (2 * (1 - cS));
    sinF2 = 1 - cosF2;
  }
  if (cL >= 0) {
    sinL2 = (sL * sL) / (2 * (1 + cL));
    cosL2 = 1 - sinL2;
  } else {
    cosL2 = (sL * sL) / (2 * (1 - cL));
    sinL2 = 1 - cosL2;
  }
  return andoyerLambert(sinG2, cosG2, sinF2, cosF2, sinL2, cosL2);
}

/**
 * The same distance again, faster, from unit-sphere vectors (x, y, z) plus the sines/cosines of
 * both points. Uses two identities of the Andoyer–Lambert terms [trade: spherical trigonometry]:
 * S = sin²G·cos²L + cos²F·sin²L is sin²(σ/2) = |u1 − u2|²/4 (σ the central angle) and S + C = 1;
 * sin²F·cos²G = ((sinφ1 + sinφ2)/2)² and cos²F·sin²G = ((sinφ1 − sinφ2)/2)². Below ~13 km and
 * within ~13 km of the antipode the cancellation-free half-angle form (greatCircleKmTrig) is used
 * instead, so those distances keep full relative precision.
 */
export function greatCircleKmUnit(
  sinLat1: number,
  cosLat1: number,
  sinLon1: number,
  cosLon1: number,
  x1: number,
  y1: number,
  z1: number,
  sinLat2: number,
  cosLat2: number,
  sinLon2: number,
  cosLon2: number,
  x2: number,
  y2: number,
  z2: number,
): number {
  const dx = x1 - x2;
  const dy = y1 - y2;
  const dz = z1 - z2;
  const S = 0.25 * (dx * dx + dy * dy + dz * dz);
  if (S < 1e-6 || S > 1 - 1e-6) return greatCircleKmTrig(sinLat1, cosLat1, sinLon1, cosLon1, sinLat2, cosLat2, sinLon2, cosLon2);
  const C = 1 - S;
  const sp = 0.5 * (sinLat1 + sinLat2);
  const sm = 0.5 * (sinLat1 - sinLat2);
  const w = Math.atan(Math.sqrt(S / C));
  const R = Math.sqrt(S * C) / w;
  return 2 * w * WGS84_A_KM * (1 + WGS84_F * (((3 * R - 1) / (2 * C)) * sp * sp - ((3 * R + 1) / (2 * S)) * sm * sm));
}

/**
 * Lower bound factor: for every pair of points the Andoyer–Lambert distance is at least
 * a·σ·(1 − 2.5f), σ the central angle on the unit sphere (numerically the ratio d/(aσ) stays
 * within [1 − 2f, 1 + f]; 2.5f leaves margin). Used only to prune the neighbour search safely.
 */
export const LONLAT_LOWER_BOUND_FACTOR = WGS84_A_KM * (1 - 2.5 * WGS84_F);

/** Euclidean distance. */
export function planarDistance(x1: number, y1: number, x2: number, y2: number): number {
  const dx = x1 - x2;
  const dy = y1 - y2;
  return Math.sqrt(dx * dx + dy * dy);
}

/** Distance in the given coordinate system (km for lonlat, coordinate units for planar). */
export function distance(coordinates: CoordinateSystem, x1: number, y1: number, x2: number, y2: number): number {
  return coordinates === "lonlat" ? greatCircleKm(normalizeLon(x1), y1, normalizeLon(x2), y2) : planarDistance(x1, y1, x2, y2);
}

/** Longitude to (−180, 180]; −180 becomes 180 so that the two spellings of a meridian compare equal. */
export function normalizeLon(lon: number): number {
  if (lon > -180 && lon <= 180) return lon;
  const r = ((((lon + 180) % 360) + 360) % 360) - 180;
  return r === -180 ? 180 : r;
}
