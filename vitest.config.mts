import path from "node:path";
import { defineConfig } from "vitest/config";

// Unit tests: pure modules and server modules against a temporary database.
export default defineConfig({
  resolve: {
    alias: {
      "@": path.resolve(import.meta.dirname, "."),
      // Server modules start with `import "server-only"`, which throws outside a
      // React server bundle; tests run them as plain server code.
      "server-only": path.resolve(import.meta.dirname, "node_modules/server-only/empty.js"),
    },
  },
  test: {
    include: ["tests/unit/**/*.test.ts"],
    environment: "node",
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: "forks",
    setupFiles: ["tests/unit/setup.ts"],
  },
});
