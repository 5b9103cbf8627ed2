// Brute-force reference for "is this point on land", built straight from the stitched
// world-atlas polygons with @turf/turf and NONE of lib/geo's antimeridian code:
// - an ordinary polygon: turf.booleanPointInPolygon on its raw coordinates;
// - a polygon whose rings cross ±180 (Fiji, Eurasia/Chukotka, Wrangel Island): each ring
//   unwrapped to continuous longitudes, the point tried at lon, lon ± 360;
// - the polygon that runs around the South Pole (Antarctica): its coast ring projected to
//   a south-polar azimuthal plane (x, y) = (90 + lat)·(cos lon, sin lon), where it is an
//   ordinary closed ring around the origin (its degenerate polar-cap ring is ignored).
// Straight edges differ slightly between these planes, so callers skip points within a
// few km of the coast.
import * as turf from "@turf/turf";
import { rawLand, type LandDetail } from "@/lib/geo";

type Ring = number[][];
interface RefPoly {
  kind: "plain" | "crossing" | "polar";
  rings: Ring[];
  minX: number;
  maxX: number;
  minY: number;
  maxY: number;
  feature: ReturnType<typeof turf.polygon>;
}

function crossings(r: Ring): number {
  let c = 0;
  for (let i = 1; i < r.length; i++) if (Math.abs(r[i][0] - r[i - 1][0]) > 180) c++;
  return c;
}

function unwrap(r: Ring): Ring {
  const out: Ring = [[r[0][0], r[0][1]]];
  let off = 0;
  for (let i = 1; i < r.length; i++) {
    const d = r[i][0] - r[i - 1][0];
    if (d > 180) off -= 360;
    if (d < -180) off += 360;
    out.push([r[i][0] + off, r[i][1]]);
  }
  return out;
}

function bbox(rings: Ring[]) {
  let minX = Infinity, maxX = -Infinity, minY = Infinity, maxY = -Infinity;
  for (const r of rings)
    for (const [x, y] of r) {
      minX = Math.min(minX, x);
      maxX = Math.max(maxX, x);
      minY = Math.min(minY, y);
      maxY = Math.max(maxY, y);
    }
  return { minX, maxX, minY, maxY };
}

const polar = (lon: number, lat: number): number[] => {
  const r = 90 + lat;
  const t = (lon * Math.PI) / 180;
  return [r * Math.cos(t), r * Math.sin(t)];
};

export function buildReference(detail: LandDetail = "50m"): (lon: number, lat: number) => boolean {
  const polys: RefPoly[] = [];
  for (const poly of rawLand(detail)) {
    const outer = poly[0];
    const c = crossings(outer);
    if (c % 2 === 1) {
      const ring = outer.map(([x, y]) => polar(x, y));
      if (ring[0][0] !== ring[ring.length - 1][0] || ring[0][1] !== ring[ring.length - 1][1]) ring.push(ring[0]);
      const b = bbox([outer]);
      polys.push({ kind: "polar", rings: [ring], ...b, feature: turf.polygon([ring]) });
    } else if (c > 0 || poly.slice(1).some((h) => crossings(h) > 0)) {
      // Unwrap every ring, then move each hole by whole turns into the outer ring's frame.
      const outerU = unwrap(outer);
      const ob = bbox([outerU]);
      const rings = [
        outerU,
        ...poly.slice(1).map((h) => {
          const hu = unwrap(h);
          const mean = hu.reduce((s, p) => s + p[0], 0) / hu.length;
          let shift = 0;
          while (mean + shift > ob.maxX) shift -= 360;
          while (mean + shift < ob.minX) shift += 360;
          return hu.map(([x, y]) => [x + shift, y]);
        }),
      ];
      polys.push({ kind: "crossing", rings, ...bbox(rings), feature: turf.polygon(rings) });
    } else {
      polys.push({ kind: "plain", rings: poly, ...bbox(poly), feature: turf.polygon(poly) });
    }
  }
  return (lon: number, lat: number) => {
    for (const p of polys) {
      if (p.kind === "polar") {
        if (lat > p.maxY) continue;
        if (turf.booleanPointInPolygon(polar(lon, lat), p.feature)) return true;
        continue;
      }
      for (const x of p.kind === "crossing" ? [lon, lon + 360, lon - 360] : [lon]) {
        if (x < p.minX || x > p.maxX || lat < p.minY || lat > p.maxY) continue;
        if (turf.booleanPointInPolygon([x, lat], p.feature)) return true;
      }
    }
    return false;
  };
}

/** Random points uniform on the sphere (or in a lon/lat box, uniform in area). */
export function randomPoints(
  rand: () => number,
  n: number,
  box: { lonMin: number; lonMax: number; latMin: number; latMax: number } = {
    lonMin: -180,
    lonMax: 180,
    latMin: -90,
    latMax: 90,
  },
): [number, number][] {
  const s0 = Math.sin((box.latMin * Math.PI) / 180);
  const s1 = Math.sin((box.latMax * Math.PI) / 180);
  const out: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    const lon = box.lonMin + (box.lonMax - box.lonMin) * rand();
    const lat = (Math.asin(s0 + (s1 - s0) * rand()) * 180) / Math.PI;
    out.push([lon, lat]);
  }
  return out;
}
