import path from "node:path";
import { defineConfig } from "vitest/config";

// Unit tests: pure modules and server modules against a temporary database.
export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname, ".") } },
  test: {
    include: ["tests/unit/**/*.test.ts"],
    environment: "node",
    testTimeout: 60_000,
    hookTimeout: 60_000,
    pool: "forks",
    setupFiles: ["tests/unit/setup.ts"],
  },
});
