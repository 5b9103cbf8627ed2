import "server-only";
import { endianness } from "node:os";
import { deflateSync, inflateSync } from "node:zlib";
import { and, eq, inArray } from "drizzle-orm";
import { getClient, getDb } from "@/db";
import { surfaceChunks } from "@/db/schema";
import type { LonLatGrid } from "@/lib/geo";

// Surface planes in the database: fixed-size square chunks of CHUNK × CHUNK
// cells (edge chunks are smaller), row-major, north-up (row 0 = northernmost,
// the convention of lib/geo and lib/geostats). Value and variance planes are
// Float32 (NaN = no value); the extrapolation plane is Uint8 (1 = the cell is
// beyond the edition's stated distance from the nearest station). A chunk with
// no value at all (all NaN, or all 0 for Uint8) is not stored: reading it gives
// NaN / 0. Chunk bytes are little-endian, deflated (level 1: fast, and the many
// NaN cells along coasts compress well).

/** Cells per chunk side. */
export const CHUNK = 128;

export type FloatPlaneName = "value" | "variance";
export type PlaneName = FloatPlaneName | "extrapolation";

export type SurfacePlanes = {
  value: Float32Array;
  variance: Float32Array;
  extrapolation?: Uint8Array;
};

/** A rectangle of cells: columns [col0, col0 + cols), rows [row0, row0 + rows). */
export type CellWindow = { col0: number; row0: number; cols: number; rows: number };

if (endianness() !== "LE") throw new Error("Rainprint's surface chunks are little-endian; this machine is big-endian.");

function chunkCounts(grid: LonLatGrid): { cx: number; cy: number } {
  return { cx: Math.ceil(grid.nx / CHUNK), cy: Math.ceil(grid.ny / CHUNK) };
}

function checkPlaneLength(grid: LonLatGrid, name: string, plane: ArrayLike<number>): void {
  if (plane.length !== grid.nx * grid.ny)
    throw new RangeError(`surface plane "${name}" has ${plane.length} cells; the grid needs nx·ny = ${grid.nx * grid.ny}`);
}

/** Cut one chunk out of a full plane; null when it holds nothing worth storing. */
function cutChunk<T extends Float32Array | Uint8Array>(grid: LonLatGrid, plane: T, chunkX: number, chunkY: number): T | null {
  const col0 = chunkX * CHUNK;
  const row0 = chunkY * CHUNK;
  const cols = Math.min(CHUNK, grid.nx - col0);
  const rows = Math.min(CHUNK, grid.ny - row0);
  const out = new (plane.constructor as { new (n: number): T })(cols * rows);
  let any = false;
  const isFloat = plane instanceof Float32Array;
  for (let r = 0; r < rows; r++) {
    const src = (row0 + r) * grid.nx + col0;
    out.set(plane.subarray(src, src + cols) as never, r * cols);
    if (!any) {
      for (let c = 0; c < cols; c++) {
        const v = plane[src + c];
        if (isFloat ? v === v : v !== 0) {
          any = true;
          break;
        }
      }
    }
  }
  return any ? out : null;
}

function encode(a: Float32Array | Uint8Array): Buffer {
  return deflateSync(Buffer.from(a.buffer, a.byteOffset, a.byteLength), { level: 1 });
}

function decodeFloat(b: Uint8Array): Float32Array {
  const raw = inflateSync(b);
  // Copy into an aligned buffer of its own.
  const out = new Float32Array(raw.byteLength / 4);
  new Uint8Array(out.buffer).set(raw);
  return out;
}

function decodeBytes(b: Uint8Array): Uint8Array {
  return new Uint8Array(inflateSync(b));
}

type Executor = Pick<ReturnType<typeof getClient>, "batch">;

/**
 * Write all planes of one surface (the `surfaces` row must exist). Use inside the
 * edition's write transaction by passing it as `executor` (anything with libSQL's
 * `batch`), or let it write in its own batch.
 */
