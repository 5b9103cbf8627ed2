/**
 * Processing explicit targets in a spatially coherent order (the kd-tree order of the targets)
 * lets consecutive targets share neighbour sets, so most of them reuse an already factorised
 * kriging system; results are written back in the caller's order and are identical either way.
 */
import KDBush from "kdbush";

/** The kd-tree order of the targets (interleaved x, y), or null when not worth it / not finite. */
export function spatialOrder(xy: Float64Array): Int32Array | null {
  const t = xy.length >> 1;
  if (t < 64) return null;
  for (let i = 0; i < xy.length; i++) if (!Number.isFinite(xy[i])) return null;
  const index = new KDBush(t, 16, Float64Array);
  for (let i = 0; i < t; i++) index.add(xy[2 * i], xy[2 * i + 1]);
  index.finish();
  return Int32Array.from(index.ids);
}

/** Rows of `width` numbers taken in `order`: out row j = src row order[j]. */
export function permuteRows(src: Float64Array, order: Int32Array, width: number): Float64Array {
  const out = new Float64Array(order.length * width);
  for (let j = 0; j < order.length; j++) {
    const s = order[j] * width;
    for (let c = 0; c < width; c++) out[j * width + c] = src[s + c];
  }
  return out;
}

/** Put values computed in `order` back in place: dst[order[j]] = src[j]. */
export function scatter<T extends Float64Array | Float32Array>(src: T, order: Int32Array, make: (n: number) => T): T {
  const out = make(src.length);
  for (let j = 0; j < order.length; j++) out[order[j]] = src[j];
  return out;
}
