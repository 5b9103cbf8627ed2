/**
 * A station set: the station coordinates with everything that can be computed once and shared
 * by every surface built on them — per-station trigonometry, the station × station distance
 * matrix, a spatial index and the exact n-nearest neighbour search.
 *
 * An edition has dozens of surfaces (periods × variables) over the same stations: build one
 * StationSet, pass it to every `createKrigingModel`, and search neighbours once per target
 * (`neighbourTable`) for all of them.
 */
import KDBush from "kdbush";
import {
  type CoordinateSystem,
  LONLAT_LOWER_BOUND_FACTOR,
  WGS84_A_KM,
  WGS84_F,
  greatCircleKmTrig,
  greatCircleKmUnit,
  normalizeLon,
} from "./distance";
import { GeostatsError } from "./errors";

const DEG = Math.PI / 180;
/** Local binding of the hot distance function (a direct call the JIT can inline). */
const gcTrig = greatCircleKmTrig;
const gcUnit = greatCircleKmUnit;
const A_KM = WGS84_A_KM;
const FLAT = WGS84_F;
const LBF = LONLAT_LOWER_BOUND_FACTOR;
/** kd-tree leaf size: small leaves mean few exact (expensive) distance evaluations. */
const NODE_SIZE = 8;
/** Absolute slack (km) subtracted from lon/lat lower bounds to absorb trigonometric round-off. */
const LONLAT_SLACK_KM = 1e-3;

/** Points as interleaved [x0, y0, x1, y1, …] or as a list of [x, y] pairs (extra entries ignored). */
export type PointsInput = Float64Array | ArrayLike<number> | ReadonlyArray<ReadonlyArray<number>>;

/** Read points into an interleaved Float64Array, checking that every coordinate is finite. */
export function readPoints(points: PointsInput, field: string): Float64Array {
  const first = (points as ArrayLike<unknown>).length > 0 ? (points as ArrayLike<unknown>)[0] : undefined;
  let out: Float64Array;
  if (first !== undefined && typeof first === "object" && first !== null) {
    const list = points as ReadonlyArray<ReadonlyArray<number>>;
    out = new Float64Array(list.length * 2);
    for (let i = 0; i < list.length; i++) {
      const p = list[i];
      if (!p || p.length < 2) throw new GeostatsError("invalid-input", `${field}[${i}] must have at least two coordinates`, field);
      out[2 * i] = p[0];
      out[2 * i + 1] = p[1];
    }
  } else {
    const flat = points as ArrayLike<number>;
    if (flat.length % 2 !== 0) throw new GeostatsError("invalid-input", `${field} must hold x, y pairs (even length)`, field);
    out = Float64Array.from(flat as ArrayLike<number>);
  }
  for (let i = 0; i < out.length; i++) {
    if (!Number.isFinite(out[i])) {
      throw new GeostatsError("invalid-input", `${field}[${i >> 1}] has a non-finite coordinate`, field);
    }
  }
  return out;
}

/**
 * Check and normalise coordinates in place: for "lonlat" the longitude goes to (−180, 180] and
 * the latitude must lie in [−90, 90].
 */
export function normaliseCoordinates(xy: Float64Array, coordinates: CoordinateSystem, field: string): void {
  if (coordinates !== "lonlat") return;
  for (let i = 0; i < xy.length; i += 2) {
    const lat = xy[i + 1];
    if (lat < -90 || lat > 90) {
      throw new GeostatsError("invalid-input", `${field}[${i >> 1}]: latitude ${lat} is outside [-90, 90]`, field);
    }
    xy[i] = normalizeLon(xy[i]);
  }
}

/** Neighbours of many targets: row t holds the k nearest stations of target t, nearest first. */
export interface NeighbourTable {
  /** Number of targets. */
  targets: number;
  /** Neighbours per target (min(requested k, number of stations)). */
  k: number;
  /** Station indices, row-major (targets × k), sorted by (distance, index). */
  index: Int32Array;
  /** Distances (km for lonlat, coordinate units for planar), aligned with `index`. */
  distance: Float64Array;
}

export interface StationSetOptions {
  coordinates: CoordinateSystem;
  points: PointsInput;
  /** A precomputed station × station distance matrix (e.g. shared with worker threads). */
  distanceMatrix?: Float64Array;
}

