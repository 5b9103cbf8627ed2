// Entry point of the kriging worker threads. The engine may run from TypeScript sources (tsx
// CLI, vitest) or from compiled JavaScript: a .ts worker is loaded through tsx's tsImport, which
// registers the TypeScript loader for this thread only; a .js worker is imported directly.
import { workerData } from "node:worker_threads";

const entry = workerData.entry;
if (entry.endsWith(".ts")) {
  const { tsImport } = await import("tsx/esm/api");
  await tsImport(entry, import.meta.url);
} else {
  await import(entry);
}
