import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import "vitest";
import type { TestProject } from "vitest/node";
// @ts-expect-error plain ESM helper without type declarations
import { run } from "../../scripts/lib/deps.mjs";
// @ts-expect-error plain ESM helper without type declarations
import { freePort, localEnv, serviceSpecs, startProcesses } from "../../scripts/lib/services.mjs";

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    mailUrl: string;
    stripeUrl: string;
    databaseUrl: string;
    env: Record<string, string>;
  }
}

// One deployment for the whole end-to-end run: a fresh database in a temporary
// folder, the stand-ins, the worker and the production build on free ports.
export default async function setup(project: TestProject) {
  const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-e2e-"));
  const ports = { app: await freePort(), mail: await freePort(), stripe: await freePort() };
  const databaseUrl = `file:${path.join(dir, "e2e.db")}`;
  const env = { ...localEnv({ ports, databaseUrl, test: true }), RAINPRINT_SEED_PROFILE: "test" } as Record<string, string>;

  const status = run(path.resolve("node_modules/.bin/tsx"), ["--conditions=react-server", path.resolve("scripts/setup.ts")], { env });
  if (status !== 0) throw new Error("scripts/setup.ts failed for the end-to-end database");

  const logDir = path.resolve("test-results", "logs");
  const services = await startProcesses(serviceSpecs({ ports }), { env, quiet: true, logDir });

  // The demo subscriptions (researcher, lakeshore-basin) through the stand-in and the app's webhook route.
  const seeded = run(path.resolve("node_modules/.bin/tsx"), ["--conditions=react-server", path.resolve("scripts/seed-billing.ts")], { env });
  if (seeded !== 0) {
    await services.stop();
    throw new Error("scripts/seed-billing.ts failed for the end-to-end deployment");
  }

  project.provide("baseUrl", `http://localhost:${ports.app}`);
  project.provide("mailUrl", `http://127.0.0.1:${ports.mail}`);
  project.provide("stripeUrl", `http://127.0.0.1:${ports.stripe}`);
  project.provide("databaseUrl", databaseUrl);
  project.provide("env", env);

  return async () => {
    await services.stop();
  };
}
