import "server-only";
import { z } from "zod";
import { PLANS } from "@/db/schema";
import { env } from "@/lib/env";
import { allowedPlans, defineEndpoint, type ApiEndpoint } from "../endpoint";
import { buildOpenApiDocument, type OpenApiDocument } from "../openapi";
import { meterLimit } from "../quota";
import { predictBatch, predictSite } from "./predict";
import { getEditionById, listEditions } from "./editions";
import { getStation, listStationSamples, listStations } from "./stations";

// THE registry of the public API, version 1. Every v1 endpoint is declared
// once (lib/api/v1/<topic>.ts with defineEndpoint) and listed in V1_ENDPOINTS;
// its route file app/api/v1/<path>/route.ts is one line per method:
//   export const GET = v1Handler(listStations);
// The OpenAPI document, the /api page and the index below read this list.

const indexResponse = z
  .object({
    name: z.string(),
    version: z.string(),
    documentation: z.string().describe("Path of the human-readable API guide."),
    openapi: z.string().describe("Path of the OpenAPI 3.1 document."),
    caller: z.object({
      kind: z.enum(["key", "session", "anonymous"]),
      plan: z.enum(PLANS),
      key: z.object({ name: z.string(), prefix: z.string() }).nullable(),
      requestsPerDay: z.number().int().describe("The caller's daily request quota."),
      siteLookupsPerDay: z.number().int().nullable().describe("The caller's daily site-lookup cap; null = none."),
    }),
    endpoints: z.array(z.object({ method: z.string(), path: z.string(), summary: z.string(), plans: z.array(z.enum(PLANS)) })),
    cautions: z.array(z.string()),
  })
  .meta({ id: "ApiIndex" });

export const apiIndex = defineEndpoint({
  id: "getApiIndex",
  method: "GET",
  path: "/api/v1",
  tag: "About",
  summary: "What this API offers, and who is asking",
  description: "The endpoints of version 1, who the request was identified as (key, session or anonymous) and that caller's daily quotas. Free: counts against no quota.",
  access: "everyone",
  response: indexResponse,
  responseDescription: "The index.",
  quota: { cost: 0 },
  examples: [{ title: "Check which plan a key is on", withKey: true }],
  async handler({ caller }) {
    return {
      name: "Rainprint API",
      version: "1",
      documentation: "/api",
      openapi: "/api/v1/openapi.json",
      caller: {
        kind: caller.kind,
        plan: caller.plan,
        key: caller.key ? { name: caller.key.name, prefix: caller.key.prefix } : null,
        requestsPerDay: meterLimit(caller.plan, "requests") ?? 0,
        siteLookupsPerDay: meterLimit(caller.plan, "lookups"),
      },
      endpoints: V1_ENDPOINTS.map((e) => ({ method: e.method, path: e.path, summary: e.summary, plans: allowedPlans(e) })),
      cautions: [
        "Values are statistical estimates with stated uncertainty, not measurements.",
        "Provenance or forensic conclusions need accredited laboratory analysis and expert interpretation.",
        "Rainprint is not a drinking-water quality or safety tool.",
        "Isotope values are comparable only on the VSMOW–SLAP scale.",
      ],
    };
  },
});

export const openApiDocument = defineEndpoint({
  id: "getOpenApiDocument",
  method: "GET",
  path: "/api/v1/openapi.json",
  tag: "About",
  summary: "This API as an OpenAPI 3.1 document",
  description: "The machine-readable description of every v1 endpoint, generated from the same schemas the server checks requests with. Free: counts against no quota.",
  access: "everyone",
  response: z.record(z.string(), z.unknown()).meta({ id: "OpenApiDocument", description: "An OpenAPI 3.1 document." }),
  responseDescription: "The OpenAPI document.",
  quota: { cost: 0 },
  examples: [{ title: "Fetch the document" }],
  async handler() {
    return v1OpenApiDocument();
  },
});

/** Every v1 endpoint, in the order the document and the API page list them. */
export const V1_ENDPOINTS: readonly ApiEndpoint[] = [
  apiIndex,
  predictSite,
  predictBatch,
  listStations,
  getStation,
  listStationSamples,
  listEditions,
  getEditionById,
  openApiDocument,
];

let cachedDocument: OpenApiDocument | undefined;

/** The OpenAPI document of v1 (built once per process). */
export function v1OpenApiDocument(): OpenApiDocument {
  return (cachedDocument ??= buildOpenApiDocument(V1_ENDPOINTS, { serverUrl: env().APP_URL }));
}

export { getEditionById, getStation, listEditions, listStationSamples, listStations, predictBatch, predictSite };
