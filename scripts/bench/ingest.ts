// `npm run bench:ingest`: a 100,000-row sample file through the intake's own path —
// read (papaparse) → validate (shared zod/cell rules) → checks (lib/qc, per station with its
// accepted history and water line) → insert (multi-row INSERTs in one transaction) — into a
// temporary SQLite database. Each run is a fresh child process, so its peak resident memory
// is its own. Prints the median wall time of the runs and the largest peak memory.
// A benchmark, not a test: it asserts nothing. Goal on the shared 2-core machine: ≤ 15 s, < 1 GB.
//
//   BENCH_RUNS (default 3), BENCH_ROWS (default 100000), BENCH_STATIONS (default 400)
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";

const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const ROWS = Number(process.env.BENCH_ROWS ?? 100_000);
const STATIONS = Number(process.env.BENCH_STATIONS ?? 400);

type RunResult = { totalMs: number; readMs: number; timings: Record<string, number>; bytes: number; inserted: number; maxRssMb: number; worst: string | null };

async function child(): Promise<void> {
  const { getClient, getDb } = await import("../../db");
  const { migrateDb } = await import("../../db/migrate");
  const { samples, stations, users } = await import("../../db/schema");
  const { ingestCsv } = await import("../../lib/intake/batches");
  const { readSampleCsv } = await import("../../lib/intake/csv");
  await migrateDb();
  const db = getDb();
  const me = await db.insert(users).values({ email: "bench@example.org", name: "Bench", emailVerified: new Date() }).returning().get();
  // Invented stations on a grid over central Europe (all on land) with 24 accepted months each.
  const stationRows = Array.from({ length: STATIONS }, (_, i) => ({
    code: `BN-${String(i).padStart(4, "0")}`,
    name: `Bench station ${i}`,
    lat: 45 + (i % 20) * 0.3,
    lon: 5 + Math.floor(i / 20) * 0.4,
    elevationM: 200 + (i % 7) * 150,
    collectorType: "bulk-oil" as const,
    samplingInterval: "monthly" as const,
    status: "approved" as const,
    ownerId: me.id,
  }));
  const ids: string[] = [];
  for (let i = 0; i < stationRows.length; i += 200) ids.push(...(await db.insert(stations).values(stationRows.slice(i, i + 200)).returning({ id: stations.id }).all()).map((r) => r.id));
  const seedBatch = (await getClient().execute({ sql: "INSERT INTO batches (id, contributor_id, source, status, sample_count, created_at) VALUES (?, ?, 'seed', 'decided', 0, ?) RETURNING id", args: [crypto.randomUUID(), me.id, Date.now()] })).rows[0].id as string;
  const history: (typeof samples.$inferInsert)[] = [];
  for (const [si, sid] of ids.entries())
    for (let m = 0; m < 24; m++) {
      const x = -6 - (si % 25) * 0.3 + 3 * Math.sin((((m % 12) + 1) / 12) * 2 * Math.PI) + (noise(m + 7 * history.length, 4) - 0.5) * 3;
      const start = `${2024 + Math.floor(m / 12)}-${String((m % 12) + 1).padStart(2, "0")}-01`;
      const endM = m + 1;
      const end = `${2024 + Math.floor(endM / 12)}-${String((endM % 12) + 1).padStart(2, "0")}-01`;
      history.push({ batchId: seedBatch, stationId: sid, status: "accepted" as const, startDate: start, endDate: end, amountMm: 60 + (m % 5) * 10, d18O: x, d2H: 8 * x + 10 + (noise(history.length, 5) - 0.5) * 8, dExcess: 10 });
    }
  for (let i = 0; i < history.length; i += 400) await db.insert(samples).values(history.slice(i, i + 400));

  // The file: ROWS monthly samples spread over the stations (periods before the seeded history).
  const perStation = Math.ceil(ROWS / STATIONS);
  const lines = ["station_code,collected_from,collected_until,d18O_permil,d2H_permil,amount_mm,d18O_sd_permil,d2H_sd_permil,method,laboratory,scale,reference_waters,notes"];
  let n = 0;
  for (let s = 0; s < STATIONS && n < ROWS; s++)
    for (let k = 0; k < perStation && n < ROWS; k++, n++) {
      const y = 2023 - Math.floor(k / 12);
      const mo = 12 - (k % 12);
      const start = `${y}-${String(mo).padStart(2, "0")}-01`;
      const end = mo === 12 ? `${y + 1}-01-01` : `${y}-${String(mo + 1).padStart(2, "0")}-01`;
      // Station level, season and noise (a hash of the row number) as in a real record.
      const x = -6 - (s % 25) * 0.3 + 3 * Math.sin((mo / 12) * 2 * Math.PI) + (noise(n, 1) - 0.5) * 3;
      const d = 10 + (noise(n, 2) - 0.5) * 8;
      lines.push(`${stationRows[s].code},${start},${end},${x.toFixed(2)},${(8 * x + d).toFixed(1)},${(20 + noise(n, 3) * 150).toFixed(1)},0.1,1,laser spectroscopy,Bench Laboratory,VSMOW-SLAP,VSMOW2; SLAP2,`);
    }
  const bytes = Buffer.from(lines.join("\n") + "\n");
  const limits = { maxFileBytes: 256 * 1024 * 1024, maxRows: ROWS };

  // Reading alone, once (its rows are dropped before the timed run).
  const readMs = (() => {
    const r0 = performance.now();
    const read = readSampleCsv(bytes, limits);
    if (!read.ok) throw new Error(read.message);
    return performance.now() - r0;
  })();

  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  const timings: Record<string, number> = {};
  const r = await ingestCsv({ id: me.id, name: me.name, email: me.email }, { name: "bench.csv", bytes }, { today: "2026-11-20", limits, timings });
  const totalMs = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  timings.cpu = (cpu.user + cpu.system) / 1000;
  const result: RunResult = { totalMs, readMs, timings, bytes: bytes.byteLength, inserted: r.sampleCount, maxRssMb: process.resourceUsage().maxRSS / 1024, worst: r.worst };
  process.stdout.write(`RESULT ${JSON.stringify(result)}\n`);
}

