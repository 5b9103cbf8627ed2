// Streaming a download: text chunks from a (sync or async) generator become a
// ReadableStream that is pulled as the client reads, so a large file never
// sits whole in memory. Pure web APIs (works in route handlers and tests).

export type Chunks = Iterable<string> | AsyncIterable<string>;

export function chunksToStream(chunks: Chunks): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  const it: Iterator<string> | AsyncIterator<string> =
    Symbol.asyncIterator in chunks ? (chunks as AsyncIterable<string>)[Symbol.asyncIterator]() : (chunks as Iterable<string>)[Symbol.iterator]();
  return new ReadableStream<Uint8Array>({
    async pull(controller) {
      try {
        const next = await it.next();
        if (next.done) controller.close();
        else controller.enqueue(encoder.encode(next.value));
      } catch (e) {
        controller.error(e);
      }
    },
    async cancel() {
      await it.return?.();
    },
  });
}

const CONTENT_TYPES = {
  csv: "text/csv; charset=utf-8; header=present",
  geojson: "application/geo+json; charset=utf-8",
  tif: "image/tiff; application=geotiff",
} as const;

/** Headers for a file download (attachment with a safe file name, never cached by shared caches). */
export function downloadHeaders(fileName: string, kind: keyof typeof CONTENT_TYPES, extra: Record<string, string> = {}): Headers {
  const safe = fileName.replace(/[^A-Za-z0-9._-]/g, "_");
  return new Headers({
    "Content-Type": CONTENT_TYPES[kind],
    "Content-Disposition": `attachment; filename="${safe}"`,
    "Cache-Control": "private, no-store",
    "X-Content-Type-Options": "nosniff",
    ...extra,
  });
}
