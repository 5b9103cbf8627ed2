// `npm run bench:api`: what the public API's own machinery (caller, key lookup,
// plan, quota counting, headers) costs per request, against a production build.
// Loads a trivial health route and v1 endpoints with autocannon (64 connections)
// and prints requests per second, p50/p99 latency, errors and the ratio to the
// health route — medians of several runs — then the single-site predict route against
// the goals (≥ half the health route's throughput, p99 < 50 ms, no errors), the same
// route at a light load (4 connections) for the latency of one lookup on an unsaturated server,
// and the time of a 10,000-site POST batch (goal ≤ 3 s). A benchmark, not a test: it asserts nothing.
// The edition: the database's own when the editions build made one, else the test fixture
// edition written from the seeded stations (tests/shared/fixture-edition-db.ts).
//
//   BENCH_SECONDS (default 20) per run, BENCH_WARMUP_SECONDS (default 5), BENCH_RUNS (default 3), BENCH_CONNECTIONS (default 64),
//   BENCH_LIGHT_CONNECTIONS (default 4), BENCH_BATCH_RUNS (default 3), BENCH_ONLY=predict (only health, predict and the batch)
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { createClient } from "@libsql/client";
import { generateApiKey } from "../lib/api/key-format";
import { ensureLookupEdition } from "../tests/shared/fixture-edition-db";
// @ts-expect-error plain ESM helper without type declarations
import { ensureBuild } from "./lib/build.mjs";
// @ts-expect-error plain ESM helper without type declarations
import { freePort, localEnv, serviceSpecs, startProcesses } from "./lib/services.mjs";

const SECONDS = Number(process.env.BENCH_SECONDS ?? 20);
const WARMUP_SECONDS = Number(process.env.BENCH_WARMUP_SECONDS ?? 5);
const BATCH_RUNS = Number(process.env.BENCH_BATCH_RUNS ?? 3);
const BATCH_SITES = 10_000;
const RUNS = Number(process.env.BENCH_RUNS ?? 3);
const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 64);
/** A light load for the latency of one lookup on a server that is not saturated (for comparison only). */
const LIGHT_CONNECTIONS = Number(process.env.BENCH_LIGHT_CONNECTIONS ?? 4);

/** `paths`: cycle through these instead of repeating `path` (every predict request asks for another site). */
type Target = { name: string; path: string; withKey: boolean; paths?: string[] };
const PREDICT_NAME = "GET /api/v1/predict (key; a different site each request)";
const TARGETS: Target[] = [
  { name: "health (trivial route)", path: "/api/health", withKey: false },
  { name: "GET /api/v1 (key; caller + headers, free)", path: "/api/v1", withKey: true },
  { name: "GET /api/v1/stations/{code} (key; counted, means of ~36 samples)", path: "/api/v1/stations/RP-EUR-001", withKey: true },
  { name: "GET /api/v1/stations?limit=20 (anonymous partition per connection)", path: "/api/v1/stations?limit=20", withKey: false },
];

type Result = { rps: number; p50: number; p99: number; non2xx: number; errors: number };

const median = (xs: number[]) => xs.slice().sort((a, b) => a - b)[Math.floor(xs.length / 2)];

async function load(url: string, headers: Record<string, string>, seconds: number, paths?: string[], connections = CONNECTIONS): Promise<Result> {
  let next = 0;
  const requests = paths
    ? [
        {
          setupRequest: (req: { path?: string }) => {
            req.path = paths[next++ % paths.length];
            return req;
          },
        },
      ]
    : undefined;
  const r = await autocannon({ url, connections, duration: seconds, headers, ...(requests ? { requests } : {}) });
  return { rps: r.requests.average, p50: r.latency.p50, p99: r.latency.p99, non2xx: r.non2xx, errors: r.errors + r.timeouts };
}

