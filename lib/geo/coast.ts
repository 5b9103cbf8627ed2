// Great-circle distance from a point to the nearest coastline segment.
//
// Accuracy: exact on the sphere (radius 6371.0088 km) for the segments of the bundled
// 1:50m coastline, treating each segment as a great-circle arc between its vertices.
// Against the true coast the error is dominated by the outline's generalisation (a few
// km; small islands below the 1:50m scale are missing) plus ≤ ~0.5% for using a sphere
// instead of the WGS84 ellipsoid [trade]. Good for "coastal or inland" and
// continentality, not for surveying.
//
// Search: the coastline segments, in their drawing order (which keeps neighbours
// together), are packed 8 to a leaf and 8 nodes to a parent with lon/lat bounding boxes;
// a best-first search ordered by a lower bound of the great-circle distance to each box
// visits only the few boxes that can hold the nearest segment.

import { landModel, type LandDetail, type LandModel } from "./land";
import { assertLonLat, DEG, EARTH_RADIUS_KM, wrapLon } from "./sphere";

const NODE_SIZE = 8;
/** Padding of segment boxes (degrees): a great-circle arc bulges poleward of its ends. */
const BOX_PAD_DEG = 0.02;

interface CoastIndex {
  /** Per segment: unit vectors of the ends (a, b), the unit normal n of the arc, u = n×a, v = b×n. */
  seg: Float64Array; // 15 numbers per segment
  nSeg: number;
  /** Boxes in radians: minLon, minLat, maxLon, maxLat per node. */
  box: Float64Array;
  /** For node i: first child, child count; children are segments when i < nLeaves. */
  first: Uint32Array;
  count: Uint32Array;
  nLeaves: number;
  root: number;
}

const indexes = new Map<LandDetail, CoastIndex>();

function unit(lonDeg: number, latDeg: number, out: Float64Array, o: number): void {
  const l = lonDeg * DEG;
  const p = latDeg * DEG;
  const c = Math.cos(p);
  out[o] = c * Math.cos(l);
  out[o + 1] = c * Math.sin(l);
  out[o + 2] = Math.sin(p);
}

function buildIndex(m: LandModel): CoastIndex {
  let nSeg = 0;
  for (const line of m.coastlines) nSeg += line.length - 1;
  const seg = new Float64Array(nSeg * 15);
  const segBox = new Float64Array(nSeg * 4);
  let s = 0;
  for (const line of m.coastlines) {
    for (let i = 1; i < line.length; i++, s++) {
      const [lon1, lat1] = line[i - 1];
      const [lon2, lat2] = line[i];
      const o = s * 15;
      unit(lon1, lat1, seg, o);
      unit(lon2, lat2, seg, o + 3);
      const ax = seg[o], ay = seg[o + 1], az = seg[o + 2];
      const bx = seg[o + 3], by = seg[o + 4], bz = seg[o + 5];
      let nx = ay * bz - az * by;
      let ny = az * bx - ax * bz;
      let nz = ax * by - ay * bx;
      const len = Math.hypot(nx, ny, nz);
      if (len > 1e-15) {
        nx /= len;
        ny /= len;
        nz /= len;
      } else {
        nx = ny = nz = 0; // degenerate segment: ends only
      }
      seg[o + 6] = nx;
      seg[o + 7] = ny;
      seg[o + 8] = nz;
      // u = n × a, v = b × n: the foot of the perpendicular lies on the arc iff p·u ≥ 0 and p·v ≥ 0.
      seg[o + 9] = ny * az - nz * ay;
      seg[o + 10] = nz * ax - nx * az;
      seg[o + 11] = nx * ay - ny * ax;
      seg[o + 12] = by * nz - bz * ny;
      seg[o + 13] = bz * nx - bx * nz;
      seg[o + 14] = bx * ny - by * nx;
      const b = s * 4;
      segBox[b] = (Math.min(lon1, lon2) - BOX_PAD_DEG) * DEG;
      segBox[b + 1] = (Math.min(lat1, lat2) - BOX_PAD_DEG) * DEG;
      segBox[b + 2] = (Math.max(lon1, lon2) + BOX_PAD_DEG) * DEG;
      segBox[b + 3] = (Math.max(lat1, lat2) + BOX_PAD_DEG) * DEG;
    }
  }
  // Pack the tree bottom-up.
  const boxes: number[] = [];
  const first: number[] = [];
  const count: number[] = [];
  const addNode = (childBoxes: Float64Array | number[], from: number, n: number) => {
    let a = Infinity, b = Infinity, c = -Infinity, d = -Infinity;
    for (let i = from; i < from + n; i++) {
      a = Math.min(a, childBoxes[i * 4]);
      b = Math.min(b, childBoxes[i * 4 + 1]);
      c = Math.max(c, childBoxes[i * 4 + 2]);
      d = Math.max(d, childBoxes[i * 4 + 3]);
    }
    boxes.push(a, b, c, d);
    first.push(from);
    count.push(n);
  };
  for (let i = 0; i < nSeg; i += NODE_SIZE) addNode(segBox, i, Math.min(NODE_SIZE, nSeg - i));
  const nLeaves = first.length;
  let levelStart = 0;
  let levelEnd = nLeaves;
  while (levelEnd - levelStart > 1) {
    for (let i = levelStart; i < levelEnd; i += NODE_SIZE) addNode(boxes, i, Math.min(NODE_SIZE, levelEnd - i));
    levelStart = levelEnd;
    levelEnd = first.length;
  }
  return {
    seg,
    nSeg,
    box: Float64Array.from(boxes),
    first: Uint32Array.from(first),
    count: Uint32Array.from(count),
    nLeaves,
    root: first.length - 1,
  };
}

