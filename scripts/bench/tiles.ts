// `npm run bench:tiles`: drawing and PNG-encoding map tiles from a global 0.25° surface on this
// machine (medians of several runs). A benchmark, not a test: it prints figures and asserts nothing.
// The planes are made here (a smooth field over the land mask, a third of it extrapolated), so
// the database is not involved; chunk reads are measured by the store's own tests.
import { globalGrid, landMask } from "../../lib/geo";
import { buildScale } from "../../lib/tiles/scale";
import { encodePng } from "../../lib/tiles/png";
import { renderTile, tileCellWindow } from "../../lib/tiles/render";
import { lonLatToTile, TILE_SIZE } from "../../lib/tiles/mercator";

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const grid = globalGrid(0.25);
const mask = landMask(grid);
const value = new Float32Array(grid.nx * grid.ny).fill(NaN);
const extrapolation = new Uint8Array(grid.nx * grid.ny);
for (let r = 0; r < grid.ny; r++)
  for (let c = 0; c < grid.nx; c++) {
    const i = r * grid.nx + c;
    if (!mask[i]) continue;
    const lat = grid.lat0 - r * grid.dLat;
    value[i] = -0.4 * Math.abs(lat) + 2 * Math.sin(c / 50);
    extrapolation[i] = (r + c) % 3 === 0 ? 1 : 0;
  }
const scale = buildScale({ ramp: "meltwater", centre: null }, [{ p02: -30, p98: 2 }]);

function windowOf(win: { col0: number; row0: number; cols: number; rows: number }) {
  const v = new Float32Array(win.cols * win.rows);
  const e = new Uint8Array(win.cols * win.rows);
  for (let r = 0; r < win.rows; r++) {
    const src = (win.row0 + r) * grid.nx + win.col0;
    v.set(value.subarray(src, src + win.cols), r * win.cols);
    e.set(extrapolation.subarray(src, src + win.cols), r * win.cols);
  }
  return { values: v, extrapolation: e, window: win };
}

console.log(`global 0.25° grid ${grid.nx} × ${grid.ny}, ${TILE_SIZE}-px tiles, Meltwater ramp, nearest cell`);
for (const z of [0, 2, 4, 6, 8]) {
  // a tile over central Europe at each zoom (land, coast and sea)
  const { x, y } = lonLatToTile(z, 10, 47);
  const win = tileCellWindow(grid, z, x, y)!;
  const planes = windowOf(win);
  const draw: number[] = [];
  const png: number[] = [];
  let bytes = 0;
  for (let k = 0; k < 15; k++) {
    const t0 = performance.now();
    const rgba = renderTile(grid, z, x, y, planes, scale);
    const t1 = performance.now();
    bytes = encodePng(rgba, TILE_SIZE, TILE_SIZE).byteLength;
    const t2 = performance.now();
    draw.push(t1 - t0);
    png.push(t2 - t1);
  }
  console.log(`z ${z} tile ${x}/${y} (${win.cols} × ${win.rows} cells): draw median ${median(draw).toFixed(2)} ms, PNG median ${median(png).toFixed(2)} ms, ${(bytes / 1024).toFixed(1)} KiB (of 15 runs)`);
}