export class StationSet {
  readonly coordinates: CoordinateSystem;
  readonly count: number;
  /** Interleaved coordinates [x0, y0, …]; for lonlat x = longitude in (−180, 180], y = latitude. */
  readonly xy: Float64Array;
  readonly sinLat: Float64Array;
  readonly cosLat: Float64Array;
  readonly sinLon: Float64Array;
  readonly cosLon: Float64Array;
  /** Unit-sphere coordinates (lonlat only; empty for planar). */
  readonly ux: Float64Array;
  readonly uy: Float64Array;
  readonly uz: Float64Array;
  readonly index: KDBush;
  readonly tree: StationTree;
  /**
   * Position of each station in the kd-tree's order (spatially coherent): matrices stored in this
   * order keep a neighbourhood's rows and columns close together in memory.
   */
  readonly rank: Int32Array;
  private distances: Float64Array | null;
  private defaultSearcher: NeighbourSearcher | null = null;

  constructor(options: StationSetOptions) {
    if (options.coordinates !== "lonlat" && options.coordinates !== "planar") {
      throw new GeostatsError("invalid-input", `coordinates must be "lonlat" or "planar"`, "coordinates");
    }
    this.coordinates = options.coordinates;
    const xy = readPoints(options.points, "points");
    normaliseCoordinates(xy, this.coordinates, "points");
    this.xy = xy;
    const n = (this.count = xy.length / 2);
    if (n < 1) throw new GeostatsError("too-few-points", "points: at least one station is needed", "points");
    this.sinLat = new Float64Array(n);
    this.cosLat = new Float64Array(n);
    this.sinLon = new Float64Array(n);
    this.cosLon = new Float64Array(n);
    const m = this.coordinates === "lonlat" ? n : 0;
    this.ux = new Float64Array(m);
    this.uy = new Float64Array(m);
    this.uz = new Float64Array(m);
    if (this.coordinates === "lonlat") {
      for (let i = 0; i < n; i++) {
        const lon = xy[2 * i] * DEG;
        const lat = xy[2 * i + 1] * DEG;
        this.sinLat[i] = Math.sin(lat);
        this.cosLat[i] = Math.cos(lat);
        this.sinLon[i] = Math.sin(lon);
        this.cosLon[i] = Math.cos(lon);
        this.ux[i] = this.cosLat[i] * this.cosLon[i];
        this.uy[i] = this.cosLat[i] * this.sinLon[i];
        this.uz[i] = this.sinLat[i];
      }
    }
    const index = new KDBush(n, NODE_SIZE, Float64Array);
    for (let i = 0; i < n; i++) index.add(xy[2 * i], xy[2 * i + 1]);
    this.index = index.finish();
    this.tree = buildTree(this);
    this.rank = new Int32Array(n);
    for (let pos = 0; pos < n; pos++) this.rank[this.index.ids[pos]] = pos;
    if (options.distanceMatrix) {
      if (options.distanceMatrix.length !== n * n) {
        throw new GeostatsError("invalid-input", "distanceMatrix must have n × n entries", "distanceMatrix");
      }
      this.distances = options.distanceMatrix;
    } else {
      this.distances = null;
    }
  }

  /** Distance between stations i and j (km for lonlat). */
  stationDistance(i: number, j: number): number {
    if (this.distances) return this.distances[i * this.count + j];
    return this.computeStationDistance(i, j);
  }

  private computeStationDistance(i: number, j: number): number {
    const xy = this.xy;
    if (this.coordinates === "lonlat") {
      if (xy[2 * i] === xy[2 * j] && xy[2 * i + 1] === xy[2 * j + 1]) return 0;
      return gcTrig(
        this.sinLat[i],
        this.cosLat[i],
        this.sinLon[i],
        this.cosLon[i],
        this.sinLat[j],
        this.cosLat[j],
        this.sinLon[j],
        this.cosLon[j],
      );
    }
    const dx = xy[2 * i] - xy[2 * j];
    const dy = xy[2 * i + 1] - xy[2 * j + 1];
    return Math.sqrt(dx * dx + dy * dy);
  }