export async function writeSurfacePlanes(
  surfaceId: string,
  grid: LonLatGrid,
  planes: SurfacePlanes,
  executor: Executor = getClient(),
): Promise<{ chunks: number; bytes: number }> {
  checkPlaneLength(grid, "value", planes.value);
  checkPlaneLength(grid, "variance", planes.variance);
  if (planes.extrapolation) checkPlaneLength(grid, "extrapolation", planes.extrapolation);
  const { cx, cy } = chunkCounts(grid);
  const stmts: { sql: string; args: (string | number | Uint8Array)[] }[] = [];
  let bytes = 0;
  const entries: [PlaneName, Float32Array | Uint8Array | undefined][] = [
    ["value", planes.value],
    ["variance", planes.variance],
    ["extrapolation", planes.extrapolation],
  ];
  for (const [name, plane] of entries) {
    if (!plane) continue;
    for (let y = 0; y < cy; y++)
      for (let x = 0; x < cx; x++) {
        const chunk = cutChunk(grid, plane, x, y);
        if (!chunk) continue;
        const data = encode(chunk);
        bytes += data.byteLength;
        stmts.push({
          sql: "INSERT INTO surface_chunks (surface_id, plane, chunk_x, chunk_y, data) VALUES (?, ?, ?, ?, ?)",
          args: [surfaceId, name, x, y, data],
        });
      }
  }
  // Several statements per round trip; libSQL runs a batch as one transaction.
  for (let i = 0; i < stmts.length; i += 200) await executor.batch(stmts.slice(i, i + 200), "write");
  return { chunks: stmts.length, bytes };
}

// Decoded chunks are immutable (editions never change once written), so a small
// process-wide cache keeps hot chunks for tiles and readouts.
const CACHE_LIMIT_BYTES = 256 * 1024 * 1024;
const cache = new Map<string, Float32Array | Uint8Array | null>();
let cacheBytes = 0;

function cacheKey(surfaceId: string, plane: PlaneName, x: number, y: number): string {
  return `${surfaceId}|${plane}|${x}|${y}`;
}

function remember(key: string, v: Float32Array | Uint8Array | null): void {
  if (cache.has(key)) return;
  cache.set(key, v);
  cacheBytes += v ? v.byteLength : 16;
  while (cacheBytes > CACHE_LIMIT_BYTES && cache.size) {
    const [k, old] = cache.entries().next().value as [string, Float32Array | Uint8Array | null];
    cache.delete(k);
    cacheBytes -= old ? old.byteLength : 16;
  }
}

/** Forget cached chunks of one surface (e.g. after a failed build is cleaned up). */
export function forgetSurfaceChunks(surfaceId: string): void {
  for (const [k, v] of cache) {
    if (k.startsWith(`${surfaceId}|`)) {
      cache.delete(k);
      cacheBytes -= v ? v.byteLength : 16;
    }
  }
}

async function loadChunks(
  surfaceId: string,
  plane: PlaneName,
  wanted: { x: number; y: number }[],
): Promise<Map<string, Float32Array | Uint8Array | null>> {
  const out = new Map<string, Float32Array | Uint8Array | null>();
  const missing: { x: number; y: number }[] = [];
  for (const w of wanted) {
    const k = cacheKey(surfaceId, plane, w.x, w.y);
    if (cache.has(k)) {
      const hit = cache.get(k)!;
      // refresh recency
      cache.delete(k);
      cache.set(k, hit);
      out.set(k, hit);
    } else missing.push(w);
  }
  if (missing.length) {
    const xs = [...new Set(missing.map((m) => m.x))];
    const ys = [...new Set(missing.map((m) => m.y))];
    const rows = await getDb()
      .select({ x: surfaceChunks.chunkX, y: surfaceChunks.chunkY, data: surfaceChunks.data })
      .from(surfaceChunks)
      .where(
        and(
          eq(surfaceChunks.surfaceId, surfaceId),
          eq(surfaceChunks.plane, plane),
          inArray(surfaceChunks.chunkX, xs),
          inArray(surfaceChunks.chunkY, ys),
        ),
      )
      .all();
    const found = new Map(rows.map((r) => [`${r.x}|${r.y}`, r.data]));
    for (const m of missing) {
      const data = found.get(`${m.x}|${m.y}`);
      const decoded = data ? (plane === "extrapolation" ? decodeBytes(data) : decodeFloat(data)) : null;
      const k = cacheKey(surfaceId, plane, m.x, m.y);
      remember(k, decoded);
      out.set(k, decoded);
    }
  }
  return out;
}

