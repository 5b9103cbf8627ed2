import { ZodError } from "zod";

// One error vocabulary for the whole app. An AppError knows its HTTP status,
// a stable `type` slug (part of the API contract: clients may switch on it),
// a short title, a detail for the person asking, and whether that detail may
// be shown. `toProblemResponse` turns any thrown value into an
// `application/problem+json` response (RFC 9457). Safe to import anywhere on
// the server (route handlers, server actions, the worker, tests).

/** The catalogue of problem types. Add a line here for a new kind of failure. */
export const PROBLEM_TYPES = {
  "invalid-input": { status: 400, title: "The request is not valid" },
  "malformed-body": { status: 400, title: "The request body could not be read" },
  "sign-in-required": { status: 401, title: "Sign-in required" },
  forbidden: { status: 403, title: "Not allowed" },
  "not-found": { status: 404, title: "Not found" },
  "method-not-allowed": { status: 405, title: "Method not allowed" },
  conflict: { status: 409, title: "Conflict with the current state" },
  "link-expired": { status: 410, title: "This link has expired" },
  "link-used": { status: 410, title: "This link has already been used" },
  "link-invalid": { status: 400, title: "This link is not valid" },
  "body-too-large": { status: 413, title: "The request is too large" },
  "unsupported-media-type": { status: 415, title: "Unsupported content type" },
  "too-many-requests": { status: 429, title: "Too many requests" },
  "upstream-unavailable": { status: 502, title: "A service we depend on did not answer" },
  internal: { status: 500, title: "Something went wrong on our side" },
  // Public API (lib/api): keys, plans and daily quotas.
  "invalid-api-key": {
    status: 401,
    title: "The API key is not valid",
    description:
      "The Authorization header did not carry a key Rainprint knows: it is malformed, unknown or revoked, or its account is disabled. Send `Authorization: Bearer rp_live_…` with a key from your account's API keys page, or leave the header out to call as an anonymous visitor.",
  },
  "plan-required": {
    status: 403,
    title: "Your plan does not include this",
    description:
      "The endpoint or feature needs a plan the caller does not have. `detail` names the lowest plan that includes it; the pricing page lists what each plan unlocks.",
  },
  "unknown-edition": {
    status: 404,
    title: "No such published edition",
    description:
      "The edition named in the request does not exist or is not published. Leave the edition out to use the current one, or pick an id from the editions list (ids look like 2026.12.1).",
  },
  "quota-exceeded": {
    status: 429,
    title: "The daily quota is used up",
    description:
      "The caller's requests for this UTC day have reached the plan's quota. `Retry-After` gives the seconds until the quota renews at 00:00 UTC, and the member `violated-policies` names the quota policies (as in the RateLimit-Policy header) that were exhausted. Requests refused as malformed never count.",
  },
} as const satisfies Record<string, { status: number; title: string; description?: string }>;

export type ProblemType = keyof typeof PROBLEM_TYPES;

/** Field-level messages for forms: `{ email: ["Enter a valid e-mail address"] }`. */
export type FieldErrors = Record<string, string[]>;

export type AppErrorOptions = {
  detail?: string;
  /** May `detail` be shown to the caller? Defaults to true for 4xx, false for 5xx. */
  expose?: boolean;
  fields?: FieldErrors;
  /** Seconds, for 429 and 503. */
  retryAfterS?: number;
  /** Extra members of the problem body (RFC 9457 extension members), e.g. `{ "violated-policies": ["daily"] }`. */
  extensions?: Record<string, unknown>;
  cause?: unknown;
};

export class AppError extends Error {
  readonly type: ProblemType;
  readonly status: number;
  readonly title: string;
  readonly detail: string | undefined;
  readonly expose: boolean;
  readonly fields: FieldErrors | undefined;
  readonly retryAfterS: number | undefined;
  readonly extensions: Record<string, unknown> | undefined;

