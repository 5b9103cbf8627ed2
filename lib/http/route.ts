import "server-only";
import type { z } from "zod";
import { checkViewer, getViewer, type Requirement, type Viewer } from "@/lib/auth/guard";
import { errors, toProblemResponse } from "@/lib/errors";
import { DEFAULT_JSON_LIMIT_BYTES, readStructuredBody } from "./body";

// The shape of every route handler:
//
//   export const POST = route(
//     { auth: { roles: ["admin"] }, body: schema },
//     async ({ viewer, body, params }) => { …act…; return Response.json(…) },
//   );
//
// In order: the guard decides who is asking (401/403, before anything in the
// body is read), the body is read with a size limit (413), body and query are
// parsed with their zod schemas (400 with field messages), then the handler
// acts. Anything thrown becomes application/problem+json.

type Auth = "public" | Requirement;

type ViewerFor<A extends Auth> = A extends "public" ? Viewer | null : Viewer;

type Spec<A extends Auth, B extends z.ZodType | undefined, Q extends z.ZodType | undefined> = {
  /** "public", or a requirement for the guard ({} = any signed-in user). */
  auth: A;
  body?: B;
  query?: Q;
  /** Request body limit in bytes (default 64 KB). */
  maxBodyBytes?: number;
  /**
   * Public answers that are the same for everyone (map tiles): do not read the session at all
   * (viewer is null), saving a database read per request. Only with auth "public".
   */
  anonymous?: A extends "public" ? boolean : never;
};

type Infer<S> = S extends z.ZodType ? z.infer<S> : undefined;

export type RouteContext<A extends Auth, B extends z.ZodType | undefined, Q extends z.ZodType | undefined> = {
  req: Request;
  viewer: ViewerFor<A>;
  body: Infer<B>;
  query: Infer<Q>;
  params: Record<string, string | string[] | undefined>;
};

type NextContext = { params: Promise<Record<string, string | string[] | undefined>> };

export function route<A extends Auth, B extends z.ZodType | undefined = undefined, Q extends z.ZodType | undefined = undefined>(
  spec: Spec<A, B, Q>,
  handler: (ctx: RouteContext<A, B, Q>) => Promise<Response>,
): (req: Request, ctx: NextContext) => Promise<Response> {
  return async (req, ctx) => {
    const instance = new URL(req.url).pathname;
    try {
      refuseCrossSite(req);
      const viewer = spec.anonymous ? null : await getViewer();
      if (spec.auth !== "public") checkViewer(viewer, spec.auth);
      const raw = spec.body ? await readStructuredBody(req, spec.maxBodyBytes ?? DEFAULT_JSON_LIMIT_BYTES) : undefined;
      const body = spec.body ? spec.body.parse(raw) : undefined;
      const query = spec.query ? spec.query.parse(Object.fromEntries(new URL(req.url).searchParams)) : undefined;
      const params = ctx?.params ? await ctx.params : {};
      return await handler({ req, viewer: viewer as ViewerFor<A>, body: body as Infer<B>, query: query as Infer<Q>, params });
    } catch (e) {
      return toProblemResponse(e, instance);
    }
  };
}

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * Refuse state-changing requests sent by another site's page (the browser
 * names the page's origin in `Origin`). Session cookies are SameSite=Lax as
 * well; this is the second lock. Requests without Origin (scripts, API
 * clients) are not affected.
 */
export function refuseCrossSite(req: Request): void {
  if (SAFE_METHODS.has(req.method)) return;
  const origin = req.headers.get("origin");
  if (!origin || origin === "null") {
    if (origin === "null") throw errors.forbidden("Requests from sandboxed or opaque origins are refused.");
    return;
  }
  const host = req.headers.get("x-forwarded-host") ?? req.headers.get("host");
  let originHost: string;
  try {
    originHost = new URL(origin).host;
  } catch {
    throw errors.forbidden("The request's Origin header is not valid.");
  }
  if (host && originHost !== host) throw errors.forbidden("Requests from other sites are refused.");
}

/** 202 with a message, for requests whose outcome is an e-mail. */
export function accepted(message: string): Response {
  return Response.json({ message }, { status: 202, headers: { "Cache-Control": "no-store" } });
}
