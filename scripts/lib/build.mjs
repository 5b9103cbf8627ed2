// Production build of the web app, skipped when nothing it depends on changed.
import { createHash } from "node:crypto";
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { log, root, run } from "./deps.mjs";

const INPUTS = ["app", "components", "lib", "db", "public", "fonts", "package-lock.json", "next.config.mjs", "tailwind.config.ts", "postcss.config.mjs", "tsconfig.json", "proxy.ts", "instrumentation.ts"];

function walk(p, out) {
  if (!existsSync(p)) return;
  const st = statSync(p);
  if (st.isDirectory()) {
    for (const e of readdirSync(p).sort()) walk(path.join(p, e), out);
  } else out.push(p);
}

export function sourceHash() {
  const files = [];
  for (const i of INPUTS) walk(path.join(root, i), files);
  const h = createHash("sha256");
  for (const f of files) {
    h.update(path.relative(root, f));
    h.update(readFileSync(f));
  }
  return h.digest("hex");
}

/** Build unless .next holds a build of exactly these sources. */
export function ensureBuild({ force = false } = {}) {
  const stamp = path.join(root, ".next", "rainprint-source-hash");
  const hash = sourceHash();
  if (!force && existsSync(path.join(root, ".next", "BUILD_ID")) && existsSync(stamp) && readFileSync(stamp, "utf8") === hash) {
    log("production build is up to date");
    return;
  }
  log("building the web app (next build) …");
  const status = run(path.join(root, "node_modules", ".bin", "next"), ["build"], { env: { NEXT_TELEMETRY_DISABLED: "1" } });
  if (status !== 0) throw new Error("next build failed; see the output above");
  writeFileSync(stamp, hash);
}