  constructor(type: ProblemType, opts: AppErrorOptions = {}) {
    const spec = PROBLEM_TYPES[type];
    super(opts.detail ?? spec.title, opts.cause === undefined ? undefined : { cause: opts.cause });
    this.name = "AppError";
    this.type = type;
    this.status = spec.status;
    this.title = spec.title;
    this.detail = opts.detail;
    this.expose = opts.expose ?? spec.status < 500;
    this.fields = opts.fields;
    this.retryAfterS = opts.retryAfterS;
    this.extensions = opts.extensions;
  }
}

export function isAppError(e: unknown): e is AppError {
  return e instanceof AppError;
}

// Short constructors so handlers read as guard clauses.
export const errors = {
  invalid: (detail: string, fields?: FieldErrors) => new AppError("invalid-input", { detail, fields }),
  unauthenticated: (detail = "Sign in to continue.") => new AppError("sign-in-required", { detail }),
  forbidden: (detail = "Your account is not allowed to do this.") => new AppError("forbidden", { detail }),
  notFound: (detail = "There is nothing at this address.") => new AppError("not-found", { detail }),
  conflict: (detail: string) => new AppError("conflict", { detail }),
  tooLarge: (limitBytes: number) =>
    new AppError("body-too-large", {
      detail: `The request body is larger than the ${formatBytes(limitBytes)} this endpoint accepts. Nothing was saved.`,
    }),
  tooManyRequests: (detail: string, retryAfterS?: number) => new AppError("too-many-requests", { detail, retryAfterS }),
} as const;

/** The RFC 9457 body. `type` is a relative URI; `/problems` documents each one. */
export type ProblemDetails = {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  /** Extension member: stable slug, same as the last part of `type`. */
  code: ProblemType;
  /** Extension member: field-level messages for forms. */
  errors?: FieldErrors;
  /** Other extension members set by the thrower (AppErrorOptions.extensions). */
  [member: string]: unknown;
};

export function problemTypeUri(type: ProblemType): string {
  return `/problems/${type}`;
}

/** Zod issues → field messages (first path element is the field name; "" for the whole body). */
export function zodFieldErrors(err: ZodError): FieldErrors {
  const out: FieldErrors = {};
  for (const issue of err.issues) {
    const key = issue.path.length ? issue.path.map(String).join(".") : "_";
    (out[key] ??= []).push(issue.message);
  }
  return out;
}

/** Any thrown value → an AppError (unknown errors become an unexposed 500). */
export function toAppError(e: unknown): AppError {
  if (e instanceof AppError) return e;
  if (e instanceof ZodError) {
    return new AppError("invalid-input", {
      detail: "Some fields need attention.",
      fields: zodFieldErrors(e),
    });
  }
  return new AppError("internal", { cause: e, expose: false });
}

export function problemBody(err: AppError, instance?: string): ProblemDetails {
  const body: ProblemDetails = {
    type: problemTypeUri(err.type),
    title: err.title,
    status: err.status,
    code: err.type,
  };
  if (err.expose && err.detail) body.detail = err.detail;
  if (!err.expose) body.detail = "The error was logged. Please try again later.";
  if (instance) body.instance = instance;
  if (err.fields && err.expose) body.errors = err.fields;
  if (err.extensions && err.expose) {
    for (const [k, v] of Object.entries(err.extensions)) if (!(k in body)) body[k] = v;
  }
  return body;
}

/** Any thrown value → an `application/problem+json` Response. Logs unexpected errors. */
export function toProblemResponse(e: unknown, instance?: string): Response {
  const err = toAppError(e);
  if (err.status >= 500) console.error("[rainprint]", instance ?? "", err.cause ?? err);
  const headers = new Headers({ "Content-Type": "application/problem+json", "Cache-Control": "no-store" });
  if (err.retryAfterS !== undefined) headers.set("Retry-After", String(Math.ceil(err.retryAfterS)));
  return new Response(JSON.stringify(problemBody(err, instance)), { status: err.status, headers });
}

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${(n / (1024 * 1024)).toFixed(n % (1024 * 1024) === 0 ? 0 : 1)} MB`;
  if (n >= 1024) return `${(n / 1024).toFixed(n % 1024 === 0 ? 0 : 1)} KB`;
  return `${n} bytes`;
}
