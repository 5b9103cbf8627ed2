// Making lon/lat rings and lines safe for planar use across the ±180° meridian.
//
// world-atlas stores Natural Earth outlines "stitched" for spherical renderers: a ring
// that crosses the antimeridian (Fiji, Chukotka/Eurasia, Wrangel Island) jumps from
// +180 to −180 in one edge, and Antarctica is a ring that runs once around the South
// Pole. Drawn on a flat lon/lat or Mercator map such edges become stray lines across
// the world, and planar point-in-polygon gives wrong answers near them. Here rings are
// unwrapped (longitudes made continuous), polar rings are closed through the pole, and
// the result is clipped into the strips [−180+360k, 180+360k] and shifted back, so every
// output ring lies inside [−180, 180] and no edge spans more than 180° of longitude.

export type LonLat = [number, number];

/** A planar ring piece and the 360° strip (k) it came from, before shifting back. */
export interface RingPiece {
  k: number;
  /** Closed ring (first position repeated at the end), longitudes in [−180, 180]. */
  ring: LonLat[];
}

/** Rings that lie entirely within this distance of a pole (degrees) are degenerate caps. */
const POLAR_CAP_DEG = 0.01;

function openRing(ring: readonly (readonly number[])[]): LonLat[] {
  const out: LonLat[] = [];
  for (const p of ring) {
    const q: LonLat = [p[0], p[1]];
    const last = out[out.length - 1];
    if (last && last[0] === q[0] && last[1] === q[1]) continue;
    out.push(q);
  }
  if (out.length > 1) {
    const a = out[0];
    const b = out[out.length - 1];
    if (a[0] === b[0] && a[1] === b[1]) out.pop();
  }
  return out;
}

function wrapStep(d: number): number {
  if (d > 180) return d - 360;
  if (d < -180) return d + 360;
  return d;
}

/** Signed planar area (shoelace) of an open ring, degrees². */
export function ringArea(ring: readonly LonLat[]): number {
  let a = 0;
  const n = ring.length;
  for (let i = 0, j = n - 1; i < n; j = i++) a += (ring[j][0] - ring[i][0]) * (ring[j][1] + ring[i][1]);
  return a / 2;
}

/** True for the tiny rings around a pole that stitched data uses to close polar polygons. */
export function isPolarCap(ring: readonly (readonly number[])[]): boolean {
  return ring.every((p) => Math.abs(p[1]) > 90 - POLAR_CAP_DEG);
}

// Sutherland–Hodgman clipping against one vertical line (Sutherland & Hodgman 1974,
// CACM 17:32–42) [mem]. Against a convex region (a strip) it keeps the winding number of
// every point inside the strip; it may add zero-width bridges along the cut line, which
// neither even-odd filling nor rendering notices.
function clipX(pts: LonLat[], x0: number, keepGreater: boolean): LonLat[] {
  const out: LonLat[] = [];
  const n = pts.length;
  if (n === 0) return out;
  const inside = (p: LonLat) => (keepGreater ? p[0] >= x0 : p[0] <= x0);
  let prev = pts[n - 1];
  let prevIn = inside(prev);
  for (let i = 0; i < n; i++) {
    const cur = pts[i];
    const curIn = inside(cur);
    if (curIn !== prevIn) {
      const t = (x0 - prev[0]) / (cur[0] - prev[0]);
      out.push([x0, prev[1] + t * (cur[1] - prev[1])]);
    }
    if (curIn) out.push(cur);
    prev = cur;
    prevIn = curIn;
  }
  return out;
}

function dedupe(pts: LonLat[]): LonLat[] {
  const out: LonLat[] = [];
  for (const p of pts) {
    const last = out[out.length - 1];
    if (last && last[0] === p[0] && last[1] === p[1]) continue;
    out.push(p);
  }
  while (out.length > 1 && out[0][0] === out[out.length - 1][0] && out[0][1] === out[out.length - 1][1]) out.pop();
  return out;
}

/**
 * Split one ring (GeoJSON positions, open or closed, longitudes in [−180, 180]) into
 * planar pieces inside [−180, 180]. A ring that goes once around a pole is closed
 * through that pole (the pole is chosen by the ring's mean latitude). Degenerate polar
 * caps (all points within 0.01° of a pole) yield nothing.
 */
