// Entry point of the kriging worker threads. The engine runs either from TypeScript sources (tsx
// CLI, vitest, the job worker) or from compiled JavaScript. A .ts worker is loaded through tsx's
// CommonJS loader, registered for this thread only (much faster to start than the ESM loader,
// whose hooks need their own thread); if the sources are ES modules, tsx's tsImport is used.
/* eslint-disable @typescript-eslint/no-require-imports */
const { workerData } = require("node:worker_threads");

const entry = workerData.entryPath;
if (!entry.endsWith(".ts")) {
  require(entry);
} else {
  try {
    require("tsx/cjs/api").register();
    require(entry);
  } catch (e) {
    if (!e || (e.code !== "ERR_REQUIRE_ESM" && e.code !== "ERR_REQUIRE_ASYNC_MODULE")) throw e;
    import("tsx/esm/api").then(({ tsImport }) => tsImport(require("node:url").pathToFileURL(entry).href, __filename));
  }
}
