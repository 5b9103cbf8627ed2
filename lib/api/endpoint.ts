import "server-only";
import { z } from "zod";
import type { Plan } from "@/db/schema";
import { lowestPlanAllowing, PLAN_CATALOGUE, PLAN_ORDER, planLimits, type PlanLimits } from "@/lib/billing/plans";
import { AppError, errors, toProblemResponse, type ProblemType } from "@/lib/errors";
import { DEFAULT_JSON_LIMIT_BYTES, readBodyLimited } from "@/lib/http/body";
import { refuseCrossSite } from "@/lib/http/route";
import { env } from "@/lib/env";
import { anonymousCaller, identifyCaller, type ApiCaller } from "./caller";
import { meterLimit, POLICY_NAME, rateLimitHeaders, secondsToUtcMidnight, type Meter, type MeterState } from "./quota";
import { consumeUsage, noteKeyUse, peekUsage, type Charge } from "./usage";

// One declaration per public API endpoint: method, path, zod schemas (path
// parameters, query, body, response), who may call it, what it costs and how
// it is described. The route handler (`v1Handler(endpoint)` in
// app/api/v1/**/route.ts), the OpenAPI document (lib/api/openapi.ts) and the
// API page (/api) are all built from it, so they cannot disagree.
//
// A request goes: cross-site check → caller (key, session or anonymous; 401
// for a bad key) → plan (403 `plan-required`, naming the plan that unlocks
// it) → path, query and body parsed with their schemas (400, counted against
// nothing; `beforeQuota` checks likewise) → quota (429 `quota-exceeded` with Retry-After) → handler → JSON.
// Every answer, errors included, carries RateLimit and RateLimit-Policy.

export type HttpMethod = "GET" | "POST" | "PUT" | "PATCH" | "DELETE";

/** Who may call: everyone (anonymous included), or the plans whose limits pass `unlockedBy`. */
export type EndpointAccess =
  | "everyone"
  | {
      /** e.g. (l) => l.stationDataDownloads — plans are derived from PLAN_CATALOGUE. */
      unlockedBy: (limits: PlanLimits) => boolean;
      /** What is unlocked, for messages: "Accepted samples". */
      what: string;
    };

export type BodySpec<B extends z.ZodType> = {
  schema: B;
  /** Largest accepted body (default 64 KB). */
  maxBytes?: number;
  /** Also accept `text/csv`: turn the text into the schema's input (throw AppError for a bad file). */
  csv?: { parse: (text: string) => unknown; description: string };
};

type Out<S> = S extends z.ZodType ? z.output<S> : undefined;

export type EndpointContext<P, Q, B> = {
  req: Request;
  caller: ApiCaller;
  params: Out<P>;
  query: Out<Q>;
  body: Out<B>;
};

export type EndpointExample = {
  title: string;
  params?: Record<string, string>;
  query?: Record<string, string>;
  body?: unknown;
  /** Show the Authorization header in the example (endpoints for paid plans). */
  withKey?: boolean;
};

export type EndpointSpec<P extends z.ZodType | undefined, Q extends z.ZodType | undefined, B extends z.ZodType | undefined, R extends z.ZodType> = {
  /** operationId: lowerCamelCase, unique. */
  id: string;
  method: HttpMethod;
  /** OpenAPI-style path: `/api/v1/stations/{code}`. */
  path: `/api/v1${string}`;
  tag: string;
  summary: string;
  /** Markdown-free plain text; shown on /api and in the document. */
  description: string;
  access: EndpointAccess;
  params?: P;
  query?: Q;
  body?: B extends z.ZodType ? BodySpec<B> : undefined;
  response: R;
  responseDescription: string;
  /**
   * Quota units the request uses (default 1; 0 = free). A function sees the parsed input
   * (e.g. one unit per site of a batch). `meter: "lookups"` also counts on the plan's
   * daily site-lookup cap where it has one.
   */
  quota?: { cost?: number | ((input: { params: Out<P>; query: Out<Q>; body: Out<B> }) => number); meter?: Meter };
  /** Problem types this endpoint can answer besides the common ones (400, 401, 429, 500). */
  errors?: readonly ProblemType[];
  examples: readonly EndpointExample[];
  /**
   * Checks on the parsed input that must pass before anything is counted (e.g. the edition
   * exists, the batch fits the caller's plan): throw an AppError to refuse the request.
   */
  beforeQuota?: (ctx: EndpointContext<P, Q, B>) => Promise<void>;
  handler: (ctx: EndpointContext<P, Q, B>) => Promise<z.output<R> | JsonText | Response>;
};

/** An answer already written as JSON text (e.g. by a prediction worker thread); checked against the response schema under test like any other. */
export class JsonText {
  constructor(readonly text: string) {}
}

