// Land outlines from the bundled Natural Earth data (world-atlas 2.0.2, TopoJSON,
// converted with topojson-client), made antimeridian-safe, with a latitude-band edge
// index for fast even-odd point-in-polygon tests and scanline land masks.
//
// Which scale: 1:50m ("50m", the default) for every computation: ~60,000 vertices a few
// km apart, islands down to a few km across, and it loads and indexes in a fraction of
// a second. 1:110m ("110m", ~5,000 vertices) drops most small islands and cuts capes by
// tens of km — too coarse for a 0.25° (≈28 km) grid or an "is this collector on land"
// check — but is ~10× smaller, so it is offered for light basemaps. 1:10m (3 MB) adds
// detail far below a 0.25° cell at several times the cost.

import type { Feature, FeatureCollection, MultiLineString, MultiPolygon, Polygon } from "geojson";
import { feature } from "topojson-client";
import type { GeometryCollection, Topology } from "topojson-specification";
import land110 from "world-atlas/land-110m.json";
import land50 from "world-atlas/land-50m.json";
import { ringToCoastLines, splitPolygon, type LonLat } from "./antimeridian";

export type LandDetail = "50m" | "110m";

export const LAND_SOURCE =
  "Natural Earth land polygons (public domain) via the world-atlas 2.0.2 package; antimeridian-safe";

/** Height of one latitude band of the edge index, degrees. */
const BAND_DEG = 0.1;
const N_BANDS = Math.round(180 / BAND_DEG);

export interface LandModel {
  detail: LandDetail;
  /** Planar polygons (outer ring + holes, closed rings) inside [−180, 180]. */
  polygons: LonLat[][][];
  /** Coastline polylines, cut at ±180 (no edge spans more than 180° of longitude). */
  coastlines: LonLat[][];
  /** Non-horizontal polygon edges: x1, y1, x2, y2 (degrees). */
  ex1: Float64Array;
  ey1: Float64Array;
  ex2: Float64Array;
  ey2: Float64Array;
  /** CSR index: edges of band b are bandEdges[bandStart[b] .. bandStart[b + 1]). */
  bandStart: Uint32Array;
  bandEdges: Uint32Array;
}

function topologyFor(detail: LandDetail): Topology {
  // The JSON imports are plain objects; their inferred types are wider than Topology.
  return (detail === "50m" ? land50 : land110) as unknown as Topology;
}

function rawLandPolygons(detail: LandDetail): number[][][][] {
  const topo = topologyFor(detail);
  const fc = feature(topo, topo.objects.land as GeometryCollection) as FeatureCollection<MultiPolygon | Polygon>;
  const out: number[][][][] = [];
  for (const f of fc.features) {
    const g = f.geometry;
    if (g.type === "Polygon") out.push(g.coordinates);
    else for (const p of g.coordinates) out.push(p);
  }
  return out;
}

/** The land polygons exactly as world-atlas stores them (stitched; for tests and tools). */
export function rawLand(detail: LandDetail = "50m"): number[][][][] {
  return rawLandPolygons(detail);
}

/** Band index of a latitude (degrees, −90..90). */
export function bandOf(lat: number): number {
  const b = Math.floor((lat + 90) / BAND_DEG);
  return b < 0 ? 0 : b >= N_BANDS ? N_BANDS - 1 : b;
}

function build(detail: LandDetail): LandModel {
  const raw = rawLandPolygons(detail);
  const polygons: LonLat[][][] = [];
  const coastlines: LonLat[][] = [];
  for (const poly of raw) {
    for (const p of splitPolygon(poly)) polygons.push(p);
    for (const ring of poly) for (const line of ringToCoastLines(ring)) coastlines.push(line);
  }

  // Collect non-horizontal edges (horizontal edges never change a crossing count).
  const x1: number[] = [];
  const y1: number[] = [];
  const x2: number[] = [];
  const y2: number[] = [];
  for (const poly of polygons) {
    for (const ring of poly) {
      for (let i = 1; i < ring.length; i++) {
        const a = ring[i - 1];
        const b = ring[i];
        if (a[1] === b[1]) continue;
        x1.push(a[0]);
        y1.push(a[1]);
        x2.push(b[0]);
        y2.push(b[1]);
      }
    }
  }
  const m = x1.length;
  const counts = new Uint32Array(N_BANDS + 1);
  for (let e = 0; e < m; e++) {
    const lo = bandOf(Math.min(y1[e], y2[e]));
    const hi = bandOf(Math.max(y1[e], y2[e]));
    for (let b = lo; b <= hi; b++) counts[b + 1]++;
  }
  for (let b = 0; b < N_BANDS; b++) counts[b + 1] += counts[b];
  const bandStart = counts.slice();
  const fill = counts.slice(0, N_BANDS);
  const bandEdges = new Uint32Array(bandStart[N_BANDS]);
  for (let e = 0; e < m; e++) {
    const lo = bandOf(Math.min(y1[e], y2[e]));
    const hi = bandOf(Math.max(y1[e], y2[e]));
    for (let b = lo; b <= hi; b++) bandEdges[fill[b]++] = e;
  }
  return {
    detail,
    polygons,
    coastlines,
    ex1: Float64Array.from(x1),
    ey1: Float64Array.from(y1),
    ex2: Float64Array.from(x2),
    ey2: Float64Array.from(y2),
    bandStart,
    bandEdges,
  };
}

const models = new Map<LandDetail, LandModel>();

/** The land model for a detail level, built once per process on first use. */
export function landModel(detail: LandDetail = "50m"): LandModel {
  let m = models.get(detail);
  if (!m) {
    m = build(detail);
    models.set(detail, m);
  }
  return m;
}

const geojsonCache = new Map<LandDetail, FeatureCollection<MultiPolygon>>();

/**
 * Land as GeoJSON for a basemap or for turf: one MultiPolygon feature, every ring
 * inside [−180, 180] and closed, antimeridian-safe. The same object is returned on
 * every call — treat it as read-only.
 */
export function landGeoJSON(opts: { detail?: LandDetail } = {}): FeatureCollection<MultiPolygon> {
  const detail = opts.detail ?? "50m";
  let fc = geojsonCache.get(detail);
  if (!fc) {
    const m = landModel(detail);
    const f: Feature<MultiPolygon> = {
      type: "Feature",
      properties: { name: "land", detail, source: LAND_SOURCE },
      geometry: { type: "MultiPolygon", coordinates: m.polygons },
    };
    fc = { type: "FeatureCollection", features: [f] };
    geojsonCache.set(detail, fc);
  }
  return fc;
}

/** Coastline polylines (lon/lat), cut at ±180. Treat as read-only. */
export function coastlines(opts: { detail?: LandDetail } = {}): readonly (readonly LonLat[])[] {
  return landModel(opts.detail ?? "50m").coastlines;
}

/** Coastlines as one GeoJSON MultiLineString feature (for drawing outlines). */
export function coastlinesGeoJSON(opts: { detail?: LandDetail } = {}): Feature<MultiLineString> {
  const detail = opts.detail ?? "50m";
  return {
    type: "Feature",
    properties: { name: "coastline", detail, source: LAND_SOURCE },
    geometry: { type: "MultiLineString", coordinates: landModel(detail).coastlines },
  };
}
