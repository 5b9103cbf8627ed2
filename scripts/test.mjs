#!/usr/bin/env node
// `npm test`: everything, from a fresh clone. Installs what is missing
// (npm dependencies, Debian's chromium), then runs lint, unit tests, the
// production build, the type check and the end-to-end tests, stops what it
// started, and ends with "N passed, N failed".
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";
import path from "node:path";
import { ensureChromium, ensureDependencies, log, root, run } from "./lib/deps.mjs";

const only = process.argv.slice(2); // e.g. `npm test -- unit`
const want = (step) => only.length === 0 || only.includes(step);

ensureDependencies();
const chromium = want("e2e") ? ensureChromium() : undefined;
const { ensureBuild } = await import("./lib/build.mjs");

const results = path.join(root, "test-results");
mkdirSync(results, { recursive: true });
let passed = 0;
let failed = 0;
const summary = [];

function step(name, fn) {
  if (!want(name)) return;
  const t0 = Date.now();
  log(`── ${name} ──`);
  let ok;
  try {
    ok = fn();
  } catch (e) {
    console.error(e instanceof Error ? e.message : e);
    ok = false;
  }
  summary.push(`${name}: ${ok ? "ok" : "FAILED"} (${((Date.now() - t0) / 1000).toFixed(0)} s)`);
  return ok;
}

// A check that is not a test file (lint, type check, build) counts as one test.
function check(name, fn) {
  const ok = step(name, fn);
  if (ok === undefined) return;
  if (ok) passed++;
  else failed++;
}

function vitest(name, config) {
  const out = path.join(results, `${name}.json`);
  rmSync(out, { force: true });
  return step(name, () => {
    const status = run(path.join(root, "node_modules", ".bin", "vitest"), [
      "run",
      "--config",
      config,
      "--reporter=default",
      "--reporter=json",
      `--outputFile.json=${out}`,
    ], { env: { CHROMIUM_PATH: chromium ?? "", NODE_OPTIONS: "--max-old-space-size=4096" } });
    if (existsSync(out)) {
      const r = JSON.parse(readFileSync(out, "utf8"));
      passed += r.numPassedTests;
      failed += r.numFailedTests;
      // A file that failed to load, or whose setup hook failed (its tests then show as skipped),
      // counts as one failure even though none of its tests failed.
      const broken = (r.testResults || []).filter(
        (f) => f.status === "failed" && !(f.assertionResults || []).some((a) => a.status === "failed"),
      ).length;
      failed += broken;
      // Whatever else made vitest fail (an unhandled error) must not end as "0 failed".
      if (status !== 0 && r.numFailedTests === 0 && broken === 0) failed++;
    } else if (status !== 0) {
      failed++;
    }
    return status === 0;
  });
}

check("lint", () => run(path.join(root, "node_modules", ".bin", "eslint"), [".", "--max-warnings=0"]) === 0);
vitest("unit", "vitest.config.mts");
let built = true;
if (want("e2e") || want("build")) {
  check("build", () => {
    try {
      ensureBuild();
      return true;
    } catch (e) {
      built = false;
      throw e;
    }
  });
}
check("typecheck", () => run(path.join(root, "node_modules", ".bin", "tsc"), ["--noEmit", "-p", "tsconfig.json"]) === 0);
if (built) vitest("e2e", "vitest.e2e.config.mts");
else if (want("e2e")) {
  failed++;
  summary.push("e2e: skipped because the build failed (counted as one failure)");
}

log("── summary ──");
for (const s of summary) log(s);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
