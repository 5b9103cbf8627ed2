import type { Metadata } from "next";
import Link from "next/link";
import { CodeBlock, EndpointSection, type GuideEndpoint, type GuideParameter } from "@/components/api/api-guide";
import { Cautions } from "@/components/cautions";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { allowedPlans, endpointProblems, type ApiEndpoint } from "@/lib/api/endpoint";
import { API_KEY_PREFIX } from "@/lib/api/key-format";
import { POLICY_NAME, QUOTA_WINDOW_S } from "@/lib/api/quota";
import { DATA_LICENCE } from "@/lib/api/v1/common";
import { V1_ENDPOINTS, v1OpenApiDocument } from "@/lib/api/v1";
import { PLAN_CATALOGUE, PLAN_ORDER } from "@/lib/billing/plans";
import { env } from "@/lib/env";
import { PROBLEM_TYPES } from "@/lib/errors";

export const metadata: Metadata = { title: "API" };

// The human-readable API guide, generated from the endpoint declarations
// (lib/api/v1) and the OpenAPI document built from them.

const n = (x: number) => x.toLocaleString("en-GB");

type Schema = { type?: string | string[]; format?: string; enum?: unknown[]; default?: unknown; minimum?: number; maximum?: number; pattern?: string };

function typeOf(s: Schema): string {
  if (s.enum) return `one of ${s.enum.map(String).join(", ")}`;
  const t = Array.isArray(s.type) ? s.type.join(" or ") : (s.type ?? "string");
  const range = s.minimum !== undefined && s.maximum !== undefined ? ` ${s.minimum}–${s.maximum}` : "";
  return s.format ? `${t} (${s.format})` : `${t}${range}`;
}

function curlFor(ep: ApiEndpoint, ex: ApiEndpoint["examples"][number], base: string): string {
  let path: string = ep.path;
  for (const [k, v] of Object.entries(ex.params ?? {})) path = path.replace(`{${k}}`, encodeURIComponent(v));
  const q = ex.query ? `?${new URLSearchParams(ex.query)}` : "";
  const lines = [`curl ${ep.method === "GET" ? "" : `-X ${ep.method} `}"${base}${path}${q}"`];
  if (ex.withKey) lines.push(`  -H "Authorization: Bearer $RAINPRINT_API_KEY"`);
  if (ex.body !== undefined) lines.push(`  -H "Content-Type: application/json"`, `  -d '${JSON.stringify(ex.body)}'`);
  return lines.join(" \\\n");
}

function guideEndpoints(base: string): GuideEndpoint[] {
  const doc = v1OpenApiDocument();
  return V1_ENDPOINTS.map((ep) => {
    const op = doc.paths[ep.path]?.[ep.method.toLowerCase()] as
      | { parameters?: { name: string; in: string; required: boolean; description?: string; schema: Schema }[]; responses: Record<string, { content?: Record<string, { schema?: { $ref?: string } }> }> }
      | undefined;
    const parameters: GuideParameter[] = (op?.parameters ?? []).map((p) => ({
      name: p.name,
      in: p.in,
      required: p.required,
      type: typeOf(p.schema),
      description: p.description ?? "",
      defaultValue: p.schema.default === undefined ? null : String(p.schema.default),
    }));
    const ref = op?.responses["200"]?.content?.["application/json"]?.schema?.$ref;
    const plans = allowedPlans(ep);
    const cost = ep.quota.cost;
    return {
      id: ep.id,
      method: ep.method,
      path: ep.path,
      summary: ep.summary,
      description: ep.description,
      who: ep.access === "everyone" ? "Everyone: anonymous, with a key, or signed in." : `${plans.map((p) => PLAN_CATALOGUE[p].name).join(" and ")} plans, with a key or signed in.`,
      cost: cost === 0 ? "Free — counts against no quota." : typeof cost === "function" ? "Depends on the request (see above)." : `${cost} unit${cost === 1 ? "" : "s"} of the daily quota.`,
      parameters,
      examples: ep.examples.map((ex) => ({ title: ex.title, curl: curlFor(ep, ex, base) })),
      problems: endpointProblems(ep).map((code) => ({ code, status: PROBLEM_TYPES[code].status, title: PROBLEM_TYPES[code].title })),
      responseSchema: ref ? ref.split("/").pop()! : null,
    };
  });
}

