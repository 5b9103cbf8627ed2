import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { SurfaceBatch, createKrigingModel, createStationSet, gridCellCentre, gridCellCentres, gridFromBounds } from "@/lib/geostats";
import { krigeGrid, krigeTargets } from "@/lib/geostats/grid-runner";
import { rng } from "./fixtures";

describe("grid layout (north-up, row-major)", () => {
  it("cell (row, col) is at lon0 + col·dLon, lat0 − row·dLat; row 0 is the northernmost", () => {
    const g = gridFromBounds({ west: 5, east: 35, south: 35, north: 60, nx: 400, ny: 300 });
    expect(g.lon0).toBeCloseTo(5.0375, 12);
    expect(g.lat0).toBeCloseTo(60 - 25 / 600, 12);
    expect(gridCellCentre(g, 0)).toEqual([g.lon0, g.lat0]);
    const [lon, lat] = gridCellCentre(g, 2 * 400 + 3);
    expect(lon).toBeCloseTo(5.0375 + 3 * 0.075, 12);
    expect(lat).toBeCloseTo(g.lat0 - 2 * g.dLat, 12);
    const last = gridCellCentre(g, 400 * 300 - 1);
    expect(last[0]).toBeCloseTo(35 - 0.0375, 9);
    expect(last[1]).toBeCloseTo(35 + 25 / 600, 9);
    const out = new Float64Array(2 * 5);
    gridCellCentres(g, 398, 403, out);
    expect(out[4]).toBeCloseTo(g.lon0, 12); // index 400 starts row 1
    expect(out[5]).toBeCloseTo(g.lat0 - g.dLat, 12);
  });
});

function setup() {
  const r = rng(31);
  const pts: number[][] = [];
  for (let i = 0; i < 150; i++) pts.push([-20 + 40 * r(), 30 + 30 * r()]);
  const stations = createStationSet({ coordinates: "lonlat", points: pts });
  const vals = pts.map((p) => -8 + 0.1 * p[0] - 0.05 * p[1] + 0.3 * r());
  const elev = pts.map(() => 1500 * r());
  const local = createKrigingModel({ stations, values: vals, variogram: { model: "exponential", nugget: 0.1, psill: 1, range: 600 }, maxNeighbors: 20 });
  const global = createKrigingModel({ stations, values: vals, variogram: { model: "spherical", nugget: 0.05, psill: 1, range: 2000 } });
  const uk = createKrigingModel({
    stations,
    values: vals,
    variogram: { model: "exponential", nugget: 0.1, psill: 0.5, range: 500 },
    maxNeighbors: 16,
    drift: { points: pts.map((p, i) => [Math.abs(p[1]), elev[i]]) },
  });
  const grid = gridFromBounds({ west: -20, east: 20, south: 30, north: 60, nx: 60, ny: 40 });
  const cells = 60 * 40;
  const cellDrift = new Float64Array(cells * 2);
  for (let c = 0; c < cells; c++) {
    const [, lat] = gridCellCentre(grid, c);
    cellDrift[2 * c] = Math.abs(lat);
    cellDrift[2 * c + 1] = 800 * r();
  }
  return { stations, local, global, uk, grid, cells, cellDrift };
}

