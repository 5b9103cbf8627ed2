// The tile route (app/api/tiles/…) against surfaces written into this file's temporary
// database with writeSurfacePlanes: tiles decode (pngjs) to the ramp's colour at known
// cells, no-data is transparent, extrapolation is veiled and hatched, the uncertainty
// layer uses √variance, and bad addresses get problem+json. Expected colours come from
// the ramp lookup table and the scale rule (lib/tiles/scale.ts), positions from the
// slippy-map tile formulas [trade].
import { PNG } from "pngjs";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, surfaces } from "@/db/schema";
import type { PlaneStats, SurfaceStats } from "@/lib/editions/types";
import { writeSurfacePlanes } from "@/lib/surfaces/store";
import { EXTRAPOLATION_STYLE, rampColor } from "@/lib/tiles/ramps";
import { freshDb } from "../helpers/db";

// 20 × 20 one-degree cells centred on 9.5°W…9.5°E, 9.5°N…9.5°S (row 0 northernmost).
const grid = { lon0: -9.5, lat0: 9.5, dLon: 1, dLat: 1, nx: 20, ny: 20, chunk: 128 };
const n = grid.nx * grid.ny;

function stats(value: PlaneStats, sd: PlaneStats): SurfaceStats {
  return {
    method: "regression-kriging", units: "‰", value, variance: sd, sd,
    stations: { used: 10, excludedCoverage: 0 }, seaLevelEquivalent: true,
    extrapolation: { distanceKm: 1000, cells: 40, fraction: 0.1 },
  };
}
const range = (p02: number, p98: number): PlaneStats => ({ cells: n, min: p02, max: p98, mean: (p02 + p98) / 2, p02, p98 });

async function addSurface(editionId: string, variable: "d18O" | "dExcess", period: number, cell: (r: number, c: number) => [number, number, number], s: SurfaceStats) {
  const value = new Float32Array(n);
  const variance = new Float32Array(n);
  const extrapolation = new Uint8Array(n);
  for (let r = 0; r < grid.ny; r++)
    for (let c = 0; c < grid.nx; c++) [value[r * grid.nx + c], variance[r * grid.nx + c], extrapolation[r * grid.nx + c]] = cell(r, c);
  const row = await getDb().insert(surfaces).values({ editionId, variable, period, grid, stats: s }).returning({ id: surfaces.id }).get();
  await writeSurfacePlanes(row.id, grid, { value, variance, extrapolation });
}

async function get(path: string, headers: Record<string, string> = {}): Promise<Response> {
  const { GET } = await import("@/app/api/tiles/[edition]/[variable]/[period]/[z]/[x]/[y]/route");
  const [edition, variable, period, z, x, y] = path.split("/");
  return GET(new Request(`http://localhost/api/tiles/${path}`, { headers }), { params: Promise.resolve({ edition, variable, period, z, x, y }) });
}

async function decode(res: Response): Promise<PNG> {
  expect(res.status).toBe(200);
  expect(res.headers.get("content-type")).toBe("image/png");
  return PNG.sync.read(Buffer.from(await res.arrayBuffer()));
}

/** The tile pixel holding (lon, lat) at zoom z: slippy-map formulas [trade]. */
function pixelOf(z: number, lon: number, lat: number) {
  const size = 256 * 2 ** z;
  const gx = Math.floor(((lon + 180) / 360) * size);
  const φ = (lat * Math.PI) / 180;
  const gy = Math.floor(((1 - Math.log(Math.tan(φ) + 1 / Math.cos(φ)) / Math.PI) / 2) * size);
  return { x: Math.floor(gx / 256), y: Math.floor(gy / 256), px: gx % 256, py: gy % 256 };
}
const rgbaAt = (png: PNG, px: number, py: number) => Array.from(png.data.subarray(4 * (py * 256 + px), 4 * (py * 256 + px) + 4));
const cellCentre = (r: number, c: number) => ({ lon: grid.lon0 + c * grid.dLon, lat: grid.lat0 - r * grid.dLat });

