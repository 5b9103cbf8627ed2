// `npm run bench:krige` — Rainprint's kriging engine against gstat (R) on the same jobs.
//
//   case 1: 1,000 stations in lon 5–35 E, lat 35–60 N, exponential model (nugget 0.2, psill 1.5,
//           range 400 km), ordinary kriging with maxNeighbors 32 onto a 400 × 300 grid (120,000
//           cells) over the same box, prediction and variance;
//   case 2: the same with 300 stations and the global neighbourhood.
//
// Station values are synthetic demo data (a smooth field plus noise, seeded). Rainprint runs in a
// child process (so its peak memory, worker threads included, is measured on its own) with the
// grid runner on all cores; gstat runs the identical job (stations, cell centres, model) through
// Rscript in the same run, when R with gstat is installed. Printed: wall times (medians of the
// runs), peak RSS, the time ratio and the largest prediction/variance differences.
// This is a benchmark to run and read, not a test. The machine may be shared: times are noisy.
//
// Options: --runs N (Rainprint repetitions, default 3), --gstat-runs N (default 1),
//          --case 1|2 (default both), --threads N (default all cores).
//
// `--case edition` instead times an edition-sized build (not compared with gstat): 38 surfaces
// (13 with a |lat|, lat², elevation drift, 25 without) over the same 280 synthetic stations on
// land, maxNeighbors 24, on the global 0.25° grid masked to its land cells (lib/geo).
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { type KrigingModel, createKrigingModel, createStationSet, gridCellCentres, gridFromBounds } from "../../lib/geostats";
import { globalGrid, isOnLand, landMask } from "../../lib/geo";
import { krigeGrid } from "../../lib/geostats/grid-runner";

const VARIOGRAM = { model: "exponential" as const, nugget: 0.2, psill: 1.5, range: 400 };
const BOX = { west: 5, east: 35, south: 35, north: 60, nx: 400, ny: 300 };
const CASES = {
  1: { stations: 1000, maxNeighbors: 32 as number | null, label: "1,000 stations, maxNeighbors 32" },
  2: { stations: 300, maxNeighbors: null as number | null, label: "300 stations, global neighbourhood" },
} as const;
type CaseId = keyof typeof CASES;

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