  /** The full symmetric station × station distance matrix (row-major n × n), computed once. */
  distanceMatrix(): Float64Array {
    if (this.distances) return this.distances;
    const n = this.count;
    const d = new Float64Array(n * n);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < i; j++) {
        const v = this.computeStationDistance(i, j);
        d[i * n + j] = v;
        d[j * n + i] = v;
      }
    }
    this.distances = d;
    return d;
  }

  /** Like distanceMatrix(), but stored in a SharedArrayBuffer so worker threads can reuse it. */
  sharedDistanceMatrix(): Float64Array {
    const d = this.distanceMatrix();
    if (d.buffer instanceof SharedArrayBuffer) return d;
    const shared = new Float64Array(new SharedArrayBuffer(d.byteLength));
    shared.set(d);
    this.distances = shared;
    return shared;
  }

  /** Pairs of stations at the same place (distance 0, or below 1 µm on the ellipsoid). */
  duplicatePairs(limit = 10): Array<[number, number]> {
    const n = this.count;
    const out: Array<[number, number]> = [];
    const tiny = this.coordinates === "lonlat" ? 1e-9 : 0;
    const d = this.distanceMatrix();
    for (let i = 0; i < n && out.length < limit; i++) {
      for (let j = i + 1; j < n && out.length < limit; j++) {
        if (d[i * n + j] <= tiny) out.push([i, j]);
      }
    }
    return out;
  }

  /** A searcher owned by this set (not thread-safe across concurrent callers; create more if needed). */
  searcher(): NeighbourSearcher {
    if (!this.defaultSearcher) this.defaultSearcher = new NeighbourSearcher(this);
    return this.defaultSearcher;
  }

  /**
   * The k nearest stations of every target ([x, y] interleaved), nearest first, ties broken by
   * station index. Computed once, it serves every model on this station set.
   */
  neighbourTable(targets: Float64Array, k: number, searcher: NeighbourSearcher = this.searcher()): NeighbourTable {
    const t = targets.length >> 1;
    const kk = Math.min(Math.max(1, Math.floor(k)), this.count);
    const index = new Int32Array(t * kk);
    const dist = new Float64Array(t * kk);
    for (let i = 0; i < t; i++) searcher.nearest(targets[2 * i], targets[2 * i + 1], kk, index, dist, i * kk);
    return { targets: t, k: kk, index, distance: dist };
  }
}

export function createStationSet(options: StationSetOptions): StationSet {
  return new StationSet(options);
}

/**
 * Exact k-nearest-neighbour search over a StationSet: best-first traversal of the station kd-tree
 * (kdbush, built on x/y or lon/lat) whose nodes carry the bounding box of their stations — in 3-D
 * unit-sphere coordinates for lonlat, so the bound is trigonometry-free and holds across the
 * antimeridian and at the poles. A node is skipped only when its box lies farther than the
 * current k-th neighbour could be (for lonlat: the chord of the angle (d_k + slack)/(a(1 − 2.5f)),
 * a safe lower bound of the ellipsoidal distance); every remaining candidate gets its exact
 * distance. Results are ordered by (distance, station index), so ties are broken by index. Holds
 * its own scratch buffers: one searcher per thread, no allocation per query.
 */
export class NeighbourSearcher {
  private readonly set: StationSet;
  private readonly lonlat: boolean;
  private readonly tree: StationTree;
  private readonly heap: Int32Array;
  private readonly heapKey: Float64Array;
  private heapSize = 0;
  // result max-heap
  private readonly resD: Float64Array;
  private readonly resI: Int32Array;
  private resSize = 0;
  private k = 0;
  // current target
  private tx = 0;
  private ty = 0;
  private tz = 0;
  private tLon = 0;
  private tLat = 0;
  private tSinLat = 0;
  private tCosLat = 0;
  private tSinLon = 0;
  private tCosLon = 0;
  /** Squared pruning radius: boxes and candidates beyond it cannot beat the current k-th neighbour. */
  private prune2 = Infinity;
  /** Per-station stamp of the query that already considered it (hint seeding). */
  private readonly seen: Int32Array;
  private stamp = 0;

  constructor(set: StationSet) {
    this.set = set;
    this.lonlat = set.coordinates === "lonlat";
    this.tree = set.tree;
    this.heap = new Int32Array(this.tree.count + 1);
    this.heapKey = new Float64Array(this.tree.count + 1);
    this.resD = new Float64Array(set.count);
    this.resI = new Int32Array(set.count);
    this.seen = new Int32Array(set.count);
  }

