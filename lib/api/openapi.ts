import { z } from "zod";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import { PROBLEM_TYPES, type ProblemType } from "@/lib/errors";
import { allowedPlans, endpointProblems, type ApiEndpoint } from "./endpoint";
import { API_KEY_PREFIX } from "./key-format";
import { POLICY_NAME, QUOTA_WINDOW_S } from "./quota";

// The OpenAPI 3.1 document of the public API, generated from the endpoint
// declarations (lib/api/v1). Schemas come from the handlers' own zod schemas
// through zod 4's z.toJSONSchema (JSON Schema draft 2020-12, which is OpenAPI
// 3.1's schema dialect): request schemas as the caller sends them (io
// "input"), responses as the server sends them (io "output"). Schemas named
// with `.meta({ id })` become components/schemas. tests/unit/api/openapi.test.ts
// validates the result against the official OpenAPI 3.1 schema.

type JsonSchema = Record<string, unknown>;
export type OpenApiDocument = Record<string, unknown> & { openapi: string; paths: Record<string, Record<string, unknown>> };

const DIALECT = "https://json-schema.org/draft/2020-12/schema";

export const problemSchema = z
  .object({
    type: z.string().describe("URI of the problem type; /problems/<code> explains it."),
    title: z.string(),
    status: z.number().int(),
    detail: z.string().optional().describe("What went wrong with this request, for people."),
    instance: z.string().optional().describe("The path that was asked for."),
    code: z.string().describe("Stable, machine-readable problem type (the last part of `type`)."),
    errors: z.record(z.string(), z.array(z.string())).optional().describe("Messages per input field (query parameter, path parameter or body member)."),
    "violated-policies": z.array(z.string()).optional().describe("quota-exceeded: the quota policies that were used up."),
    "required-plan": z.string().nullable().optional().describe("plan-required: the lowest plan that includes the endpoint."),
  })
  .meta({ id: "Problem", description: "An error, as application/problem+json (RFC 9457)." });

/** Turn a zod schema into JSON Schema, moving named schemas into `components`. */
function toSchema(schema: z.ZodType, io: "input" | "output", components: Map<string, JsonSchema>): JsonSchema {
  const raw = z.toJSONSchema(schema, { io, unrepresentable: "any", target: "draft-2020-12" }) as JsonSchema;
  delete raw.$schema;
  const defs = (raw.$defs ?? {}) as Record<string, JsonSchema>;
  delete raw.$defs;
  for (const [name, def] of Object.entries(defs)) {
    const fixed = rewriteRefs(def) as JsonSchema;
    const existing = components.get(name);
    if (existing && JSON.stringify(existing) !== JSON.stringify(fixed))
      throw new Error(`Two different schemas are both named ${name} (${io}); give one another .meta({ id }).`);
    components.set(name, fixed);
  }
  return rewriteRefs(raw) as JsonSchema;
}

function rewriteRefs(node: unknown): unknown {
  if (Array.isArray(node)) return node.map(rewriteRefs);
  if (node && typeof node === "object") {
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(node)) {
      out[k] = k === "$ref" && typeof v === "string" ? v.replace(/^#\/\$defs\//, "#/components/schemas/") : rewriteRefs(v);
    }
    return out;
  }
  return node;
}

function deref(schema: JsonSchema, components: Map<string, JsonSchema>): JsonSchema {
  const ref = schema.$ref;
  if (typeof ref === "string" && ref.startsWith("#/components/schemas/")) return components.get(ref.slice("#/components/schemas/".length)) ?? schema;
  return schema;
}

/** Parameters (path or query) from an object schema. */
function parametersOf(schema: z.ZodType, where: "path" | "query", components: Map<string, JsonSchema>): JsonSchema[] {
  const json = deref(toSchema(schema, "input", components), components);
  const props = (json.properties ?? {}) as Record<string, JsonSchema>;
  const required = new Set((json.required ?? []) as string[]);
  return Object.entries(props).map(([name, prop]) => {
    const { description, ...rest } = prop;
    const p: JsonSchema = { name, in: where, required: where === "path" || required.has(name), schema: rest };
    if (typeof description === "string") p.description = description;
    return p;
  });
}

const STATUS_TEXT: Record<number, string> = {
  400: "The request is not valid; nothing was counted against the quota.",
  401: "No valid credentials: a bad or revoked key, or none where one is needed.",
  403: "The caller's plan does not include this, or the request came from another site.",
  404: "Not found.",
  405: "Method not allowed.",
  409: "Conflict with the current state.",
  413: "The request body is too large.",
  415: "Unsupported content type.",
  429: "The daily quota is used up; Retry-After says when it renews.",
  500: "Something went wrong on our side.",
};

