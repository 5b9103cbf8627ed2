// `npm run bench:edition` — the full demo edition build, timed per stage.
//
// Seeds the synthetic demo data (full profile: ~270 stations, ~19,400 accepted samples) into a
// temporary database once, then builds the demo edition — station means, 26 regression-kriged
// surfaces (δ18O and d-excess, annual + 12 months) with variance, leave-one-out cross-validation
// and a CV-chosen variogram each, 12 √P precipitation surfaces plus their annual sum, 13 derived
// δ2H surfaces, extrapolation planes, storage in Float32 chunks — on the global 0.25° land grid,
// each run in a child process (so its peak memory, worker threads included, is its own). Prints
// each run's seconds per stage and peak RSS, then the medians. A benchmark, not a test: the
// machine may be shared, so read medians.
//
// Options: --runs N (default 3), --resolution DEG (default 0.25), --threads N (default all cores).
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";

function arg(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] ? process.argv[i + 1] : fallback;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

async function child(): Promise<void> {
  const { getDb, closeDb } = await import("../../db");
  const { editions } = await import("../../db/schema");
  const { defaultBuildParameters } = await import("../../lib/editions/build/compute");
  const { runEditionBuild } = await import("../../lib/editions/build/pipeline");
  const threads = arg("threads", "");
  const id = `bench.${process.pid}`;
  await getDb()
    .insert(editions)
    .values({ id, status: "building", isDemo: true, parameters: defaultBuildParameters({ grid: { resolutionDeg: Number(arg("resolution", "0.25")) } }) });
  const t0 = performance.now();
  const cpu0 = process.resourceUsage();
  const summary = await runEditionBuild(id, { threads: threads ? Number(threads) : undefined });
  const wall = (performance.now() - t0) / 1000;
  const cpu1 = process.resourceUsage();
  const cpu = (cpu1.userCPUTime + cpu1.systemCPUTime - cpu0.userCPUTime - cpu0.systemCPUTime) / 1e6;
  const kriged = summary.surfaces.filter((s) => s.crossValidation).length;
  closeDb();
  console.log(JSON.stringify({ wall, cpu, timings: summary.timings, maxRssMB: process.resourceUsage().maxRSS / 1024, surfaces: summary.surfaces.length, kriged, landCells: summary.landCells }));
}

async function main(): Promise<void> {
  const runs = Number(arg("runs", "3"));
  const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-bench-edition-"));
  const env = { ...process.env, DATABASE_URL: `file:${path.join(dir, "bench.db")}` };
  const tsxArgs = ["--conditions=react-server", "--import", "tsx"];
  console.log("seeding the synthetic demo data (full profile) into a temporary database …");
  const seed = spawnSync(process.execPath, [...tsxArgs, "scripts/bench/edition.ts", "--seed"], { env, encoding: "utf8" });
  if (seed.status !== 0) throw new Error(`seeding failed: ${seed.stderr}`);
  const results: { wall: number; cpu: number; timings: Record<string, number>; maxRssMB: number; surfaces: number; kriged: number; landCells: number }[] = [];
  for (let r = 0; r < runs; r++) {
    const res = spawnSync(process.execPath, [...tsxArgs, "scripts/bench/edition.ts", "--child", ...process.argv.slice(2)], { env, encoding: "utf8" });
    if (res.status !== 0) throw new Error(`build failed: ${res.stderr}`);
    const line = res.stdout.trim().split("\n").pop()!;
    const x = JSON.parse(line);
    results.push(x);
    console.log(
      `run ${r + 1}: ${x.wall.toFixed(1)} s total (CPU ${x.cpu.toFixed(1)} s, all threads); ` +
        Object.entries(x.timings as Record<string, number>)
          .map(([k, v]) => `${k} ${v.toFixed(1)} s`)
          .join(", ") +
        `; peak RSS ${x.maxRssMB.toFixed(0)} MB`,
    );
  }
  const r0 = results[0];
  console.log(
    `\nedition build: ${r0.surfaces} surfaces (${r0.kriged} kriged with variance and leave-one-out cross-validation), ${r0.landCells.toLocaleString("en")} land cells at ${arg("resolution", "0.25")}°, ${os.availableParallelism?.() ?? os.cpus().length} cores`,
  );
  console.log(`median of ${runs}: ${median(results.map((x) => x.wall)).toFixed(1)} s total (goal ≤ 60 s), CPU ${median(results.map((x) => x.cpu)).toFixed(1)} s over all threads; peak RSS ${median(results.map((x) => x.maxRssMB)).toFixed(0)} MB`);
  for (const k of Object.keys(r0.timings)) console.log(`  ${k.padEnd(14)} ${median(results.map((x) => x.timings[k] ?? 0)).toFixed(2)} s`);
  console.log(`  (load average now: ${os.loadavg().map((l) => l.toFixed(1)).join(" ")})`);
  rmSync(dir, { recursive: true, force: true });
}

async function seedOnly(): Promise<void> {
  const { migrateDb } = await import("../../db/migrate");
  const { seedDemoData } = await import("../../db/seed/demo-data");
  const { closeDb } = await import("../../db");
  await migrateDb();
  await seedDemoData({ profile: "full" });
  closeDb();
}

(process.argv.includes("--child") ? child() : process.argv.includes("--seed") ? seedOnly() : main()).catch((e: unknown) => {
  console.error(e instanceof Error ? (e.stack ?? e.message) : e);
  process.exit(1);
});