  private setTarget(x: number, y: number): void {
    if (this.lonlat) {
      if (!(y >= -90 && y <= 90)) throw new GeostatsError("invalid-input", `target latitude ${y} is outside [-90, 90]`, "targets");
      if (!Number.isFinite(x)) throw new GeostatsError("invalid-input", `target longitude ${x} is not a finite number`, "targets");
      const lon = normalizeLon(x);
      this.tLon = lon;
      this.tLat = y;
      this.tSinLat = Math.sin(y * DEG);
      this.tCosLat = Math.cos(y * DEG);
      this.tSinLon = Math.sin(lon * DEG);
      this.tCosLon = Math.cos(lon * DEG);
      this.tx = this.tCosLat * this.tCosLon;
      this.ty = this.tCosLat * this.tSinLon;
      this.tz = this.tSinLat;
    } else {
      if (!Number.isFinite(x) || !Number.isFinite(y)) throw new GeostatsError("invalid-input", "target coordinates must be finite numbers", "targets");
      this.tx = x;
      this.ty = y;
    }
  }

  /** Exact distance from the current target to station i. */
  private distanceTo(i: number): number {
    const s = this.set;
    if (this.lonlat) {
      if (s.xy[2 * i] === this.tLon && s.xy[2 * i + 1] === this.tLat) return 0;
      return gcUnit(
        this.tSinLat,
        this.tCosLat,
        this.tSinLon,
        this.tCosLon,
        this.tx,
        this.ty,
        this.tz,
        s.sinLat[i],
        s.cosLat[i],
        s.sinLon[i],
        s.cosLon[i],
        s.ux[i],
        s.uy[i],
        s.uz[i],
      );
    }
    const dx = s.xy[2 * i] - this.tx;
    const dy = s.xy[2 * i + 1] - this.ty;
    return Math.sqrt(dx * dx + dy * dy);
  }

  /**
   * Distances from (x, y) to every station in index order, written to out[offset … offset+n).
   * (For global neighbourhoods.)
   */
  all(x: number, y: number, out: Float64Array, offset = 0): void {
    this.setTarget(x, y);
    const s = this.set;
    const n = s.count;
    if (!this.lonlat) {
      for (let i = 0; i < n; i++) out[offset + i] = this.distanceTo(i);
      return;
    }
    // greatCircleKmUnit inlined over the station arrays (this loop dominates global kriging)
    const tx = this.tx;
    const ty = this.ty;
    const tz = this.tz;
    const ts = this.tSinLat;
    const ux = s.ux;
    const uy = s.uy;
    const uz = s.uz;
    const sl = s.sinLat;
    const twoA = 2 * A_KM;
    for (let i = 0; i < n; i++) {
      const dx = tx - ux[i];
      const dy = ty - uy[i];
      const dz = tz - uz[i];
      const S = 0.25 * (dx * dx + dy * dy + dz * dz);
      if (S < 1e-6 || S > 1 - 1e-6) {
        out[offset + i] = this.distanceTo(i);
        continue;
      }
      const C = 1 - S;
      const sp = 0.5 * (ts + sl[i]);
      const sm = 0.5 * (ts - sl[i]);
      const w = Math.atan(Math.sqrt(S / C));
      const R = Math.sqrt(S * C) / w;
      out[offset + i] = twoA * w * (1 + FLAT * (((3 * R - 1) / (2 * C)) * sp * sp - ((3 * R + 1) / (2 * S)) * sm * sm));
    }
  }