/** Deterministic pseudo-random numbers (mulberry32). */
function rng(seed: number): () => number {
  let s = seed | 0;
  return () => {
    s = (s + 0x6d2b79f5) | 0;
    let t = Math.imul(s ^ (s >>> 15), 1 | s);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Synthetic demo stations: lon, lat, value (a δ18O-like smooth field plus noise). */
function stations(n: number): number[][] {
  const r = rng(20260101 + n);
  const out: number[][] = [];
  for (let i = 0; i < n; i++) {
    const lon = BOX.west + (BOX.east - BOX.west) * r();
    const lat = BOX.south + (BOX.north - BOX.south) * r();
    out.push([lon, lat, -6 - 0.12 * (lat - 35) + 0.8 * Math.sin(lon / 4) * Math.cos(lat / 3) + 0.5 * (r() - 0.5)]);
  }
  return out;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

// ---------------------------------------------------------------- child: one Rainprint run
async function child(id: CaseId, out: string, threads: number | undefined): Promise<void> {
  const c = CASES[id];
  const pts = stations(c.stations);
  const t0 = performance.now();
  const cpu0 = process.cpuUsage();
  const set = createStationSet({ coordinates: "lonlat", points: pts.map((p) => [p[0], p[1]]) });
  const model = createKrigingModel({ stations: set, values: pts.map((p) => p[2]), variogram: VARIOGRAM, maxNeighbors: c.maxNeighbors });
  const grid = gridFromBounds(BOX);
  const [planes] = await krigeGrid({ grid, models: model, threads });
  const wallMs = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0); // the whole process: all threads
  const cpuMs = (cpu.user + cpu.system) / 1000;
  const cells = grid.nx * grid.ny;
  const buf = new Float64Array(2 * cells);
  for (let i = 0; i < cells; i++) {
    buf[i] = planes.value[i];
    buf[cells + i] = (planes.variance as Float32Array)[i];
  }
  writeFileSync(out, Buffer.from(buf.buffer));
  // maxRSS: the process's resident-set high-water mark (KB on Linux), worker threads included
  console.log(JSON.stringify({ wallMs, cpuMs, maxRssKB: process.resourceUsage().maxRSS }));
}

// ---------------------------------------------------------------- edition-sized build
async function editionChild(threads: number | undefined): Promise<void> {
  const r = rng(7);
  const pts: number[][] = [];
  while (pts.length < 280) {
    const lon = 360 * r() - 180;
    const lat = 140 * r() - 60;
    if (isOnLand(lon, lat)) pts.push([lon, lat]);
  }
  const elev = pts.map(() => 2500 * r() * r());
  const grid = globalGrid(0.25);
  const cells = grid.nx * grid.ny;
  const xy = new Float64Array(2 * cells);
  gridCellCentres(grid, 0, cells, xy);
  const mask = landMask(grid);
  const cellDrift = new Float64Array(3 * cells);
  let landCells = 0;
  for (let c = 0; c < cells; c++) {
    const lon = xy[2 * c];
    const lat = xy[2 * c + 1];
    landCells += mask[c];
    cellDrift[3 * c] = Math.abs(lat);
    cellDrift[3 * c + 1] = lat * lat;
    cellDrift[3 * c + 2] = 1200 * (1 + Math.sin(lon / 5) * Math.cos(lat / 7));
  }
  const t0 = performance.now();
  const stations = createStationSet({ coordinates: "lonlat", points: pts });
  const models: KrigingModel[] = [];
  const drifts: (Float64Array | null)[] = [];
  for (let s = 0; s < 38; s++) {
    const withDrift = s < 13;
    const values = pts.map((p, i) => (withDrift ? -2 - 0.2 * Math.abs(p[1]) - 0.002 * elev[i] : 10) + Math.sin(p[0] / 20 + s) + 0.3 * r());
    models.push(
      createKrigingModel({
        stations,
        values,
        variogram: { model: "exponential", nugget: 0.3, psill: 2, range: 1500 + 50 * s },
        maxNeighbors: 24,
        drift: withDrift ? { points: pts.map((p, i) => [Math.abs(p[1]), p[1] * p[1], elev[i]]) } : undefined,
      }),
    );
    drifts.push(withDrift ? cellDrift : null);
  }
  await krigeGrid({ grid, models, drifts, mask, threads });
  const wallMs = performance.now() - t0;
  console.log(JSON.stringify({ wallMs, maxRssKB: process.resourceUsage().maxRSS, landCells }));
}

async function edition(runs: number, tsx: string, threads: string): Promise<void> {
  const times: number[] = [];
  const rss: number[] = [];
  let landCells = 0;
  for (let i = 0; i < runs; i++) {
    const res = spawnSync(process.execPath, [tsx, "scripts/bench/krige.ts", "--edition-child", ...(threads ? ["--threads", threads] : [])], { encoding: "utf8" });
    if (res.status !== 0) throw new Error(`edition run failed: ${res.stderr}`);
    const line = JSON.parse(res.stdout.trim().split("\n").pop() as string) as { wallMs: number; maxRssKB: number; landCells: number };
    times.push(line.wallMs);
    rss.push(line.maxRssKB);
    landCells = line.landCells;
  }
  console.log(`\nedition-sized build: 38 surfaces (13 with drift), 280 stations, maxNeighbors 24, ${landCells} land cells of a global 0.25° grid`);
  console.log(`  Rainprint: wall ${(median(times) / 1000).toFixed(1)} s median of ${runs} (runs: ${times.map((t) => (t / 1000).toFixed(1)).join(", ")} s), peak RSS ${(median(rss) / 1024).toFixed(0)} MB; goal ≤ 60 s on 2 cores`);
}

// ---------------------------------------------------------------- parent
function hasGstat(): boolean {
  const r = spawnSync("Rscript", ["-e", "suppressPackageStartupMessages(library(gstat)); library(sp); cat('ok')"], { encoding: "utf8" });
  return r.status === 0 && r.stdout.includes("ok");
}

async function parent(): Promise<void> {
  const runs = Math.max(1, Number(arg("runs", "3")));
  const gstatRuns = Math.max(0, Number(arg("gstat-runs", "1")));
  const which = arg("case", "both");
  const threads = arg("threads", "");
  const tsx = path.join(process.cwd(), "node_modules", "tsx", "dist", "cli.mjs");
  if (which === "edition") {
    console.log(`Rainprint kriging benchmark — ${os.cpus().length} cores (${os.cpus()[0]?.model ?? "cpu"}), Node ${process.version}, load average ${os.loadavg().map((x) => x.toFixed(2)).join(" ")}; synthetic demo data`);
    await edition(runs, tsx, threads);
    return;
  }
  const ids: CaseId[] = which === "both" ? [1, 2] : [Number(which) as CaseId];
  const withGstat = gstatRuns > 0 && hasGstat();
  console.log(`Rainprint kriging benchmark — ${os.cpus().length} cores (${os.cpus()[0]?.model ?? "cpu"}), Node ${process.version}, load average ${os.loadavg().map((x) => x.toFixed(2)).join(" ")}`);
  console.log(`model: exponential nugget ${VARIOGRAM.nugget}, psill ${VARIOGRAM.psill}, range ${VARIOGRAM.range} km; grid ${BOX.nx} × ${BOX.ny} = ${BOX.nx * BOX.ny} cells over lon ${BOX.west}–${BOX.east}, lat ${BOX.south}–${BOX.north}; synthetic demo data`);
  if (!withGstat) {
    console.log(
      gstatRuns > 0
        ? "gstat comparison skipped: Rscript with gstat/sp not found (install: apt-get install -y r-base-core r-cran-gstat r-cran-sp)"
        : "gstat comparison skipped (--gstat-runs 0)",
    );
  }
  for (const id of ids) {
    const c = CASES[id];
    const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-bench-krige-"));
    try {
      const pts = stations(c.stations);
      const grid = gridFromBounds(BOX);
      const cells = grid.nx * grid.ny;
      const xy = new Float64Array(2 * cells);
      gridCellCentres(grid, 0, cells, xy);
      // the identical job in the CLI's format, and the pieces gstat reads
      const job = {
        coordinates: "lonlat",
        points: pts,
        targets: Array.from({ length: cells }, (_, i) => [xy[2 * i], xy[2 * i + 1]]),
        variogram: VARIOGRAM,
        ...(c.maxNeighbors ? { maxNeighbors: c.maxNeighbors } : {}),
      };
      writeFileSync(path.join(dir, "job.json"), JSON.stringify(job));
      writeFileSync(path.join(dir, "stations.csv"), "lon,lat,value\n" + pts.map((p) => p.map((v) => v.toPrecision(17)).join(",")).join("\n") + "\n");
      writeFileSync(path.join(dir, "targets.bin"), Buffer.from(xy.buffer));
      writeFileSync(path.join(dir, "params.csv"), `nugget,psill,range,nmax,targets\n${VARIOGRAM.nugget},${VARIOGRAM.psill},${VARIOGRAM.range},${c.maxNeighbors ?? 0},${cells}\n`);

      const times: number[] = [];
      const cpus: number[] = [];
      const rss: number[] = [];
      const procTimes: number[] = [];
      for (let r = 0; r < runs; r++) {
        const t0 = performance.now();
        const res = spawnSync(process.execPath, [tsx, "scripts/bench/krige.ts", "--child", String(id), "--out", path.join(dir, "rainprint.bin"), ...(threads ? ["--threads", threads] : [])], {
          encoding: "utf8",
          maxBuffer: 1 << 20,
        });
        procTimes.push(performance.now() - t0);
        if (res.status !== 0) throw new Error(`Rainprint run failed: ${res.stderr}`);
        const line = JSON.parse(res.stdout.trim().split("\n").pop() as string) as { wallMs: number; cpuMs: number; maxRssKB: number };
        times.push(line.wallMs);
        cpus.push(line.cpuMs);
        rss.push(line.maxRssKB);
      }
      const ours = new Float64Array(readFileSync(path.join(dir, "rainprint.bin")).buffer.slice(0));
      console.log(`\ncase ${id}: ${c.label}, ${cells} cells`);
      console.log(
        `  Rainprint: wall ${(median(times) / 1000).toFixed(2)} s median of ${runs} (runs: ${times.map((t) => (t / 1000).toFixed(2)).join(", ")} s; ` +
          `process incl. start-up ${(median(procTimes) / 1000).toFixed(2)} s), CPU ${(median(cpus) / 1000).toFixed(2)} s (all threads), ` +
          `peak RSS ${(median(rss) / 1024).toFixed(0)} MB (max ${(Math.max(...rss) / 1024).toFixed(0)} MB)`,
      );
      if (!withGstat) continue;
      const gTimes: number[] = [];
      const gCpu: number[] = [];
      const gProc: number[] = [];
      for (let r = 0; r < gstatRuns; r++) {
        const t0 = performance.now();
        const g = spawnSync("Rscript", ["scripts/bench/krige-gstat.R", dir], { encoding: "utf8" });
        gProc.push(performance.now() - t0);
        if (g.status !== 0) throw new Error(`gstat run failed: ${g.stderr}`);
        const [elapsed, cpu] = (g.stdout.trim().split("\n").pop() as string).split(/\s+/).map(Number);
        gTimes.push(elapsed * 1000);
        gCpu.push(cpu * 1000);
      }
      const pred = new Float64Array(readFileSync(path.join(dir, "pred.bin")).buffer.slice(0));
      const vari = new Float64Array(readFileSync(path.join(dir, "var.bin")).buffer.slice(0));
      let dPred = 0;
      let dVar = 0;
      let aPred = 0;
      let aVar = 0;
      for (let i = 0; i < cells; i++) {
        const ep = Math.abs(ours[i] - pred[i]);
        const ev = Math.abs(ours[cells + i] - vari[i]);
        aPred = Math.max(aPred, ep);
        aVar = Math.max(aVar, ev);
        dPred = Math.max(dPred, ep / Math.abs(pred[i]));
        dVar = Math.max(dVar, ev / Math.abs(vari[i]));
      }
      const gMed = median(gTimes);
      console.log(
        `  gstat:     krige() ${(gMed / 1000).toFixed(2)} s median of ${gstatRuns} (runs: ${gTimes.map((t) => (t / 1000).toFixed(2)).join(", ")} s; ` +
          `Rscript incl. start-up ${(median(gProc) / 1000).toFixed(2)} s), CPU ${(median(gCpu) / 1000).toFixed(2)} s`,
      );
      const goal = id === 1 ? 10 : 4;
      console.log(
        `  ratio:     Rainprint / gstat = ${(median(times) / gMed).toFixed(3)} wall (1/${(gMed / median(times)).toFixed(1)}; goal ≤ 1/${goal}), ` +
          `${(median(cpus) / median(gCpu)).toFixed(3)} CPU (1/${(median(gCpu) / median(cpus)).toFixed(1)})`,
      );
      console.log(`  largest difference: prediction ${dPred.toExponential(2)} relative (${aPred.toExponential(2)} ‰ absolute), variance ${dVar.toExponential(2)} relative (${aVar.toExponential(2)} absolute); goal 1e-6 (Rainprint stores Float32 planes)`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }
}

const childIdx = process.argv.indexOf("--child");
if (process.argv.includes("--edition-child")) {
  const t = arg("threads", "");
  editionChild(t ? Number(t) : undefined).catch((e: unknown) => {
    console.error(e instanceof Error ? (e.stack ?? e.message) : e);
    process.exitCode = 1;
  });
} else if (childIdx >= 0) {
  const t = arg("threads", "");
  child(Number(process.argv[childIdx + 1]) as CaseId, arg("out", ""), t ? Number(t) : undefined).catch((e: unknown) => {
    console.error(e instanceof Error ? (e.stack ?? e.message) : e);
    process.exitCode = 1;
  });
} else {
  parent().catch((e: unknown) => {
    console.error(e instanceof Error ? (e.stack ?? e.message) : e);
    process.exitCode = 1;
  });
}
