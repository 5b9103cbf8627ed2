// An INVENTED terrain function for the synthetic demo data. Rainprint has no elevation
// model; demo stations need plausible elevations for the toy isotope model (lapse rate)
// and for the edition's elevation term. This is a sum of smooth shapes loosely placed
// along the great mountain belts and plateaus (so a demo station in the Andes or on the
// Tibetan plateau sits high, one in the Amazon basin low), plus random hills from the
// seed. It is not a DEM: any value may be hundreds of metres off the real ground.

import { greatCircleKm } from "@/lib/geo";
import { Rng } from "./prng";

type Pt = [number, number];

interface Ridge {
  path: Pt[];
  heightM: number;
  halfWidthKm: number;
}
interface Plateau {
  lon: number;
  lat: number;
  radiusKm: number;
  heightM: number;
}

// Shapes of our own, loosely after the major ranges [trade: general geography].
const RIDGES: Ridge[] = [
  { path: [[-150, 62], [-135, 58], [-122, 50], [-115, 44], [-108, 38], [-106, 33]], heightM: 2000, halfWidthKm: 350 },
  { path: [[-106, 30], [-101, 22], [-97, 18]], heightM: 1700, halfWidthKm: 250 },
  { path: [[-85, 34], [-80, 37.5], [-77, 40], [-73, 43], [-70, 45]], heightM: 600, halfWidthKm: 150 },
  { path: [[-78, 8], [-78, 0], [-76, -10], [-70, -16], [-68, -22], [-70, -30], [-71, -40], [-72, -50]], heightM: 3600, halfWidthKm: 180 },
  { path: [[6, 44], [7.5, 46], [10, 46.7], [13.5, 47.2], [16, 47.5]], heightM: 1700, halfWidthKm: 90 },
  { path: [[-1, 42.8], [2.5, 42.5]], heightM: 1100, halfWidthKm: 60 },
  { path: [[19, 49.3], [24, 48], [25.5, 45.7], [22.5, 45]], heightM: 800, halfWidthKm: 90 },
  { path: [[6, 59], [8, 62], [14, 66], [19, 69]], heightM: 900, halfWidthKm: 120 },
  { path: [[40, 43.5], [47, 41.5]], heightM: 2000, halfWidthKm: 90 },
  { path: [[73, 35], [78, 32], [84, 28.8], [88, 28], [95, 28.8]], heightM: 3500, halfWidthKm: 150 },
  { path: [[70, 41.5], [80, 42], [88, 43.5]], heightM: 2400, halfWidthKm: 150 },
  { path: [[86, 50], [90, 49]], heightM: 1700, halfWidthKm: 150 },
  { path: [[36, 2], [36.5, -3]], heightM: 800, halfWidthKm: 60 },
  { path: [[28, -31], [30, -28.5]], heightM: 1100, halfWidthKm: 80 },
  { path: [[-8, 31], [-3, 33], [3, 36]], heightM: 1700, halfWidthKm: 120 },
  { path: [[146, -38], [149, -35.5], [151, -32], [150.5, -27], [146, -18]], heightM: 800, halfWidthKm: 120 },
  { path: [[167.5, -45.5], [170.5, -43.5], [173, -41.5]], heightM: 1700, halfWidthKm: 60 },
  { path: [[131, 33], [137, 36], [140.5, 39], [142, 43]], heightM: 1100, halfWidthKm: 80 },
  { path: [[59, 50], [60, 60], [64, 67]], heightM: 600, halfWidthKm: 100 },
  { path: [[138, -4], [144, -6], [147, -7.5]], heightM: 2200, halfWidthKm: 70 },
];

const PLATEAUS: Plateau[] = [
  { lon: 84, lat: 33.5, radiusKm: 600, heightM: 4300 },
  { lon: 94, lat: 33, radiusKm: 650, heightM: 4300 },
  { lon: 103, lat: 46, radiusKm: 900, heightM: 1300 },
  { lon: 55, lat: 32, radiusKm: 700, heightM: 1100 },
  { lon: 35, lat: 39, radiusKm: 450, heightM: 1000 },
  { lon: 39, lat: 9, radiusKm: 450, heightM: 2000 },
  { lon: 36, lat: -2, radiusKm: 650, heightM: 1300 },
  { lon: 25, lat: -26, radiusKm: 900, heightM: 1100 },
  { lon: -47, lat: -17, radiusKm: 800, heightM: 800 },
  { lon: -62, lat: 5, radiusKm: 300, heightM: 700 },
  { lon: -41, lat: 72, radiusKm: 750, heightM: 2500 },
  { lon: 77, lat: 17, radiusKm: 600, heightM: 550 },
  { lon: 103, lat: 26, radiusKm: 400, heightM: 1700 },
  { lon: -110, lat: 40, radiusKm: 500, heightM: 1000 },
];

/** Distance (km) from a point to a polyline, in a local equirectangular plane (fine for a toy). */
function polylineKm(lon: number, lat: number, path: Pt[]): number {
  const kx = 111.19 * Math.cos((lat * Math.PI) / 180);
  const ky = 111.19;
  let best = Infinity;
  for (let i = 1; i < path.length; i++) {
    const ax = (path[i - 1][0] - lon) * kx;
    const ay = (path[i - 1][1] - lat) * ky;
    const bx = (path[i][0] - lon) * kx;
    const by = (path[i][1] - lat) * ky;
    const dx = bx - ax;
    const dy = by - ay;
    const len2 = dx * dx + dy * dy;
    const t = len2 > 0 ? Math.max(0, Math.min(1, -(ax * dx + ay * dy) / len2)) : 0;
    const d = Math.hypot(ax + t * dx, ay + t * dy);
    if (d < best) best = d;
  }
  return best;
}

export interface Terrain {
  /** Invented elevation (m above sea level, ≥ 0) at a land point `coastKm` from the coast. */
  elevationM(lon: number, lat: number, coastKm: number): number;
}

/** The demo terrain for a seed (its random hills depend on the seed). */
export function makeTerrain(seed: number): Terrain {
  const rng = Rng.derive(seed, "terrain");
  const hills = Array.from({ length: 80 }, () => ({
    lon: rng.uniform(-180, 180),
    lat: (Math.asin(rng.uniform(-1, 1)) * 180) / Math.PI,
    sigmaKm: rng.uniform(80, 300),
    heightM: rng.uniform(100, 600),
  }));
  return {
    elevationM(lon, lat, coastKm) {
      // Lowlands rise gently inland: 30 m at the coast to ~280 m far inland.
      const base = 30 + 250 * (1 - Math.exp(-coastKm / 500));
      let relief = 0;
      for (const r of RIDGES) {
        const d = polylineKm(lon, lat, r.path);
        if (d < 4 * r.halfWidthKm) relief += r.heightM * Math.exp(-((d / r.halfWidthKm) ** 2));
      }
      for (const p of PLATEAUS) {
        const d = greatCircleKm(lon, lat, p.lon, p.lat);
        if (d < 3 * p.radiusKm) relief += p.heightM / (1 + (d / p.radiusKm) ** 8);
      }
      for (const h of hills) {
        const d = greatCircleKm(lon, lat, h.lon, h.lat);
        if (d < 4 * h.sigmaKm) relief += h.heightM * Math.exp(-0.5 * (d / h.sigmaKm) ** 2);
      }
      // Relief fades towards the coast over a few tens of km.
      const taper = 1 - Math.exp(-coastKm / 25);
      return Math.round(Math.min(5400, Math.max(1, base + taper * relief)));
    },
  };
}