describe("grid runner with worker threads", () => {
  it("gives the same planes as the in-thread engine, for several surfaces at once (incl. drift and a mask)", async () => {
    const { local, global, uk, grid, cells, cellDrift } = setup();
    const mask = new Uint8Array(cells).fill(1);
    for (let c = 0; c < cells; c += 7) mask[c] = 0;
    let last = 0;
    let calls = 0;
    const planes = await krigeGrid({
      grid,
      models: [local, global, uk],
      drifts: [null, null, cellDrift],
      mask,
      threads: 2,
      inlineBelow: 0,
      chunk: 300,
      precision: "float64",
      onProgress: (p) => {
        calls++;
        expect(p.done).toBeGreaterThan(last);
        last = p.done;
        expect(p.total).toBe(cells);
      },
    });
    expect(last).toBe(cells);
    expect(calls).toBe(Math.ceil(cells / 300));
    const ref = [local, global, uk].map(() => ({ value: new Float64Array(cells), variance: new Float64Array(cells) }));
    new SurfaceBatch([local, global, uk]).run({ kind: "grid", grid }, 0, cells, [null, null, cellDrift], ref, 0, mask);
    for (let s = 0; s < 3; s++) {
      for (let c = 0; c < cells; c++) {
        if (mask[c] === 0) {
          expect(planes[s].value[c]).toBeNaN();
          continue;
        }
        expect(planes[s].value[c]).toBe(ref[s].value[c]);
        expect(planes[s].variance?.[c]).toBe(ref[s].variance[c]);
      }
    }
  });

  it("float32 planes by default; in-thread runs for small jobs or threads: 1", async () => {
    const { local, grid, cells } = setup();
    const [a] = await krigeGrid({ grid, models: local, threads: 1 });
    expect(a.value).toBeInstanceOf(Float32Array);
    const [b] = await krigeGrid({ grid, models: local, threads: 2, inlineBelow: 0 });
    for (let c = 0; c < cells; c++) expect(b.value[c]).toBe(a.value[c]);
  });

  it("krigeTargets over explicit points matches predictMany", async () => {
    const { local } = setup();
    const r = rng(5);
    const targets: number[][] = [];
    for (let i = 0; i < 3000; i++) targets.push([-20 + 40 * r(), 30 + 30 * r()]);
    const [out] = await krigeTargets({ targets, models: local, threads: 2, inlineBelow: 0, chunk: 500, precision: "float64" });
    const ref = local.predictMany(targets);
    for (let i = 0; i < targets.length; i++) expect(out.value[i]).toBe(ref.value[i]);
  });

  it("can be cancelled with an AbortSignal", async () => {
    const { local, global } = setup();
    const grid = gridFromBounds({ west: -20, east: 20, south: 30, north: 60, nx: 400, ny: 300 });
    const ac = new AbortController();
    const run = krigeGrid({
      grid,
      models: [local, global],
      threads: 2,
      inlineBelow: 0,
      chunk: 400,
      signal: ac.signal,
      onProgress: () => ac.abort(),
    });
    await expect(run).rejects.toMatchObject({ code: "aborted" });
    const already = new AbortController();
    already.abort();
    await expect(krigeGrid({ grid, models: local, signal: already.signal })).rejects.toMatchObject({ code: "aborted" });
  });

  it("reports engine errors from a worker with their code", async () => {
    const pts: number[][] = [];
    for (let i = 0; i < 30; i++) pts.push([i * 0.00001, 40]);
    const model = createKrigingModel({ coordinates: "lonlat", points: pts, values: pts.map((_, i) => i), variogram: { model: "gaussian", nugget: 0, psill: 1, range: 500 } });
    const grid = gridFromBounds({ west: -1, east: 1, south: 39, north: 41, nx: 10, ny: 10 });
    await expect(krigeGrid({ grid, models: model, threads: 2, inlineBelow: 0, chunk: 10 })).rejects.toMatchObject({ code: "ill-conditioned" });
  });

  it("rejects a mask or drift of the wrong size, and models on different station sets", async () => {
    const { local, uk, grid } = setup();
    await expect(krigeGrid({ grid, models: local, mask: new Uint8Array(3) })).rejects.toMatchObject({ field: "mask" });
    await expect(krigeGrid({ grid, models: uk })).rejects.toMatchObject({ field: "drift.targets" });
    const other = setup().local;
    await expect(krigeGrid({ grid, models: [local, other] })).rejects.toMatchObject({ field: "models" });
  });
});

describe("module boundaries", () => {
  it("the pure engine (lib/geostats/index.ts) reaches no worker_threads and no Node built-in, so Next.js server code can import it", () => {
    const dir = path.resolve(import.meta.dirname, "../../../lib/geostats");
    const seen = new Set<string>();
    const visit = (file: string): void => {
      if (seen.has(file)) return;
      seen.add(file);
      const text = readFileSync(path.join(dir, `${file}.ts`), "utf8");
      for (const m of text.matchAll(/from "([^"]+)"/g)) {
        const spec = m[1];
        expect(spec.startsWith("node:"), `${file}.ts imports ${spec}`).toBe(false);
        if (spec.startsWith("./")) visit(spec.slice(2));
      }
    };
    visit("index");
    expect(seen.has("kriging")).toBe(true);
    expect(seen.has("grid-runner")).toBe(false);
    expect(seen.has("job")).toBe(false);
  });
});