/**
 * Read a window of one plane. Float planes give NaN where nothing is stored;
 * the extrapolation plane gives 0. The window is clipped to the grid.
 */
export async function readSurfaceWindow(surfaceId: string, grid: LonLatGrid, plane: "extrapolation", win: CellWindow): Promise<Uint8Array>;
export async function readSurfaceWindow(surfaceId: string, grid: LonLatGrid, plane: FloatPlaneName, win: CellWindow): Promise<Float32Array>;
export async function readSurfaceWindow(
  surfaceId: string,
  grid: LonLatGrid,
  plane: PlaneName,
  win: CellWindow,
): Promise<Float32Array | Uint8Array> {
  const col0 = Math.max(0, win.col0);
  const row0 = Math.max(0, win.row0);
  const col1 = Math.min(grid.nx, win.col0 + win.cols);
  const row1 = Math.min(grid.ny, win.row0 + win.rows);
  const cols = Math.max(0, col1 - col0);
  const rows = Math.max(0, row1 - row0);
  const isFloat = plane !== "extrapolation";
  const out = isFloat ? new Float32Array(cols * rows).fill(NaN) : new Uint8Array(cols * rows);
  if (!cols || !rows) return out;
  const wanted: { x: number; y: number }[] = [];
  for (let y = Math.floor(row0 / CHUNK); y <= Math.floor((row1 - 1) / CHUNK); y++)
    for (let x = Math.floor(col0 / CHUNK); x <= Math.floor((col1 - 1) / CHUNK); x++) wanted.push({ x, y });
  const chunks = await loadChunks(surfaceId, plane, wanted);
  for (const { x, y } of wanted) {
    const data = chunks.get(cacheKey(surfaceId, plane, x, y));
    if (!data) continue;
    const cCol0 = x * CHUNK;
    const cRow0 = y * CHUNK;
    const cCols = Math.min(CHUNK, grid.nx - cCol0);
    const r0 = Math.max(row0, cRow0);
    const r1 = Math.min(row1, cRow0 + CHUNK, grid.ny);
    const c0 = Math.max(col0, cCol0);
    const c1 = Math.min(col1, cCol0 + cCols);
    for (let r = r0; r < r1; r++) {
      const src = (r - cRow0) * cCols + (c0 - cCol0);
      out.set(data.subarray(src, src + (c1 - c0)) as never, (r - row0) * cols + (c0 - col0));
    }
  }
  return out;
}

/** A whole plane. */
export function readSurfacePlaneData(surfaceId: string, grid: LonLatGrid, plane: "extrapolation"): Promise<Uint8Array>;
export function readSurfacePlaneData(surfaceId: string, grid: LonLatGrid, plane: FloatPlaneName): Promise<Float32Array>;
export function readSurfacePlaneData(surfaceId: string, grid: LonLatGrid, plane: PlaneName): Promise<Float32Array | Uint8Array> {
  const win = { col0: 0, row0: 0, cols: grid.nx, rows: grid.ny };
  return plane === "extrapolation"
    ? readSurfaceWindow(surfaceId, grid, "extrapolation", win)
    : readSurfaceWindow(surfaceId, grid, plane, win);
}

/** The value of one plane at one cell (NaN / 0 where nothing is stored or outside the grid). */
export async function readSurfaceCell(surfaceId: string, grid: LonLatGrid, plane: FloatPlaneName, row: number, col: number): Promise<number> {
  if (row < 0 || col < 0 || row >= grid.ny || col >= grid.nx) return NaN;
  const w = await readSurfaceWindow(surfaceId, grid, plane, { col0: col, row0: row, cols: 1, rows: 1 });
  return w[0];
}