/** A repeatable value in [0, 1) from a row number and a stream (integer hash, no state). */
function noise(n: number, stream: number): number {
  let h = Math.imul(n ^ 0x9e3779b9, 0x85ebca6b) ^ Math.imul(stream, 0xc2b2ae35);
  h ^= h >>> 13;
  h = Math.imul(h, 0x27d4eb2f);
  h ^= h >>> 16;
  return (h >>> 0) / 4294967296;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

function parent(): void {
  const results: RunResult[] = [];
  for (let i = 0; i < RUNS; i++) {
    const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-bench-ingest-"));
    const out = spawnSync(process.execPath, [...process.execArgv, process.argv[1]], {
      env: { ...process.env, BENCH_INGEST_CHILD: "1", DATABASE_URL: `file:${path.join(dir, "bench.db")}`, RAINPRINT_TEST: "1" },
      encoding: "utf8",
      maxBuffer: 16 * 1024 * 1024,
    });
    rmSync(dir, { recursive: true, force: true });
    const line = out.stdout.split("\n").find((l) => l.startsWith("RESULT "));
    if (!line) {
      console.error(out.stderr || out.stdout);
      process.exit(1);
    }
    const r = JSON.parse(line.slice(7)) as RunResult;
    results.push(r);
    console.log(`run ${i + 1}: ${(r.totalMs / 1000).toFixed(2)} s (${Object.entries(r.timings).map(([k, v]) => `${k} ${(v / 1000).toFixed(2)} s`).join(", ")}), ${r.inserted.toLocaleString("en-GB")} samples inserted, peak RSS ${r.maxRssMb.toFixed(0)} MB`);
  }
  const first = results[0];
  console.log(
    `bench:ingest — ${first.inserted.toLocaleString("en-GB")} rows (${(first.bytes / 1024 / 1024).toFixed(1)} MB CSV, ${STATIONS} stations with 24 accepted months each): ` +
      `median ${(median(results.map((r) => r.totalMs)) / 1000).toFixed(2)} s wall, ${(median(results.map((r) => r.timings.cpu)) / 1000).toFixed(2)} s CPU, of ${results.length} runs (read alone ${(median(results.map((r) => r.readMs)) / 1000).toFixed(2)} s); ` +
      `peak memory ${Math.max(...results.map((r) => r.maxRssMb)).toFixed(0)} MB (goal ≤ 15 s, < 1 GB)`,
  );
}

if (process.env.BENCH_INGEST_CHILD === "1") {
  child().then(
    () => process.exit(0),
    (e) => {
      console.error(e);
      process.exit(1);
    },
  );
} else parent();
