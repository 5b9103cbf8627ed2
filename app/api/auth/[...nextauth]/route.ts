import NextAuth from "next-auth";
import { authOptions } from "@/lib/auth/options";
import { errors, toProblemResponse } from "@/lib/errors";

// next-auth's endpoints (/api/auth/csrf, /session, /signin/*, /callback/*, /signout …).
// Its forms are small: larger bodies are refused before next-auth reads them.
const MAX_BODY_BYTES = 16 * 1024;

const handler = NextAuth(authOptions);

type Ctx = { params: Promise<{ nextauth: string[] }> };

export async function GET(req: Request, ctx: Ctx): Promise<Response> {
  return handler(req, ctx);
}

export async function POST(req: Request, ctx: Ctx): Promise<Response> {
  const declared = Number(req.headers.get("content-length") ?? NaN);
  if (!Number.isFinite(declared) || declared > MAX_BODY_BYTES) {
    // Unknown length (chunked) or too long: read with the limit, then hand next-auth a copy.
    if (Number.isFinite(declared)) return toProblemResponse(errors.tooLarge(MAX_BODY_BYTES), new URL(req.url).pathname);
    const { readBodyLimited } = await import("@/lib/http/body");
    try {
      const bytes = await readBodyLimited(req, MAX_BODY_BYTES);
      const copy = new Request(req.url, { method: "POST", headers: req.headers, body: bytes as BodyInit });
      return handler(copy, ctx);
    } catch (e) {
      return toProblemResponse(e, new URL(req.url).pathname);
    }
  }
  return handler(req, ctx);
}