  /**
   * Writes the min(k, n) nearest stations of (x, y) to outIndex/outDist starting at `offset`,
   * nearest first (ties by station index). Returns the number written. An optional `hint` (k
   * station indices at hint[hintOffset …], e.g. the previous cell's neighbours) only speeds the
   * search up; the result is the same.
   */
  nearest(
    x: number,
    y: number,
    k: number,
    outIndex: Int32Array,
    outDist: Float64Array,
    offset = 0,
    hint?: Int32Array,
    hintOffset = 0,
  ): number {
    const set = this.set;
    const n = set.count;
    k = Math.min(k, n);
    this.setTarget(x, y);
    this.k = k;
    this.resSize = 0;
    this.heapSize = 0;
    this.prune2 = Infinity;
    const tree = this.tree;
    const ids = set.index.ids;
    // a new query stamp: stations seeded from the hint are not considered twice
    if (++this.stamp === 0x7fffffff) {
      this.seen.fill(0);
      this.stamp = 1;
    }
    if (hint) {
      // seed with a nearby target's neighbours (e.g. the previous grid cell): their exact
      // distances make the pruning radius tight from the start
      for (let j = 0; j < k; j++) {
        const i = hint[hintOffset + j];
        if (!(i >= 0 && i < n) || this.seen[i] === this.stamp) continue;
        this.seen[i] = this.stamp;
        this.consider(i);
      }
    }
    this.pushNode(0, 0);
    while (this.heapSize > 0) {
      const key = this.heapKey[0];
      const node = this.popNode();
      if (key > this.prune2) break;
      const left = tree.left[node];
      const right = tree.right[node];
      const a = tree.childA[node];
      if (a < 0) {
        for (let i = left; i <= right; i++) {
          const id = ids[i];
          if (this.seen[id] !== this.stamp) this.consider(id);
        }
        continue;
      }
      const mid = ids[(left + right) >> 1];
      if (this.seen[mid] !== this.stamp) this.consider(mid);
      const ka = this.boxDistance2(a);
      if (ka <= this.prune2) this.pushNode(a, ka);
      const b = tree.childB[node];
      if (b >= 0) {
        const kb = this.boxDistance2(b);
        if (kb <= this.prune2) this.pushNode(b, kb);
      }
    }
    const count = this.resSize;
    for (let pos = count - 1; pos >= 0; pos--) {
      outIndex[offset + pos] = this.resI[0];
      outDist[offset + pos] = this.resD[0];
      this.popResult();
    }
    return count;
  }

  /** Squared distance from the target to a node's box (3-D chord space for lonlat). */
  private boxDistance2(node: number): number {
    const t = this.tree;
    const o = node * t.dims;
    const lo = t.boxMin;
    const hi = t.boxMax;
    let d = 0;
    let v = this.tx < lo[o] ? lo[o] - this.tx : this.tx > hi[o] ? this.tx - hi[o] : 0;
    d += v * v;
    v = this.ty < lo[o + 1] ? lo[o + 1] - this.ty : this.ty > hi[o + 1] ? this.ty - hi[o + 1] : 0;
    d += v * v;
    if (t.dims === 3) {
      v = this.tz < lo[o + 2] ? lo[o + 2] - this.tz : this.tz > hi[o + 2] ? this.tz - hi[o + 2] : 0;
      d += v * v;
    }
    return d;
  }

  private consider(i: number): void {
    const set = this.set;
    const full = this.resSize === this.k;
    if (full) {
      // cheap pre-filter in the pruning metric
      let d2: number;
      if (this.lonlat) {
        const dx = set.ux[i] - this.tx;
        const dy = set.uy[i] - this.ty;
        const dz = set.uz[i] - this.tz;
        d2 = dx * dx + dy * dy + dz * dz;
      } else {
        const dx = set.xy[2 * i] - this.tx;
        const dy = set.xy[2 * i + 1] - this.ty;
        d2 = dx * dx + dy * dy;
      }
      if (d2 > this.prune2) return;
    }
    const d = this.distanceTo(i);
    if (!full) {
      this.pushResult(d, i);
      if (this.resSize === this.k) this.updatePrune();
      return;
    }
    const topD = this.resD[0];
    if (d < topD || (d === topD && i < this.resI[0])) {
      this.siftDown(d, i, this.resSize);
      this.updatePrune();
    }
  }

  /** Recompute the pruning radius from the current k-th distance. */
  private updatePrune(): void {
    const topD = this.resD[0];
    if (this.lonlat) {
      const angle = (topD + LONLAT_SLACK_KM) / LBF;
      if (angle >= Math.PI) {
        this.prune2 = Infinity;
      } else {
        const chord = 2 * Math.sin(angle / 2);
        this.prune2 = chord * chord * (1 + 1e-12) + 1e-24;
      }
    } else {
      // planar distances are exact; keep a hair of margin for the squared comparison
      this.prune2 = topD * topD * (1 + 1e-12) + 1e-300;
    }
  }

  // ---- node min-heap keyed by squared box distance
  private pushNode(node: number, key: number): void {
    const heap = this.heap;
    const keys = this.heapKey;
    let pos = this.heapSize++;
    while (pos > 0) {
      const parent = (pos - 1) >> 1;
      if (keys[parent] <= key) break;
      heap[pos] = heap[parent];
      keys[pos] = keys[parent];
      pos = parent;
    }
    heap[pos] = node;
    keys[pos] = key;
  }

