// `npm run bench:geo`: timings of lib/geo on this machine (medians of several runs).
// A benchmark, not a test: it prints figures and asserts nothing.
import { distanceToCoastKm, globalGrid, isOnLand, landMask } from "../lib/geo";
import { mulberry32 } from "../lib/demo/prng";

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}
function time(fn: () => void): number {
  const t0 = performance.now();
  fn();
  return performance.now() - t0;
}
const fmt = (ms: number) => `${ms.toFixed(1)} ms`;

const cold = time(() => isOnLand(0, 0));
const coldCoast = time(() => distanceToCoastKm(0, 0));
console.log(`first isOnLand (load + convert + index land-50m): ${fmt(cold)}`);
console.log(`first distanceToCoastKm (coast index): ${fmt(coldCoast)}`);

const grid = globalGrid(0.25);
const maskRuns = Array.from({ length: 9 }, () => time(() => landMask(grid)));
console.log(`landMask global 0.25° (${grid.nx} × ${grid.ny} = ${grid.nx * grid.ny} cells): median ${fmt(median(maskRuns))} of 9`);

const rand = mulberry32(1);
const pts = Array.from({ length: 100_000 }, () => [rand() * 360 - 180, (Math.asin(rand() * 2 - 1) * 180) / Math.PI]);
const pipRuns = Array.from({ length: 5 }, () => time(() => pts.forEach(([x, y]) => isOnLand(x, y))));
console.log(`isOnLand, 100,000 random points: median ${fmt(median(pipRuns))} of 5 (${((median(pipRuns) * 1000) / pts.length).toFixed(2)} µs each)`);

const few = pts.slice(0, 5_000);
const coastRuns = Array.from({ length: 5 }, () => time(() => few.forEach(([x, y]) => distanceToCoastKm(x, y))));
console.log(`distanceToCoastKm, 5,000 random points: median ${fmt(median(coastRuns))} of 5 (${((median(coastRuns) * 1000) / few.length).toFixed(1)} µs each)`);
