// `npm run bench:demo`: time to generate the synthetic demo scenario and to seed it into
// a fresh temporary database, per profile (medians of several runs). Prints figures only.
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";

function median(xs: number[]): number {
  const s = xs.slice().sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function main() {
  const { generateDemoScenario } = await import("../lib/demo");
  const t0 = performance.now();
  generateDemoScenario({ profile: "test" });
  console.log(`first generation (includes loading and indexing the land outlines): ${(performance.now() - t0).toFixed(0)} ms`);
  for (const profile of ["full", "test"] as const) {
    let counts = "";
    const gen: number[] = [];
    for (let i = 0; i < 5; i++) {
      const t = performance.now();
      const s = generateDemoScenario({ profile });
      gen.push(performance.now() - t);
      counts = `${s.stations.length} stations, ${s.batches.length} batches, ${s.samples.length} samples (${s.samples.filter((x) => x.badKind).length} deliberately bad)`;
    }
    console.log(`generate ${profile}: ${counts}; median ${median(gen).toFixed(0)} ms of 5`);
  }
  const { closeDb } = await import("../db");
  const { migrateDb } = await import("../db/migrate");
  const { seedDemoData } = await import("../db/seed/demo-data");
  for (const profile of ["full", "test"] as const) {
    const runs: number[] = [];
    let rows = "";
    for (let i = 0; i < 3; i++) {
      const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-bench-demo-"));
      process.env.DATABASE_URL = `file:${path.join(dir, "bench.db")}`;
      await migrateDb();
      const r = await seedDemoData({ profile });
      runs.push(r.ms);
      const n = r.inserted;
      rows = `${n.users} users, ${n.stations} stations, ${n.batches} batches, ${n.samples} samples, ${n.reviewEvents} audit events = ${n.users + n.stations + n.batches + n.samples + n.reviewEvents} rows`;
      closeDb();
      rmSync(dir, { recursive: true, force: true });
    }
    console.log(`seed ${profile} into a fresh database (generate + insert): ${rows}; median ${median(runs).toFixed(0)} ms of 3`);
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