export function splitRing(ring: readonly (readonly number[])[]): RingPiece[] {
  if (isPolarCap(ring)) return [];
  const open = openRing(ring);
  const n = open.length;
  if (n < 3) return [];
  // Unwrap with whole turns (off·360) so unchanged vertices keep their exact values.
  const u: LonLat[] = [[open[0][0], open[0][1]]];
  let crosses = false;
  let off = 0;
  for (let i = 1; i < n; i++) {
    const raw = open[i][0] - open[i - 1][0];
    if (raw > 180) off--;
    else if (raw < -180) off++;
    if (wrapStep(raw) !== raw) crosses = true;
    u.push([open[i][0] + 360 * off, open[i][1]]);
  }
  const closeRaw = open[0][0] - open[n - 1][0];
  const closeStep = wrapStep(closeRaw);
  if (closeStep !== closeRaw) crosses = true;
  const total = u[n - 1][0] + closeStep - u[0][0];
  if (!crosses) return [{ k: 0, ring: close(open) }];

  let pts = u;
  if (Math.abs(total) > 180) {
    // Encircles a pole: walk to the pole along the closing meridian and back.
    const meanLat = open.reduce((s, p) => s + p[1], 0) / n;
    const pole = meanLat < 0 ? -90 : 90;
    const endLon = u[0][0] + total;
    pts = [...u, [endLon, u[0][1]]];
    // Along the pole in steps of at most 45° so that no edge spans half the map.
    const steps = Math.ceil(Math.abs(total) / 45);
    for (let s = 0; s <= steps; s++) pts.push([endLon - (total * s) / steps, pole]);
  }
  let minX = Infinity;
  let maxX = -Infinity;
  for (const p of pts) {
    if (p[0] < minX) minX = p[0];
    if (p[0] > maxX) maxX = p[0];
  }
  const out: RingPiece[] = [];
  const kMin = Math.floor((minX + 180) / 360);
  const kMax = Math.floor((maxX + 180) / 360);
  for (let k = kMin; k <= kMax; k++) {
    const lo = -180 + 360 * k;
    const hi = 180 + 360 * k;
    const clipped = dedupe(clipX(clipX(pts, lo, true), hi, false));
    if (clipped.length < 3 || Math.abs(ringArea(clipped)) < 1e-12) continue;
    const shifted: LonLat[] = clipped.map((p) => [p[0] - 360 * k, p[1]]);
    out.push({ k, ring: close(shifted) });
  }
  return out;
}

function close(open: LonLat[]): LonLat[] {
  const out = open.slice();
  out.push([open[0][0], open[0][1]]);
  return out;
}

/**
 * Split one polygon (outer ring + holes) into planar polygons inside [−180, 180]:
 * one polygon per 360° strip the unwrapped outer ring touches, holes going with the
 * strip they fall in.
 */
export function splitPolygon(polygon: readonly (readonly (readonly number[])[])[]): LonLat[][][] {
  if (polygon.length === 0) return [];
  const outers = splitRing(polygon[0]);
  if (outers.length === 1) {
    return [[outers[0].ring, ...polygon.slice(1).flatMap((h) => splitRing(h).map((p) => p.ring))]];
  }
  const out: LonLat[][][] = outers.map((o) => [o.ring]);
  // Each hole piece goes with the outer piece that contains it (tested at one of its
  // vertices that is not on the ±180 cut).
  for (const h of polygon.slice(1)) {
    for (const piece of splitRing(h)) {
      const probe = piece.ring.find((p) => Math.abs(p[0]) !== 180) ?? piece.ring[0];
      const owner = outers.findIndex((o) => pointInRing(probe[0], probe[1], o.ring));
      if (owner >= 0) out[owner].push(piece.ring);
    }
  }
  return out;
}

/** Planar even-odd point-in-ring test (crossing number) [trade]. */
function pointInRing(x: number, y: number, ring: readonly LonLat[]): boolean {
  let odd = false;
  for (let i = 0, j = ring.length - 1; i < ring.length; j = i++) {
    const [xi, yi] = ring[i];
    const [xj, yj] = ring[j];
    if (yi > y !== yj > y && xi + ((y - yi) * (xj - xi)) / (yj - yi) > x) odd = !odd;
  }
  return odd;
}

/**
 * Turn a ring into coastline polylines: cut where it crosses ±180 (interpolating the
 * crossing latitude), and drop edges that run along ±180 itself (cuts made by the data's
 * producer, not coast). Degenerate polar caps give nothing.
 */
export function ringToCoastLines(ring: readonly (readonly number[])[]): LonLat[][] {
  if (isPolarCap(ring)) return [];
  const pts = ring.map((p): LonLat => [p[0], p[1]]);
  if (pts.length < 2) return [];
  // Make sure the ring is closed so its closing edge is coast too.
  const a = pts[0];
  const b = pts[pts.length - 1];
  if (a[0] !== b[0] || a[1] !== b[1]) pts.push([a[0], a[1]]);

  const lines: LonLat[][] = [];
  let cur: LonLat[] = [pts[0]];
  let cutAnywhere = false;
  const push = (p: LonLat) => {
    const last = cur[cur.length - 1];
    if (last && last[0] === p[0] && last[1] === p[1]) return;
    cur.push(p);
  };
  const flush = () => {
    if (cur.length >= 2) lines.push(cur);
    cur = [];
  };
  for (let i = 1; i < pts.length; i++) {
    const p = pts[i - 1];
    const q = pts[i];
    const onSeam = Math.abs(p[0]) === 180 && Math.abs(q[0]) === 180;
    if (onSeam) {
      cutAnywhere = true;
      flush();
      cur = [q];
      continue;
    }
    const raw = q[0] - p[0];
    if (Math.abs(raw) > 180) {
      cutAnywhere = true;
      const qx = q[0] - 360 * Math.sign(raw);
      const b = p[0] >= 0 ? 180 : -180;
      const t = (b - p[0]) / (qx - p[0]);
      const y = p[1] + t * (q[1] - p[1]);
      push([b, y]);
      flush();
      cur = [[-b, y]];
      push(q);
      continue;
    }
    push(q);
  }
  flush();
  // A cut ring starts mid-line: join the last piece to the first when they meet.
  if (cutAnywhere && lines.length >= 2) {
    const first = lines[0];
    const last = lines[lines.length - 1];
    const e = last[last.length - 1];
    if (e[0] === first[0][0] && e[1] === first[0][1]) {
      lines[0] = [...last, ...first.slice(1)];
      lines.pop();
    }
  }
  return lines;
}