/** An endpoint with its types erased, as the registry, the document and the page see it. */
export type ApiEndpoint = {
  readonly id: string;
  readonly method: HttpMethod;
  readonly path: `/api/v1${string}`;
  readonly tag: string;
  readonly summary: string;
  readonly description: string;
  readonly access: EndpointAccess;
  readonly params?: z.ZodType;
  readonly query?: z.ZodType;
  readonly body?: BodySpec<z.ZodType>;
  readonly response: z.ZodType;
  readonly responseDescription: string;
  readonly quota: { readonly cost: number | ((input: { params: unknown; query: unknown; body: unknown }) => number); readonly meter: Meter };
  readonly errors: readonly ProblemType[];
  readonly examples: readonly EndpointExample[];
  readonly beforeQuota?: (ctx: EndpointContext<z.ZodType, z.ZodType, z.ZodType>) => Promise<void>;
  readonly handler: (ctx: EndpointContext<z.ZodType, z.ZodType, z.ZodType>) => Promise<unknown>;
};

export function defineEndpoint<P extends z.ZodType | undefined = undefined, Q extends z.ZodType | undefined = undefined, B extends z.ZodType | undefined = undefined, R extends z.ZodType = z.ZodType>(
  spec: EndpointSpec<P, Q, B, R>,
): ApiEndpoint {
  // The wrapper parses params/query/body with the same schemas before calling the handler,
  // so erasing the generic types here is safe.
  return {
    ...spec,
    quota: { cost: spec.quota?.cost ?? 1, meter: spec.quota?.meter ?? "requests" },
    errors: spec.errors ?? [],
  } as unknown as ApiEndpoint;
}

/** Plans that may call the endpoint, cheapest first. */
export function allowedPlans(ep: Pick<ApiEndpoint, "access">): Plan[] {
  const access = ep.access;
  if (access === "everyone") return [...PLAN_ORDER];
  return PLAN_ORDER.filter((p) => access.unlockedBy(planLimits(p)));
}

/** Problems every v1 endpoint can answer. */
export const COMMON_PROBLEMS: readonly ProblemType[] = ["invalid-input", "invalid-api-key", "quota-exceeded", "internal"];

/** The problem types an endpoint can answer, common ones included. */
export function endpointProblems(ep: ApiEndpoint): ProblemType[] {
  const extra: ProblemType[] = [...ep.errors];
  if (ep.access !== "everyone") extra.push("sign-in-required", "plan-required");
  if (ep.body) extra.push("malformed-body", "body-too-large", "unsupported-media-type");
  if (ep.method !== "GET") extra.push("forbidden");
  return [...new Set([...COMMON_PROBLEMS, ...extra])];
}

function checkAccess(ep: ApiEndpoint, caller: ApiCaller): void {
  const access = ep.access;
  if (access === "everyone" || access.unlockedBy(planLimits(caller.plan))) return;
  const lowest = lowestPlanAllowing(access.unlockedBy);
  const planName = lowest ? PLAN_CATALOGUE[lowest].name : "a paid plan";
  if (caller.kind === "anonymous")
    throw errors.unauthenticated(`${access.what} need the ${planName} plan or higher. Send an API key (Authorization: Bearer rp_live_…) of an account on that plan.`);
  throw new AppError("plan-required", {
    detail: `${access.what} need the ${planName} plan or higher; these requests are on the ${PLAN_CATALOGUE[caller.plan].name} plan.`,
    extensions: { "required-plan": lowest },
  });
}

async function readBody(req: Request, spec: BodySpec<z.ZodType>): Promise<unknown> {
  const bytes = await readBodyLimited(req, spec.maxBytes ?? DEFAULT_JSON_LIMIT_BYTES);
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  const text = new TextDecoder().decode(bytes);
  if (type === "text/csv" && spec.csv) return spec.csv.parse(text);
  if (type === "application/json" || type === "" || type.endsWith("+json")) {
    if (!text.trim()) throw new AppError("malformed-body", { detail: "The request has no body; send JSON." });
    try {
      return JSON.parse(text);
    } catch {
      throw new AppError("malformed-body", { detail: "The body is not valid JSON." });
    }
  }
  throw new AppError("unsupported-media-type", { detail: spec.csv ? "Send JSON (application/json) or CSV (text/csv)." : "Send JSON (application/json)." });
}

type Meters = { meter: Meter; limit: number; index: number }[];

