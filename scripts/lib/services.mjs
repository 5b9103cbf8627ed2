// Starting and stopping Rainprint's processes: the local stand-ins, the
// worker and the web app. Used by `npm start` and by the end-to-end test setup.
import { spawn } from "node:child_process";
import { existsSync, mkdirSync, openSync, readFileSync, writeFileSync } from "node:fs";
import net from "node:net";
import path from "node:path";
import { randomBytes } from "node:crypto";
import { root, log } from "./deps.mjs";

const tsx = path.join(root, "node_modules", ".bin", "tsx");
const next = path.join(root, "node_modules", ".bin", "next");

/** A free TCP port on 127.0.0.1. */
export function freePort() {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address();
      srv.close(() => resolve(port));
    });
  });
}

/** The secret that signs sessions: NEXTAUTH_SECRET, else one kept in data/. */
export function authSecret() {
  if (process.env.NEXTAUTH_SECRET) return process.env.NEXTAUTH_SECRET;
  const file = path.join(root, "data", ".auth-secret");
  if (existsSync(file)) return readFileSync(file, "utf8").trim();
  mkdirSync(path.dirname(file), { recursive: true });
  const s = randomBytes(32).toString("base64url");
  writeFileSync(file, s + "\n", { mode: 0o600 });
  return s;
}

/**
 * The environment every Rainprint process shares for one deployment on this
 * machine. `ports` = { app, mail, stripe }.
 */
export function localEnv({ ports, databaseUrl, test = false }) {
  const appUrl = `http://localhost:${ports.app}`;
  return {
    DATABASE_URL: databaseUrl,
    APP_URL: appUrl,
    NEXTAUTH_URL: appUrl,
    NEXTAUTH_SECRET: authSecret(),
    RESEND_BASE_URL: `http://127.0.0.1:${ports.mail}`,
    RESEND_API_KEY: "re_local_standin",
    STRIPE_API_BASE: `http://127.0.0.1:${ports.stripe}`,
    STRIPE_SECRET_KEY: "sk_test_local_standin",
    STRIPE_WEBHOOK_SECRET: "whsec_local_standin_secret",
    MAIL_STANDIN_PORT: String(ports.mail),
    STRIPE_STANDIN_PORT: String(ports.stripe),
    // Where the payments stand-in delivers webhook events.
    STRIPE_STANDIN_WEBHOOK_URL: `${appUrl}/api/stripe/webhook`,
    RAINPRINT_TEST: test ? "1" : "0",
  };
}

async function waitForHttp(url, { timeoutMs = 60_000, child, name }) {
  const start = Date.now();
  for (;;) {
    if (child && child.exitCode !== null) throw new Error(`${name} exited with code ${child.exitCode} before it was ready`);
    try {
      const res = await fetch(url, { signal: AbortSignal.timeout(2000) });
      if (res.ok) return;
    } catch {
      // not up yet
    }
    if (Date.now() - start > timeoutMs) throw new Error(`${name} did not answer at ${url} within ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/**
 * Start a set of processes. Each spec: { name, cmd, args, health? }.
 * Returns { stop() } that stops all of them (SIGTERM, then SIGKILL).
 */
export async function startProcesses(specs, { env, quiet = false, logDir } = {}) {
  const children = [];
  const stop = async () => {
    await Promise.all(
      children.map(
        (c) =>
          new Promise((resolve) => {
            if (c.exitCode !== null || c.signalCode !== null) return resolve();
            c.once("exit", () => resolve());
            try {
              process.kill(-c.pid, "SIGTERM");
            } catch {
              c.kill("SIGTERM");
            }
            setTimeout(() => {
              try {
                process.kill(-c.pid, "SIGKILL");
              } catch {
                // already gone
              }
              resolve();
            }, 5000).unref();
          }),
      ),
    );
  };
  try {
    for (const spec of specs) {
      const out = logDir ? openLog(logDir, spec.name) : null;
      const child = spawn(spec.cmd, spec.args, {
        cwd: root,
        env: { ...process.env, ...env, ...(spec.env || {}) },
        stdio: out ? ["ignore", out, out] : quiet ? ["ignore", "ignore", "inherit"] : "inherit",
        detached: true,
      });
      child.name = spec.name;
      children.push(child);
      if (spec.health) await waitForHttp(spec.health, { child, name: spec.name, timeoutMs: spec.timeoutMs });
      if (!quiet) log(`${spec.name} is up`);
    }
  } catch (e) {
    await stop();
    throw e;
  }
  return { stop, children };
}

function openLog(dir, name) {
  mkdirSync(dir, { recursive: true });
  // numeric fd for spawn's stdio
  return openSync(path.join(dir, `${name.replace(/\W+/g, "-")}.log`), "a");
}

/** Specs for the standard set of Rainprint processes. */
export function serviceSpecs({ ports, withApp = true }) {
  const specs = [];
  const mail = path.join(root, "scripts", "standins", "mail.ts");
  if (existsSync(mail))
    specs.push({ name: "mail stand-in", cmd: tsx, args: [mail], health: `http://127.0.0.1:${ports.mail}/health` });
  const stripe = path.join(root, "scripts", "standins", "stripe.ts");
  if (existsSync(stripe))
    specs.push({ name: "payments stand-in", cmd: tsx, args: [stripe], health: `http://127.0.0.1:${ports.stripe}/health` });
  const worker = path.join(root, "scripts", "worker.ts");
  // The react-server condition lets the worker load modules marked `import "server-only"`.
  if (existsSync(worker)) specs.push({ name: "worker", cmd: tsx, args: ["--conditions=react-server", worker] });
  if (withApp)
    specs.push({
      name: "web app",
      cmd: next,
      args: ["start", "-p", String(ports.app)],
      health: `http://127.0.0.1:${ports.app}/api/health`,
      timeoutMs: 90_000,
    });
  return specs;
}
