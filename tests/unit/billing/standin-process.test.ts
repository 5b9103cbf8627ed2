// The stand-in as `npm start` and the end-to-end setup run it: its own process
// (scripts/standins/stripe.ts under tsx), configured by environment variables.
import Stripe from "stripe";
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";

const tsx = path.resolve("node_modules/.bin/tsx");
const script = path.resolve("scripts/standins/stripe.ts");
let child: ChildProcess | null = null;

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.listen(0, "127.0.0.1", () => {
      const { port } = srv.address() as net.AddressInfo;
      srv.close(() => resolve(port));
    });
  });
}

async function start(env: Record<string, string>): Promise<number> {
  const port = await freePort();
  child = spawn(tsx, [script], {
    env: { ...process.env, RAINPRINT_TEST: "0", STRIPE_STANDIN_PORT: String(port), ...env },
    stdio: ["ignore", "pipe", "pipe"],
  });
  for (let i = 0; i < 120; i++) {
    try {
      const res = await fetch(`http://127.0.0.1:${port}/health`);
      if (res.ok) return port;
    } catch {
      // not yet
    }
    if (child.exitCode !== null) throw new Error(`stand-in exited with ${child.exitCode}`);
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error("stand-in did not start");
}

function stop(): Promise<number | null> {
  const c = child;
  child = null;
  if (!c || c.exitCode !== null) return Promise.resolve(c?.exitCode ?? null);
  return new Promise((resolve) => {
    c.once("exit", (code) => resolve(code));
    c.kill("SIGTERM");
  });
}

afterEach(async () => {
  await stop();
});

describe("the stand-in process", () => {
  it("serves the SDK on 127.0.0.1, keeps state in its file and stops cleanly on SIGTERM", async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "rainprint-standin-proc-")), "state.json");
    const port = await start({ STRIPE_STANDIN_STATE: file, STRIPE_SECRET_KEY: "sk_test_proc" });
    const stripe = new Stripe("sk_test_proc", { host: "127.0.0.1", port, protocol: "http" });
    const c = await stripe.customers.create({ email: "proc@example.test" });
    // Without RAINPRINT_TEST or STRIPE_STANDIN_CONTROL there is no control API.
    expect((await fetch(`http://127.0.0.1:${port}/_standin/state`)).status).toBe(404);
    expect(await stop()).toBe(0);
    expect(existsSync(file)).toBe(true);
    expect(JSON.parse(readFileSync(file, "utf8")).customers[c.id].email).toBe("proc@example.test");
  });

  it("refuses to start without a port, naming the setting", async () => {
    const c = spawn(tsx, [script], { env: { ...process.env, STRIPE_STANDIN_PORT: "" }, stdio: ["ignore", "pipe", "pipe"] });
    let err = "";
    c.stderr.on("data", (d: Buffer) => (err += d.toString()));
    const code = await new Promise<number | null>((r) => c.once("exit", (x) => r(x)));
    expect(code).toBe(2);
    expect(err).toContain("STRIPE_STANDIN_PORT");
  });

  it("keeps state in memory and serves the control API under RAINPRINT_TEST=1", async () => {
    const port = await start({ RAINPRINT_TEST: "1" });
    const res = await fetch(`http://127.0.0.1:${port}/_standin/clock`);
    expect(res.status).toBe(200);
    expect(((await res.json()) as { offset_seconds: number }).offset_seconds).toBe(0);
  });
});
