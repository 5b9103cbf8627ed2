import { AppError, errors } from "@/lib/errors";

// Reading request bodies with a hard size limit, enforced while reading (a
// missing or false Content-Length does not get around it).

export const DEFAULT_JSON_LIMIT_BYTES = 64 * 1024;

/** Read at most `limitBytes` of the body; 413 beyond that. */
export async function readBodyLimited(req: Request, limitBytes: number): Promise<Uint8Array> {
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (Number.isFinite(declared) && declared > limitBytes) throw errors.tooLarge(limitBytes);
  if (!req.body) return new Uint8Array();
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > limitBytes) {
      await reader.cancel().catch(() => {});
      throw errors.tooLarge(limitBytes);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(size);
  let o = 0;
  for (const c of chunks) {
    out.set(c, o);
    o += c.byteLength;
  }
  return out;
}

/** Parse a JSON or form body (size-limited) into a plain object; empty body → {}. */
export async function readStructuredBody(req: Request, limitBytes = DEFAULT_JSON_LIMIT_BYTES): Promise<unknown> {
  const bytes = await readBodyLimited(req, limitBytes);
  if (bytes.byteLength === 0) return {};
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  const text = new TextDecoder().decode(bytes);
  if (type === "application/json" || type === "" || type.endsWith("+json")) {
    try {
      return JSON.parse(text);
    } catch {
      throw new AppError("malformed-body", { detail: "The body is not valid JSON." });
    }
  }
  if (type === "application/x-www-form-urlencoded") return Object.fromEntries(new URLSearchParams(text));
  throw new AppError("unsupported-media-type", { detail: "Send JSON (application/json) or a URL-encoded form." });
}