/** The charges a request makes: the caller's daily quota, site lookups where capped, and the key's own tally. */
function chargesFor(caller: ApiCaller, meter: Meter, cost: number): { charges: Charge[]; meters: Meters } {
  const charges: Charge[] = [];
  const meters: Meters = [];
  const daily = meterLimit(caller.plan, "requests");
  meters.push({ meter: "requests", limit: daily ?? Number.MAX_SAFE_INTEGER, index: charges.length });
  charges.push({ subject: caller.subject, cost, limit: daily });
  if (meter === "lookups") {
    const lookups = meterLimit(caller.plan, "lookups");
    if (lookups !== null) {
      meters.push({ meter: "lookups", limit: lookups, index: charges.length });
      charges.push({ subject: `lookups:${caller.subject}`, cost, limit: lookups });
    }
  }
  if (caller.key) charges.push({ subject: `key:${caller.key.id}`, cost, limit: null });
  return { charges, meters };
}

function statesOf(meters: Meters, used: number[]): MeterState[] {
  return meters.map((m) => ({ meter: m.meter, limit: m.limit, used: used[m.index] ?? 0 }));
}

/** RateLimit headers for a request that counted nothing. */
async function peekStates(caller: ApiCaller, meter: Meter): Promise<MeterState[]> {
  const { charges, meters } = chargesFor(caller, meter, 0);
  const used = await peekUsage(charges.map((c) => c.subject));
  return statesOf(meters, used);
}

export type V1RouteHandler = ((req: Request, ctx: { params: Promise<Record<string, string | string[] | undefined>> }) => Promise<Response>) & {
  /** The declaration this handler was built from (tests check it against the file's path). */
  readonly endpoint: ApiEndpoint;
};

/** The Next.js route handler for an endpoint: `export const GET = v1Handler(listStations);` */
export function v1Handler(ep: ApiEndpoint): V1RouteHandler {
  const fn = async (req: Request, ctx: { params: Promise<Record<string, string | string[] | undefined>> }): Promise<Response> => {
    const now = new Date();
    const url = new URL(req.url);
    let caller: ApiCaller | null = null;
    let states: MeterState[] | null = null;
    try {
      refuseCrossSite(req);
      caller = await identifyCaller(req, now);
      checkAccess(ep, caller);
      const params = ep.params ? ep.params.parse((await ctx?.params) ?? {}) : undefined;
      const query = ep.query ? ep.query.parse(Object.fromEntries(url.searchParams)) : undefined;
      const body = ep.body ? ep.body.schema.parse(await readBody(req, ep.body)) : undefined;
      const input = { params, query, body };
      if (ep.beforeQuota) await ep.beforeQuota({ req, caller, params, query, body } as EndpointContext<z.ZodType, z.ZodType, z.ZodType>);
      const cost = typeof ep.quota.cost === "function" ? ep.quota.cost(input) : ep.quota.cost;
      const { charges, meters } = chargesFor(caller, ep.quota.meter, cost);
      if (cost > 0) {
        const result = await consumeUsage(charges, now);
        states = statesOf(meters, result.used);
        if (!result.ok) {
          const violated = [...new Set(result.refused.map((i) => meters.find((m) => m.index === i)?.meter).filter((m): m is Meter => !!m))];
          throw new AppError("quota-exceeded", {
            detail: `The ${violated.map((m) => (m === "lookups" ? "site-lookup" : "request")).join(" and ")} quota of the ${PLAN_CATALOGUE[caller.plan].name} plan for today (UTC) is used up${
              cost > 1 ? ` for a request costing ${cost} units` : ""
            }. It renews at 00:00 UTC.`,
            retryAfterS: secondsToUtcMidnight(now),
            extensions: { "violated-policies": violated.map((m) => POLICY_NAME[m]) },
          });
        }
        if (caller.key) noteKeyUse(caller.key.id, now);
      }
      const out = await ep.handler({ req, caller, params, query, body } as EndpointContext<z.ZodType, z.ZodType, z.ZodType>);
      states ??= await peekStates(caller, ep.quota.meter);
      const headers = { "Cache-Control": "no-store", ...rateLimitHeaders(states, now) };
      if (out instanceof Response) {
        for (const [k, v] of Object.entries(headers)) if (!out.headers.has(k)) out.headers.set(k, v);
        return out;
      }
      if (out instanceof JsonText) {
        if (env().RAINPRINT_TEST === "1") ep.response.parse(JSON.parse(out.text));
        return new Response(out.text, { headers: { "Content-Type": "application/json", ...headers } });
      }
      // Under test every answer is checked against its documented schema.
      if (env().RAINPRINT_TEST === "1") ep.response.parse(out);
      return Response.json(out, { headers });
    } catch (e) {
      const res = toProblemResponse(e, url.pathname);
      try {
        states ??= await peekStates(caller ?? anonymousCaller(req), ep.quota.meter);
        for (const [k, v] of Object.entries(rateLimitHeaders(states, now))) res.headers.set(k, v);
      } catch (inner) {
        console.error("[rainprint] could not read usage for the RateLimit headers", inner);
      }
      return res;
    }
  };
  return Object.assign(fn, { endpoint: ep });
}