function coastIndex(detail: LandDetail): CoastIndex {
  let ix = indexes.get(detail);
  if (!ix) {
    ix = buildIndex(landModel(detail));
    indexes.set(detail, ix);
  }
  return ix;
}

/** |a − b| wrapped into [0, π] (radians). */
function lonGap(a: number, b: number): number {
  let d = Math.abs(a - b) % (2 * Math.PI);
  if (d > Math.PI) d = 2 * Math.PI - d;
  return d;
}

/**
 * Lower bound of the central angle from the point (lon λ, lat φ; sinφ, cosφ given) to any
 * point of a lon/lat box. Inside the box's longitudes the meridian distance bounds it;
 * outside, the nearest edge meridian does: over latitude ψ, cos d = sinφ·sinψ +
 * cosφ·cosψ·cosΔλ peaks at ψ* = atan2(sinφ, cosφ·cosΔλ) or at an end of [ψmin, ψmax].
 */
function boxAngle(lam: number, phi: number, sinP: number, cosP: number, box: Float64Array, o: number): number {
  const minLon = box[o], minLat = box[o + 1], maxLon = box[o + 2], maxLat = box[o + 3];
  if (lam >= minLon && lam <= maxLon) {
    if (phi < minLat) return minLat - phi;
    if (phi > maxLat) return phi - maxLat;
    return 0;
  }
  const dl = Math.min(lonGap(lam, minLon), lonGap(lam, maxLon));
  const A = sinP;
  const B = cosP * Math.cos(dl);
  const psi = Math.atan2(A, B);
  let best: number;
  if (psi >= minLat && psi <= maxLat) best = Math.hypot(A, B);
  else best = Math.max(A * Math.sin(minLat) + B * Math.cos(minLat), A * Math.sin(maxLat) + B * Math.cos(maxLat));
  return Math.acos(Math.max(-1, Math.min(1, best)));
}

/** Central angle between unit vector p and the arc of segment s. */
function segAngle(px: number, py: number, pz: number, seg: Float64Array, s: number): number {
  const o = s * 15;
  const nx = seg[o + 6], ny = seg[o + 7], nz = seg[o + 8];
  if (nx !== 0 || ny !== 0 || nz !== 0) {
    const onU = px * seg[o + 9] + py * seg[o + 10] + pz * seg[o + 11];
    const onV = px * seg[o + 12] + py * seg[o + 13] + pz * seg[o + 14];
    if (onU >= 0 && onV >= 0) {
      const pn = px * nx + py * ny + pz * nz;
      return Math.asin(Math.min(1, Math.abs(pn)));
    }
  }
  // Nearest end: central angle from the chord, 2·asin(chord/2), precise at small angles.
  const da = Math.hypot(px - seg[o], py - seg[o + 1], pz - seg[o + 2]);
  const db = Math.hypot(px - seg[o + 3], py - seg[o + 4], pz - seg[o + 5]);
  return 2 * Math.asin(Math.min(1, Math.min(da, db) / 2));
}

/** A small binary min-heap of (priority, node). */
class Heap {
  private pri: number[] = [];
  private val: number[] = [];
  get size(): number {
    return this.pri.length;
  }
  push(p: number, v: number): void {
    const pri = this.pri;
    const val = this.val;
    let i = pri.length;
    pri.push(p);
    val.push(v);
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (pri[parent] <= p) break;
      pri[i] = pri[parent];
      val[i] = val[parent];
      i = parent;
    }
    pri[i] = p;
    val[i] = v;
  }
  peekPriority(): number {
    return this.pri[0];
  }
  pop(): number {
    const pri = this.pri;
    const val = this.val;
    const top = val[0];
    const lastP = pri.pop()!;
    const lastV = val.pop()!;
    const n = pri.length;
    if (n > 0) {
      let i = 0;
      for (;;) {
        const l = 2 * i + 1;
        if (l >= n) break;
        const r = l + 1;
        const c = r < n && pri[r] < pri[l] ? r : l;
        if (pri[c] >= lastP) break;
        pri[i] = pri[c];
        val[i] = val[c];
        i = c;
      }
      pri[i] = lastP;
      val[i] = lastV;
    }
    return top;
  }
}

/**
 * Great-circle distance (km) from (lon, lat) to the nearest point of the coastline,
 * whether the point is on land or at sea. See the accuracy note at the top of this file.
 */
export function distanceToCoastKm(lon: number, lat: number, opts: { detail?: LandDetail } = {}): number {
  assertLonLat(lon, lat);
  const ix = coastIndex(opts.detail ?? "50m");
  if (ix.nSeg === 0) return Infinity;
  const lam = wrapLon(lon) * DEG;
  const phi = lat * DEG;
  const sinP = Math.sin(phi);
  const cosP = Math.cos(phi);
  const px = cosP * Math.cos(lam);
  const py = cosP * Math.sin(lam);
  const pz = sinP;
  let best = Infinity;
  const heap = new Heap();
  heap.push(boxAngle(lam, phi, sinP, cosP, ix.box, ix.root * 4), ix.root);
  while (heap.size > 0 && heap.peekPriority() < best) {
    const node = heap.pop();
    const f = ix.first[node];
    const n = ix.count[node];
    if (node < ix.nLeaves) {
      for (let s = f; s < f + n; s++) {
        const a = segAngle(px, py, pz, ix.seg, s);
        if (a < best) best = a;
      }
    } else {
      for (let c = f; c < f + n; c++) {
        const lb = boxAngle(lam, phi, sinP, cosP, ix.box, c * 4);
        if (lb < best) heap.push(lb, c);
      }
    }
  }
  return best * EARTH_RADIUS_KM;
}