export default function ApiGuidePage() {
  const base = env().APP_URL.replace(/\/$/, "");
  const endpoints = guideEndpoints(base);
  const apiProblems = [...new Set(V1_ENDPOINTS.flatMap((e) => endpointProblems(e)))];
  return (
    <div className="flex flex-col gap-10">
      <PageHeader
        title="Rainprint API"
        lead="Stations, their long-term means and accepted samples over HTTP, for scripts and pipelines. JSON in and out; every error is application/problem+json."
      >
        <p className="mt-3 text-sm">
          Machine-readable: <Link href="/api/v1/openapi.json" className="underline">OpenAPI 3.1 document</Link> · Index: <code className="font-mono">GET /api/v1</code>
        </p>
        <DemoLabel what="the stations and samples behind this API" className="mt-3" />
      </PageHeader>

      <section aria-labelledby="start-heading" className="flex flex-col gap-3">
        <h2 id="start-heading" className="text-xl font-semibold">Start here</h2>
        <p className="text-ink-800">
          The base address is <code className="font-mono">{base}/api/v1</code>. Without a key you can call the open endpoints as an anonymous visitor on the Open plan. With a key
          (Researcher and Institution plans, made on <Link href="/account/api-keys" className="underline">your API keys page</Link>) send it in the Authorization header:
        </p>
        <CodeBlock label="Example: who am I">{`curl "${base}/api/v1" \\\n  -H "Authorization: Bearer $RAINPRINT_API_KEY"`}</CodeBlock>
        <p className="text-ink-800">
          Keys look like <code className="font-mono">{API_KEY_PREFIX}</code> followed by 32 letters and digits. A key is shown once, when it is made; Rainprint stores only a hash of it.
          Keep it out of code repositories and web pages. A revoked key is refused (401) from the next request on. Institution keys belong to the organisation: its owner makes
          and revokes them, members can see them, and they stop working while the subscription is not active. The app&apos;s own pages call the API with your session instead of a key.
        </p>
      </section>

      <section aria-labelledby="quotas-heading" id="quotas" className="flex flex-col gap-3">
        <h2 id="quotas-heading" className="text-xl font-semibold">Quotas and rate limits</h2>
        <p className="text-ink-800">
          Requests are counted per UTC day: a Researcher&apos;s across all their keys, an Institution&apos;s across the whole organisation, and anonymous requests per client
          address. A request refused as malformed (400) counts against nothing; nor does a refused key or plan. The quota renews at 00:00 UTC.
        </p>
        <div className="overflow-x-auto">
          <table className="w-full min-w-[36rem] text-left text-sm" data-testid="quota-table">
            <caption className="sr-only">Daily quotas per plan</caption>
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-2 pr-3 font-medium">Plan</th>
                <th scope="col" className="py-2 pr-3 font-medium">Requests a day</th>
                <th scope="col" className="py-2 pr-3 font-medium">Site lookups a day</th>
                <th scope="col" className="py-2 pr-3 font-medium">API keys</th>
                <th scope="col" className="py-2 font-medium">Sites per batch lookup</th>
              </tr>
            </thead>
            <tbody>
              {PLAN_ORDER.map((p) => {
                const l = PLAN_CATALOGUE[p].limits;
                return (
                  <tr key={p} className="border-b border-ink-100">
                    <th scope="row" className="py-2 pr-3 font-medium">{PLAN_CATALOGUE[p].name}</th>
                    <td className="py-2 pr-3">
                      {n(l.apiRequestsPerDay)} {p === "open" ? "per address (no key)" : p === "institution" ? "shared by the organisation" : "per account"}
                    </td>
                    <td className="py-2 pr-3">{l.siteLookupsPerDay === null ? "no separate cap" : n(l.siteLookupsPerDay)}</td>
                    <td className="py-2 pr-3">{l.apiKeys === 0 ? "none" : n(l.apiKeys)}</td>
                    <td className="py-2">{l.batchLookupMaxSites === 0 ? "not included" : n(l.batchLookupMaxSites)}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="text-ink-800">
          Every answer says where you stand, in the structured-field form of the IETF draft on RateLimit header fields (draft-ietf-httpapi-ratelimit-headers, revisions 10–11):
        </p>
        <CodeBlock label="RateLimit headers">{`RateLimit-Policy: "${POLICY_NAME.requests}";q=${PLAN_CATALOGUE.researcher.limits.apiRequestsPerDay};w=${QUOTA_WINDOW_S}\nRateLimit: "${POLICY_NAME.requests}";r=1873;t=41234`}</CodeBlock>
        <p className="text-ink-800">
          <code className="font-mono">q</code> is the quota per window, <code className="font-mono">w</code> the window in seconds, <code className="font-mono">r</code> the units left and{" "}
          <code className="font-mono">t</code> the seconds until 00:00 UTC. Policy <code className="font-mono">&quot;{POLICY_NAME.lookups}&quot;</code> appears on site-lookup endpoints
          for plans that cap lookups. When the quota is used up the answer is 429 <Link href="/problems/quota-exceeded" className="underline">quota-exceeded</Link> with{" "}
          <code className="font-mono">Retry-After</code> in seconds. The index and the OpenAPI document are free.
        </p>
      </section>

      <section aria-labelledby="endpoints-heading" className="flex flex-col gap-4">
        <h2 id="endpoints-heading" className="text-xl font-semibold">Endpoints</h2>
        {endpoints.map((ep) => (
          <EndpointSection key={ep.id} ep={ep} />
        ))}
      </section>

      <section aria-labelledby="errors-heading" className="flex flex-col gap-3">
        <h2 id="errors-heading" className="text-xl font-semibold">Errors</h2>
        <p className="text-ink-800">
          Errors are <code className="font-mono">application/problem+json</code> (RFC 9457) with a stable <code className="font-mono">code</code>; <code className="font-mono">detail</code>{" "}
          explains this occurrence and <code className="font-mono">errors</code> lists messages per parameter.
        </p>
        <CodeBlock label="Example error">{`HTTP/1.1 400 Bad Request\nContent-Type: application/problem+json\n\n{"type":"/problems/invalid-input","title":"The request is not valid","status":400,\n "code":"invalid-input","detail":"Some fields need attention.",\n "errors":{"limit":["limit can be at most 500."]},"instance":"/api/v1/stations"}`}</CodeBlock>
        <ul className="list-disc pl-5 text-sm">
          {apiProblems.map((c) => (
            <li key={c}>
              <Link href={`/problems/${c}`} className="underline font-mono">{c}</Link> — {PROBLEM_TYPES[c].status}, {PROBLEM_TYPES[c].title}
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="terms-heading" id="data-terms" className="flex flex-col gap-3">
        <h2 id="terms-heading" className="text-xl font-semibold">Data terms</h2>
        <p className="text-ink-800">
          Station data is published under <a href={DATA_LICENCE.url} className="underline">{DATA_LICENCE.name}</a>. {DATA_LICENCE.note} Stations and samples marked{" "}
          <code className="font-mono">synthetic: true</code> are synthetic demo data: invented for demonstration, not real measurements; do not use them for anything but trying the API.
        </p>
      </section>

      <Cautions />
    </div>
  );
}
