import { beforeAll, describe, expect, it } from "vitest";
import { count, eq } from "drizzle-orm";
import { getDb } from "@/db";
import { migrateDb } from "@/db/migrate";
import { editions, surfaceChunks, surfaces } from "@/db/schema";
import { CHUNK, readSurfaceCell, readSurfacePlaneData, readSurfaceWindow, writeSurfacePlanes } from "@/lib/surfaces/store";

// A grid that is not a multiple of the chunk size, so edge chunks are partial.
const grid = { lon0: -29.875, lat0: 24.875, dLon: 0.25, dLat: 0.25, nx: CHUNK * 2 + 37, ny: CHUNK + 19 };
const n = grid.nx * grid.ny;

function planes() {
  const value = new Float32Array(n);
  const variance = new Float32Array(n);
  const extrapolation = new Uint8Array(n);
  for (let r = 0; r < grid.ny; r++)
    for (let c = 0; c < grid.nx; c++) {
      const i = r * grid.nx + c;
      // The whole first chunk column is "sea" (NaN) in the top chunk row: that chunk is not stored.
      const sea = c < CHUNK && r < CHUNK;
      value[i] = sea ? NaN : r * 1000 + c + 0.5;
      variance[i] = sea ? NaN : (r + c) / 7;
      extrapolation[i] = c > grid.nx - 10 ? 1 : 0;
    }
  return { value, variance, extrapolation };
}

let surfaceId: string;
const p = planes();

beforeAll(async () => {
  await migrateDb();
  const db = getDb();
  await db.insert(editions).values({ id: "2026.1.1", status: "building" });
  const row = await db
    .insert(surfaces)
    .values({ editionId: "2026.1.1", variable: "d18O", period: 0, grid })
    .returning({ id: surfaces.id })
    .get();
  surfaceId = row.id;
  await writeSurfacePlanes(surfaceId, grid, p);
});

describe("surface chunk storage", () => {
  it("skips chunks with no value and stores the rest", async () => {
    const rows = await getDb()
      .select({ plane: surfaceChunks.plane, n: count() })
      .from(surfaceChunks)
      .where(eq(surfaceChunks.surfaceId, surfaceId))
      .groupBy(surfaceChunks.plane)
      .all();
    const byPlane = Object.fromEntries(rows.map((r) => [r.plane, r.n]));
    // 3 × 2 chunks, the north-west one is all NaN.
    expect(byPlane.value).toBe(5);
    expect(byPlane.variance).toBe(5);
    // Extrapolation is non-zero only in the east column of chunks.
    expect(byPlane.extrapolation).toBe(2);
  });

  it("reads whole planes back bit for bit (NaN where nothing was stored)", async () => {
    const v = await readSurfacePlaneData(surfaceId, grid, "value");
    const s = await readSurfacePlaneData(surfaceId, grid, "variance");
    const e = await readSurfacePlaneData(surfaceId, grid, "extrapolation");
    expect(Buffer.from(v.buffer).equals(Buffer.from(p.value.buffer))).toBe(true);
    expect(Buffer.from(s.buffer).equals(Buffer.from(p.variance.buffer))).toBe(true);
    expect(Array.from(e)).toEqual(Array.from(p.extrapolation));
  });

  it("reads windows that cross chunk edges and clips them to the grid", async () => {
    const win = { col0: CHUNK - 3, row0: CHUNK - 2, cols: 10, rows: 5 };
    const w = await readSurfaceWindow(surfaceId, grid, "value", win);
    for (let r = 0; r < win.rows; r++)
      for (let c = 0; c < win.cols; c++) {
        const expected = p.value[(win.row0 + r) * grid.nx + win.col0 + c];
        if (Number.isNaN(expected)) expect(w[r * win.cols + c]).toBeNaN();
        else expect(w[r * win.cols + c]).toBe(expected);
      }
    const clipped = await readSurfaceWindow(surfaceId, grid, "value", { col0: grid.nx - 2, row0: grid.ny - 1, cols: 5, rows: 5 });
    expect(clipped.length).toBe(2);
    expect(clipped[1]).toBe(p.value[n - 1]);
  });

  it("reads single cells, NaN outside the grid", async () => {
    expect(await readSurfaceCell(surfaceId, grid, "value", CHUNK + 3, 5)).toBe((CHUNK + 3) * 1000 + 5 + 0.5);
    expect(await readSurfaceCell(surfaceId, grid, "value", 2, 2)).toBeNaN();
    expect(await readSurfaceCell(surfaceId, grid, "value", -1, 0)).toBeNaN();
  });

  it("refuses planes of the wrong size, naming the plane", async () => {
    await expect(writeSurfacePlanes(surfaceId, grid, { value: new Float32Array(3), variance: p.variance })).rejects.toThrow(/value/);
  });
});
