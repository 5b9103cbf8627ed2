import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";

// Every unit-test file gets its own empty database file unless it sets one.
if (!process.env.RAINPRINT_KEEP_DB_URL) {
  const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-unit-"));
  process.env.DATABASE_URL = `file:${path.join(dir, "test.db")}`;
}
process.env.RAINPRINT_TEST = "1";
// Site lookups inline on the test's own thread (threads take a second to start in every file);
// tests/unit/editions/predict-pool.test.ts starts real threads and checks they answer the same.
process.env.PREDICT_THREADS ??= "0";