function errorResponses(problems: readonly ProblemType[]): Record<string, JsonSchema> {
  const byStatus = new Map<number, ProblemType[]>();
  for (const p of problems) {
    const s = PROBLEM_TYPES[p].status;
    byStatus.set(s, [...(byStatus.get(s) ?? []), p]);
  }
  const out: Record<string, JsonSchema> = {};
  for (const [status, codes] of [...byStatus].sort((a, b) => a[0] - b[0])) {
    const headers: JsonSchema = { RateLimit: { $ref: "#/components/headers/RateLimit" }, "RateLimit-Policy": { $ref: "#/components/headers/RateLimit-Policy" } };
    if (status === 429) headers["Retry-After"] = { $ref: "#/components/headers/Retry-After" };
    out[String(status)] = {
      description: `${STATUS_TEXT[status] ?? PROBLEM_TYPES[codes[0]].title} Problem codes: ${codes.map((c) => `\`${c}\``).join(", ")}.`,
      headers,
      content: { "application/problem+json": { schema: { $ref: "#/components/schemas/Problem" } } },
    };
  }
  return out;
}

function whoMayCall(ep: ApiEndpoint): string {
  if (ep.access === "everyone") return "Everyone, with or without a key.";
  return `Plans: ${allowedPlans(ep)
    .map((p) => PLAN_CATALOGUE[p].name)
    .join(", ")} (an API key or a signed-in session).`;
}

function costText(ep: ApiEndpoint): string {
  const c = ep.quota.cost;
  if (c === 0) return "Free: counts against no quota.";
  const units = typeof c === "function" ? "Quota units depend on the request (see the description)." : `${c} quota unit${c === 1 ? "" : "s"} per request.`;
  return ep.quota.meter === "lookups" ? `${units} Also counts as site lookups where the plan caps them.` : units;
}

export function buildOpenApiDocument(endpoints: readonly ApiEndpoint[], opts: { serverUrl: string }): OpenApiDocument {
  const components = new Map<string, JsonSchema>();
  const paths: Record<string, Record<string, unknown>> = {};
  const seenIds = new Set<string>();
  for (const ep of endpoints) {
    if (seenIds.has(ep.id)) throw new Error(`Two endpoints share the operation id ${ep.id}.`);
    seenIds.add(ep.id);
    const parameters = [
      ...(ep.params ? parametersOf(ep.params, "path", components) : []),
      ...(ep.query ? parametersOf(ep.query, "query", components) : []),
    ];
    const op: Record<string, unknown> = {
      operationId: ep.id,
      tags: [ep.tag],
      summary: ep.summary,
      description: `${ep.description}\n\nWho may call: ${whoMayCall(ep)}\n\nQuota: ${costText(ep)}`,
      ...(parameters.length ? { parameters } : {}),
      security: ep.access === "everyone" ? [{}, { apiKey: [] }, { session: [] }] : [{ apiKey: [] }, { session: [] }],
      responses: {
        "200": {
          description: ep.responseDescription,
          headers: { RateLimit: { $ref: "#/components/headers/RateLimit" }, "RateLimit-Policy": { $ref: "#/components/headers/RateLimit-Policy" } },
          content: { "application/json": { schema: toSchema(ep.response, "output", components) } },
        },
        ...errorResponses(endpointProblems(ep)),
      },
      "x-rainprint-plans": allowedPlans(ep),
      "x-rainprint-quota": { cost: typeof ep.quota.cost === "function" ? "varies" : ep.quota.cost, meter: ep.quota.meter },
    };
    if (ep.body) {
      const content: Record<string, unknown> = { "application/json": { schema: toSchema(ep.body.schema, "input", components) } };
      if (ep.body.csv) content["text/csv"] = { schema: { type: "string", description: ep.body.csv.description } };
      op.requestBody = { required: true, content };
    }
    (paths[ep.path] ??= {})[ep.method.toLowerCase()] = op;
  }
  toSchema(problemSchema, "output", components);
  const schemas = Object.fromEntries([...components].sort((a, b) => a[0].localeCompare(b[0])));
  const tags = [...new Set(endpoints.map((e) => e.tag))].map((name) => ({ name }));
  return {
    openapi: "3.1.0",
    jsonSchemaDialect: DIALECT,
    info: {
      title: "Rainprint API",
      version: "1.0.0",
      summary: "Precipitation stable-isotope data: stations, station means and samples.",
      description: [
        "The public HTTP API of Rainprint. Every error is application/problem+json (RFC 9457); /problems/<code> explains each code.",
        `Authentication: send \`Authorization: Bearer ${API_KEY_PREFIX}…\` with a key from your account (Researcher and Institution plans). Without a key, requests are anonymous on the Open plan and counted per client address.`,
        `Quotas: requests are counted per UTC day (Researcher: per account; Institution: per organisation; anonymous: per address). Every answer carries \`RateLimit-Policy\` and \`RateLimit\` (draft-ietf-httpapi-ratelimit-headers, structured-field form): policy "${POLICY_NAME.requests}" is the daily request quota, "${POLICY_NAME.lookups}" the daily site-lookup cap of the Open plan; w=${QUOTA_WINDOW_S}. A request refused as malformed counts against nothing.`,
        "Cautions: predicted and mean values are statistical estimates, not measurements. Provenance or forensic conclusions need accredited laboratory analysis and expert interpretation; Rainprint is not a drinking-water or safety tool; isotope values are comparable only on the VSMOW–SLAP scale.",
        "Station data marked `synthetic: true` is synthetic demo data: invented for demonstration, not real measurements.",
      ].join("\n\n"),
    },
    servers: [{ url: opts.serverUrl, description: "This Rainprint server" }],
    tags,
    paths,
    components: {
      schemas,
      headers: {
        RateLimit: {
          description: `Quota left now, per policy: \`"${POLICY_NAME.requests}";r=<units left>;t=<seconds until 00:00 UTC>\`.`,
          schema: { type: "string" },
        },
        "RateLimit-Policy": {
          description: `The caller's quota policies: \`"${POLICY_NAME.requests}";q=<units per day>;w=${QUOTA_WINDOW_S}\`.`,
          schema: { type: "string" },
        },
        "Retry-After": { description: "Seconds until the quota renews (00:00 UTC).", schema: { type: "integer", minimum: 1 } },
      },
      securitySchemes: {
        apiKey: {
          type: "http",
          scheme: "bearer",
          bearerFormat: `${API_KEY_PREFIX} followed by 32 letters and digits`,
          description: "An API key from your account's API keys page (Researcher and Institution plans).",
        },
        session: {
          type: "apiKey",
          in: "cookie",
          name: "next-auth.session-token",
          description: "The session cookie of a signed-in person (the app's own pages calling the API).",
        },
      },
    },
  };
}