beforeAll(async () => {
  await freshDb();
  await getDb().insert(editions).values([
    { id: "2026.12.1", status: "published", isDemo: true, publishedAt: new Date() },
    { id: "2027.1.1", status: "ready", isDemo: true },
  ]);
  // δ18O annual: value = −col ‰ (0 in the west … −19 in the east); sd = row + 1; the south-west
  // corner (rows ≥ 15, cols < 5) is sea (NaN); rows ≥ 15 elsewhere are extrapolation.
  await addSurface("2026.12.1", "d18O", 0, (r, c) => (r >= 15 && c < 5 ? [NaN, NaN, 0] : [-c, (r + 1) ** 2, r >= 15 ? 1 : 0]), stats(range(-19, 0), range(1, 20)));
  // d-excess in July: 10 + (col − 10) ‰.
  await addSurface("2026.12.1", "dExcess", 7, (_r, c) => [c, 1, 0], stats(range(0, 19), range(1, 1)));
  await addSurface("2027.1.1", "d18O", 0, () => [-5, 1, 0], stats(range(-5, -5), range(1, 1)));
});

describe("surface tiles", () => {
  it("draws each cell in its ramp colour (δ18O on Meltwater, scale −20…0 ‰ from p02/p98)", async () => {
    for (const [r, c] of [[2, 15], [7, 3], [12, 10]]) {
      const { lon, lat } = cellCentre(r, c);
      const at = pixelOf(4, lon, lat);
      const png = await decode(await get(`2026.12.1/d18O/0/4/${at.x}/${at.y}.png`));
      expect([png.width, png.height]).toEqual([256, 256]);
      // value −c on the scale −20 … 0 (range −19…0 widened to steps of 5)
      expect(rgbaAt(png, at.px, at.py)).toEqual([...rampColor("meltwater", (-c + 20) / 20), 255]);
    }
  });

  it("leaves sea and everything outside the grid transparent", async () => {
    const sea = cellCentre(17, 2);
    const at = pixelOf(4, sea.lon, sea.lat);
    const png = await decode(await get(`2026.12.1/d18O/0/4/${at.x}/${at.y}.png`));
    expect(rgbaAt(png, at.px, at.py)[3]).toBe(0);
    const far = pixelOf(4, 40, 40);
    const empty = await decode(await get(`2026.12.1/d18O/0/4/${far.x}/${far.y}.png`));
    expect(empty.data.every((v) => v === 0)).toBe(true);
  });

  it("veils and hatches extrapolation cells", async () => {
    const { lon, lat } = cellCentre(17, 12);
    const at = pixelOf(6, lon, lat);
    const png = await decode(await get(`2026.12.1/d18O/0/6/${at.x}/${at.y}.png`));
    const base = rampColor("meltwater", (-12 + 20) / 20);
    const veiled = base.map((v) => Math.round(v + EXTRAPOLATION_STYLE.veil * (255 - v)));
    const seen = new Set<string>();
    // the 4 × 3 pixels around the cell centre lie in the cell (a 1° cell is ~45 px at zoom 6) and
    // cover six consecutive diagonals, so one of them is a hatch line
    for (let dy = -1; dy <= 1; dy++)
      for (let dx = -1; dx <= 2; dx++) {
        const onLine = (at.x * 256 + at.px + dx + at.y * 256 + at.py + dy) % EXTRAPOLATION_STYLE.spacing < EXTRAPOLATION_STYLE.width;
        const px = rgbaAt(png, at.px + dx, at.py + dy);
        expect(px).toEqual([...(onLine ? EXTRAPOLATION_STYLE.ink : veiled), 255]);
        seen.add(onLine ? "ink" : "veil");
      }
    expect(seen).toEqual(new Set(["ink", "veil"]));
  });

  it("draws the uncertainty layer (d18O-sd) from √variance on Haze", async () => {
    const { lon, lat } = cellCentre(3, 8);
    const at = pixelOf(5, lon, lat);
    const png = await decode(await get(`2026.12.1/d18O-sd/0/5/${at.x}/${at.y}.png`));
    // sd = row + 1 = 4 on the scale 0 … 20 (p02 1, p98 20, steps of 5)
    expect(rgbaAt(png, at.px, at.py)).toEqual([...rampColor("haze", 4 / 20), 255]);
  });

  it("centres d-excess on +10 ‰ (Moisture source): a cell at +10 ‰ gets the neutral centre", async () => {
    const { lon, lat } = cellCentre(5, 10);
    const at = pixelOf(5, lon, lat);
    const png = await decode(await get(`2026.12.1/dExcess/7/5/${at.x}/${at.y}.png`));
    expect(rgbaAt(png, at.px, at.py)).toEqual([...rampColor("moisture-source", 0.5), 255]);
    const west = cellCentre(5, 2);
    const w = pixelOf(5, west.lon, west.lat);
    const pngW = await decode(await get(`2026.12.1/dExcess/7/5/${w.x}/${w.y}.png`));
    // +2 ‰ on the symmetric scale 10 ± 10 (half-width 10 in steps of 2.5 → 0 … 20)
    expect(rgbaAt(pngW, w.px, w.py)).toEqual([...rampColor("moisture-source", 2 / 20), 255]);
  });

  it("is cacheable forever, keyed by the edition, with an ETag and 304", async () => {
    const res = await get("2026.12.1/d18O/0/0/0/0.png");
    expect(res.status).toBe(200);
    expect(res.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
    const etag = res.headers.get("etag")!;
    expect(etag).toMatch(/^"[\w-]+"$/);
    const again = await get("2026.12.1/d18O/0/0/0/0.png", { "if-none-match": etag });
    expect(again.status).toBe(304);
    expect(again.headers.get("etag")).toBe(etag);
    expect(await again.text()).toBe("");
    expect((await get("2026.12.1/d18O-sd/0/0/0/0.png")).headers.get("etag")).not.toBe(etag);
    expect((await get("2026.12.1/d18O/0/0/0/0.png", { "if-none-match": '"other"' })).status).toBe(200);
  });

  it("redirects “current” to the newest published edition's immutable address", async () => {
    const res = await get("current/d18O-sd/3/2/1/1.png");
    expect(res.status).toBe(302);
    expect(res.headers.get("location")).toBe("/api/tiles/2026.12.1/d18O-sd/3/2/1/1.png");
    expect(res.headers.get("cache-control")).toBe("no-cache");
  });

  it.each([
    ["2026.12.1/d18O/0/13/0/0.png", 400, /zoom runs from 0 to 12/],
    ["2026.12.1/d18O/0/3/8/0.png", 400, /no tile 3\/8\/0/],
    ["2026.12.1/d18O/0/3/1/-1.png", 400, /whole numbers/],
    ["2026.12.1/d18O/0/3/1/a.png", 400, /whole numbers/],
    ["2026.12.1/d18O/0/3/1/1.jpg", 400, /whole numbers/],
    ["2026.12.1/d18O/13/0/0/0.png", 400, /period is 0 \(annual\) or a month 1–12/],
    ["2026.12.1/d18O/x/0/0/0.png", 400, /period/],
    ["2026.12.1/d17O/0/0/0/0.png", 404, /no map layer “d17O”/],
    ["2099.1.1/d18O/0/0/0/0.png", 404, /no published edition “2099\.1\.1”/],
    ["2027.1.1/d18O/0/0/0/0.png", 404, /no published edition/],
    ["2026.12.1/d2H/0/0/0/0.png", 404, /has no d2H surface for period 0/],
    ["2026.12.1/dExcess/0/0/0/0.png", 404, /has no dExcess surface/],
  ])("%s → %i problem+json", async (path, status, detail) => {
    const res = await get(path);
    expect(res.status).toBe(status);
    expect(res.headers.get("content-type")).toContain("application/problem+json");
    expect(((await res.json()) as { detail: string }).detail).toMatch(detail);
  });
});