async function main() {
  ensureBuild();
  const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-bench-api-"));
  const ports = { app: await freePort(), mail: await freePort(), stripe: await freePort() };
  const databaseUrl = `file:${path.join(dir, "bench.db")}`;
  const env = { ...localEnv({ ports, databaseUrl, test: false }), RAINPRINT_SEED_PROFILE: "test" } as Record<string, string>;
  const setup = spawnSync(path.resolve("node_modules/.bin/tsx"), ["--conditions=react-server", path.resolve("scripts/setup.ts")], { env: { ...process.env, ...env }, stdio: "inherit" });
  if (setup.status !== 0) throw new Error("scripts/setup.ts failed");

  const db = createClient({ url: databaseUrl });
  const edition = await ensureLookupEdition(db);
  // 2,000 different sites (reproducible), so no answer is ever the same request twice in a row
  let s0 = 7;
  const r0 = () => ((s0 = (Math.imul(s0, 1664525) + 1013904223) >>> 0) / 4294967296); // LCG, Numerical Recipes [trade]
  const sitePaths = Array.from({ length: 2000 }, () => `/api/v1/predict?lat=${(-45 + 110 * r0()).toFixed(4)}&lon=${(-180 + 360 * r0()).toFixed(4)}&elevation=${Math.round(2000 * r0())}&edition=${edition}`);
  TARGETS.push({ name: PREDICT_NAME, path: sitePaths[0], withKey: true, paths: sitePaths });
  if (process.env.BENCH_ONLY === "predict") TARGETS.splice(1, TARGETS.length - 2);

  // One Institution organisation and key per keyed run (and per batch), so no run meets a daily quota.
  const owner = String((await db.execute("SELECT id FROM users WHERE email = 'institution@rainprint.example'")).rows[0].id);
  const keys: string[] = [];
  for (let i = 0; i < TARGETS.length * RUNS + 1 + RUNS + BATCH_RUNS + 1; i++) {
    const orgId = crypto.randomUUID();
    const { key, prefix, hash } = generateApiKey();
    await db.batch(
      [
        { sql: "INSERT INTO organizations (id, name, slug, is_demo, created_at) VALUES (?, ?, ?, 1, ?)", args: [orgId, `Bench ${i}`, `bench-${i}-${orgId.slice(0, 8)}`, Date.now()] },
        { sql: "INSERT INTO memberships (organization_id, user_id, role, created_at) VALUES (?, ?, 'owner', ?)", args: [orgId, owner, Date.now()] },
        {
          sql: "INSERT INTO subscriptions (id, organization_id, plan, interval, status, stripe_customer_id, stripe_subscription_id, seats, cancel_at_period_end, created_at) VALUES (?, ?, 'institution', 'year', 'active', ?, ?, 3, 0, ?)",
          args: [crypto.randomUUID(), orgId, `cus_bench_${i}`, `sub_bench_${orgId}`, Date.now()],
        },
        { sql: "INSERT INTO api_keys (id, user_id, organization_id, name, prefix, hash, scopes, created_at) VALUES (?, ?, ?, ?, ?, ?, '[\"api:v1\"]', ?)", args: [crypto.randomUUID(), owner, orgId, `bench ${i}`, prefix, hash, Date.now()] },
      ],
      "write",
    );
    keys.push(key);
  }
  db.close();

  const services = await startProcesses(serviceSpecs({ ports }).filter((s: { name: string }) => s.name === "web app"), { env, quiet: true, logDir: path.join(dir, "logs") });
  const base = `http://127.0.0.1:${ports.app}`;
  try {
    console.log(`\nbench:api — ${CONNECTIONS} connections, ${SECONDS} s per run, median of ${RUNS} runs (os.cpus: ${os.cpus().length})\n`);
    let k = 0;
    // Warm up every route (first-request compilation of server chunks, lazy caches, the JIT of the
    // request thread and of the prediction threads), BENCH_WARMUP_SECONDS (default 5) each.
    for (const t of TARGETS) await load(`${base}${t.path}`, t.withKey ? { authorization: `Bearer ${keys[k]}` } : {}, WARMUP_SECONDS, t.paths);
    k++;
    const rows: { name: string; r: Result }[] = [];
    for (const t of TARGETS) {
      const runs: Result[] = [];
      for (let i = 0; i < RUNS; i++) {
        // Anonymous runs: each run from its own documentation address (RFC 5737), so the Open quota is
        // what answers beyond 50 requests — those answers are 429s and show up as non-2xx.
        const headers: Record<string, string> = t.withKey ? { authorization: `Bearer ${keys[k++]}` } : { "x-forwarded-for": `198.51.100.${i + 1}` };
        runs.push(await load(`${base}${t.path}`, headers, SECONDS, t.paths));
      }
      rows.push({ name: t.name, r: { rps: median(runs.map((x) => x.rps)), p50: median(runs.map((x) => x.p50)), p99: median(runs.map((x) => x.p99)), non2xx: median(runs.map((x) => x.non2xx)), errors: median(runs.map((x) => x.errors)) } });
    }
    const health = rows[0].r.rps;
    console.log("target".padEnd(72) + "req/s".padStart(9) + "p50 ms".padStart(9) + "p99 ms".padStart(9) + "non-2xx".padStart(9) + "errors".padStart(8) + "  vs health");
    for (const { name, r } of rows)
      console.log(name.padEnd(72) + r.rps.toFixed(0).padStart(9) + r.p50.toFixed(1).padStart(9) + r.p99.toFixed(1).padStart(9) + String(r.non2xx).padStart(9) + String(r.errors).padStart(8) + `  ${(r.rps / health).toFixed(2)}`);
    console.log("\nThe anonymous row answers 429 after the Open plan's daily quota: it measures refusals (quota checks in memory), not data.");

    const predict = rows.find((r) => r.name === PREDICT_NAME)!.r;
    const ratio = predict.rps / health;
    console.log(`\nsingle-site predict (edition ${edition}):`);
    console.log(`  throughput ${predict.rps.toFixed(0)} req/s = ${ratio.toFixed(2)} × health (goal ≥ 0.50: ${ratio >= 0.5 ? "met" : "NOT met"})`);
    console.log(`  p50 ${predict.p50.toFixed(1)} ms, p99 ${predict.p99.toFixed(1)} ms (goal < 50 ms: ${predict.p99 < 50 ? "met" : "NOT met"})`);
    console.log(`  errors ${predict.errors}, non-2xx ${predict.non2xx} (goal 0: ${predict.errors + predict.non2xx === 0 ? "met" : "NOT met"})`);
    // With a fixed number of connections each waiting for its answer, mean latency = connections / throughput
    // (Little's law [trade]): at 64 connections a p99 under 50 ms needs well over 1,280 answers a second.
    const healthRow = rows[0].r;
    console.log(
      `  at ${CONNECTIONS} connections every request queues behind the others: mean latency = ${CONNECTIONS} / throughput (Little's law) = ${((1000 * CONNECTIONS) / predict.rps).toFixed(0)} ms for predict, ${((1000 * CONNECTIONS) / healthRow.rps).toFixed(0)} ms for the trivial health route (its p99: ${healthRow.p99.toFixed(0)} ms)`,
    );
    const light: Result[] = [];
    for (let i = 0; i < RUNS; i++) light.push(await load(`${base}${sitePaths[0]}`, { authorization: `Bearer ${keys[k++]}` }, SECONDS, sitePaths, LIGHT_CONNECTIONS));
    console.log(
      `  at ${LIGHT_CONNECTIONS} connections (not saturated; for comparison): ${median(light.map((x) => x.rps)).toFixed(0)} req/s, p50 ${median(light.map((x) => x.p50)).toFixed(1)} ms, p99 ${median(light.map((x) => x.p99)).toFixed(1)} ms, errors ${median(light.map((x) => x.errors + x.non2xx))}`,
    );

    // A 10,000-site batch: sites spread over the inhabited latitudes, reproducible.
    let seed = 20261202;
    const rnd = () => ((seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0) / 4294967296); // LCG, Numerical Recipes [trade]
    const sites = Array.from({ length: BATCH_SITES }, (_, i) => ({ id: `s${i}`, lat: Number((-45 + 110 * rnd()).toFixed(4)), lon: Number((-180 + 360 * rnd()).toFixed(4)), elevation: Math.round(2000 * rnd()) }));
    const body = JSON.stringify({ edition, sites });
    const times: number[] = [];
    const post = async (key: string) => {
      const t0 = performance.now();
      const res = await fetch(`${base}/api/v1/predict`, { method: "POST", headers: { authorization: `Bearer ${key}`, "content-type": "application/json" }, body });
      const text = await res.text();
      const ms = performance.now() - t0;
      if (res.status !== 200) throw new Error(`batch answered ${res.status}: ${text.slice(0, 300)}`);
      return { ms, bytes: text.length, count: (JSON.parse(text) as { count: number }).count };
    };
    await post(keys[k++]); // warm-up
    let last = { ms: 0, bytes: 0, count: 0 };
    for (let i = 0; i < BATCH_RUNS; i++) {
      last = await post(keys[k++]);
      times.push(last.ms);
    }
    const med = median(times);
    console.log(`\n${BATCH_SITES.toLocaleString("en")}-site POST /api/v1/predict (JSON in, ${(last.bytes / 1e6).toFixed(1)} MB JSON out, ${last.count} predictions):`);
    console.log(`  runs ${times.map((t) => (t / 1000).toFixed(2)).join(" s, ")} s; median ${(med / 1000).toFixed(2)} s (goal ≤ 3 s: ${med <= 3000 ? "met" : "NOT met"})`);
  } catch (e) {
    // what the app server said, before its log is removed with the rest
    const logFile = path.join(dir, "logs", "web-app.log");
    if (existsSync(logFile)) console.error(`--- last lines of the web app's log ---\n${readFileSync(logFile, "utf8").split("\n").slice(-60).join("\n")}`);
    throw e;
  } finally {
    await services.stop();
    rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
