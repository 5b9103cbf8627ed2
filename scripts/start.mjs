#!/usr/bin/env node
// `npm start`: everything Rainprint needs on one machine, from a fresh clone.
// Installs dependencies if missing, applies migrations, seeds the synthetic demo
// once, builds, then runs the local stand-ins, the worker and the web app.
import { readFileSync } from "node:fs";
import path from "node:path";
import { ensureDependencies, log, root, run } from "./lib/deps.mjs";

ensureDependencies();

const { ensureBuild } = await import("./lib/build.mjs");
const { localEnv, serviceSpecs, startProcesses } = await import("./lib/services.mjs");

const ports = {
  app: Number(process.env.PORT || 3000),
  mail: Number(process.env.MAIL_STANDIN_PORT || 4010),
  stripe: Number(process.env.STRIPE_STANDIN_PORT || 4020),
};
const env = {
  ...localEnv({ ports, databaseUrl: process.env.DATABASE_URL || "file:./data/rainprint.db" }),
  // Keep the stand-in's mailbox across restarts of `npm start`.
  MAIL_STANDIN_STORE: path.join(root, "data", "mailbox.json"),
};

log("applying migrations and seeding the synthetic demo data (first run only) …");
if (run(path.join(root, "node_modules", ".bin", "tsx"), ["--conditions=react-server", path.join(root, "scripts", "setup.ts")], { env }) !== 0) {
  process.exit(1);
}
ensureBuild();

const services = await startProcesses(serviceSpecs({ ports }), { env });

// Demo subscriptions go through the running stand-in and the app's webhook route, so they come after both.
log("creating the demo subscriptions through the payments stand-in (first run only) …");
if (run(path.join(root, "node_modules", ".bin", "tsx"), ["--conditions=react-server", path.join(root, "scripts", "seed-billing.ts")], { env }) !== 0) {
  log("the demo subscriptions could not be created (see above); Rainprint runs without them");
}

const accounts = JSON.parse(readFileSync(path.join(root, "db", "seed", "demo-accounts.json"), "utf8"));
log("");
log(`Rainprint is running at ${env.APP_URL}`);
log(`mailbox of the e-mail stand-in: ${env.APP_URL}/dev/mailbox`);
log("demo sign-ins (synthetic demo data):");
for (const a of accounts.accounts) log(`  ${a.label.padEnd(28)} ${a.email.padEnd(36)} ${a.password}`);
log("press Ctrl+C to stop");

let stopping = false;
async function shutdown() {
  if (stopping) return;
  stopping = true;
  log("stopping …");
  await services.stop();
  process.exit(0);
}
process.on("SIGINT", shutdown);
process.on("SIGTERM", shutdown);
for (const c of services.children) {
  c.on("exit", (code) => {
    if (!stopping) {
      log(`${c.name} stopped unexpectedly (exit ${code}); shutting down`);
      shutdown();
    }
  });
}
