import path from "node:path";
import { defineConfig } from "vitest/config";

// End-to-end tests: HTTP and headless-chromium tests against a production build
// with the local stand-ins and the worker, started once by the global setup.
export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname, ".") } },
  test: {
    include: ["tests/e2e/**/*.test.ts"],
    environment: "node",
    globalSetup: ["tests/e2e/global-setup.ts"],
    fileParallelism: false,
    testTimeout: 180_000,
    hookTimeout: 180_000,
    pool: "forks",
  },
});
