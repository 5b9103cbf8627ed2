// Dependency and system checks shared by `npm start` and `npm test`.
// Plain Node (no TypeScript, no packages) so it runs before `npm ci`.
import { execSync, spawnSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import path from "node:path";

export const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), "..", "..");

export function log(msg) {
  process.stdout.write(`[rainprint] ${msg}\n`);
}

/** Install npm dependencies when node_modules is missing or older than the lock file. */
export function ensureDependencies() {
  const lock = path.join(root, "package-lock.json");
  const marker = path.join(root, "node_modules", ".package-lock.json");
  const stale = !existsSync(marker) || (existsSync(lock) && statSync(lock).mtimeMs > statSync(marker).mtimeMs + 1000);
  if (!stale) return;
  log("installing dependencies (npm ci) …");
  const r = spawnSync("npm", ["ci", "--no-audit", "--no-fund"], { cwd: root, stdio: "inherit" });
  if (r.status !== 0) throw new Error("npm ci failed; see the output above");
}

/** Debian's chromium for the browser tests; installed with apt when missing. */
export function ensureChromium() {
  const bin = process.env.CHROMIUM_PATH || "/usr/bin/chromium";
  if (existsSync(bin)) return bin;
  log("installing Debian's chromium for the browser tests (apt-get) …");
  const sudo = process.getuid && process.getuid() !== 0 ? "sudo " : "";
  execSync(`${sudo}apt-get update -qq && ${sudo}env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends chromium`, {
    stdio: "inherit",
  });
  if (!existsSync(bin)) throw new Error(`chromium was not found at ${bin} after installing it`);
  return bin;
}

/** Run a command, inheriting output; returns its exit status. */
export function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { cwd: root, stdio: "inherit", ...opts, env: { ...process.env, ...(opts.env || {}) } });
  return r.status ?? 1;
}