  private popNode(): number {
    const heap = this.heap;
    const keys = this.heapKey;
    const top = heap[0];
    const size = --this.heapSize;
    if (size > 0) {
      const last = heap[size];
      const key = keys[size];
      let pos = 0;
      for (;;) {
        let child = 2 * pos + 1;
        if (child >= size) break;
        if (child + 1 < size && keys[child + 1] < keys[child]) child++;
        if (keys[child] >= key) break;
        heap[pos] = heap[child];
        keys[pos] = keys[child];
        pos = child;
      }
      heap[pos] = last;
      keys[pos] = key;
    }
    return top;
  }

  // ---- result max-heap ordered by (distance, index)
  private pushResult(d: number, i: number): void {
    const D = this.resD;
    const I = this.resI;
    let pos = this.resSize++;
    while (pos > 0) {
      const parent = (pos - 1) >> 1;
      if (D[parent] > d || (D[parent] === d && I[parent] > i)) break;
      D[pos] = D[parent];
      I[pos] = I[parent];
      pos = parent;
    }
    D[pos] = d;
    I[pos] = i;
  }

  private popResult(): void {
    const size = --this.resSize;
    if (size > 0) this.siftDown(this.resD[size], this.resI[size], size);
  }

  private siftDown(d: number, i: number, size: number): void {
    const D = this.resD;
    const I = this.resI;
    let pos = 0;
    for (;;) {
      let child = 2 * pos + 1;
      if (child >= size) break;
      const r = child + 1;
      if (r < size && (D[r] > D[child] || (D[r] === D[child] && I[r] > I[child]))) child = r;
      if (D[child] < d || (D[child] === d && I[child] < i)) break;
      D[pos] = D[child];
      I[pos] = I[child];
      pos = child;
    }
    D[pos] = d;
    I[pos] = i;
  }
}

/** The kd-tree's nodes, made explicit once per StationSet, with the bounding box of each node's stations. */
export interface StationTree {
  count: number;
  /** 2 for planar, 3 for lonlat (unit-sphere coordinates). */
  dims: number;
  left: Int32Array;
  right: Int32Array;
  /** Child nodes (−1 for a leaf; childB may be −1 when the upper half is empty). */
  childA: Int32Array;
  childB: Int32Array;
  boxMin: Float64Array;
  boxMax: Float64Array;
}

/**
 * Walks kdbush's implicit tree (node [left, right]; a leaf when right − left ≤ nodeSize; else the
 * median m = (left + right) >> 1 with children [left, m − 1] and [m + 1, right]) and records the
 * bounding box of every node's stations.
 */
function buildTree(set: StationSet): StationTree {
  const n = set.count;
  const ids = set.index.ids;
  const nodeSize = set.index.nodeSize;
  const dims = set.coordinates === "lonlat" ? 3 : 2;
  const cap = 2 * n + 2;
  const left = new Int32Array(cap);
  const right = new Int32Array(cap);
  const childA = new Int32Array(cap).fill(-1);
  const childB = new Int32Array(cap).fill(-1);
  const boxMin = new Float64Array(cap * dims);
  const boxMax = new Float64Array(cap * dims);
  const coord = (i: number, d: number): number =>
    dims === 3 ? (d === 0 ? set.ux[i] : d === 1 ? set.uy[i] : set.uz[i]) : set.xy[2 * i + d];
  let count = 0;
  const stack: number[] = [];
  left[0] = 0;
  right[0] = n - 1;
  count = 1;
  stack.push(0);
  while (stack.length > 0) {
    const node = stack.pop() as number;
    const l = left[node];
    const r = right[node];
    for (let d = 0; d < dims; d++) {
      let lo = Infinity;
      let hi = -Infinity;
      for (let i = l; i <= r; i++) {
        const v = coord(ids[i], d);
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
      boxMin[node * dims + d] = lo;
      boxMax[node * dims + d] = hi;
    }
    if (r - l <= nodeSize) continue;
    const m = (l + r) >> 1;
    if (l <= m - 1) {
      const a = count++;
      left[a] = l;
      right[a] = m - 1;
      childA[node] = a;
      stack.push(a);
    }
    if (m + 1 <= r) {
      const b = count++;
      left[b] = m + 1;
      right[b] = r;
      if (childA[node] < 0) childA[node] = b;
      else childB[node] = b;
      stack.push(b);
    }
  }
  return { count, dims, left, right, childA, childB, boxMin, boxMax };
}
