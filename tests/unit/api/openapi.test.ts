import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { Validator } from "@seriousme/openapi-schema-validator";
import Ajv2020 from "ajv/dist/2020";
import { describe, expect, it } from "vitest";
import type { V1RouteHandler } from "@/lib/api/endpoint";
import { V1_ENDPOINTS, v1OpenApiDocument } from "@/lib/api/v1";

// The OpenAPI document is valid OpenAPI 3.1 (the official schema, shipped in
// @seriousme/openapi-schema-validator), its schemas are valid JSON Schema
// 2020-12 (ajv), and it lists every route file under app/api/v1 with every
// method the file exports — discovered from the file system, so a new route
// file without a declaration fails here.

const V1_DIR = path.join("app", "api", "v1");

function routeFiles(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir).sort()) {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) out.push(...routeFiles(p));
    else if (/^route\.(ts|js)$/.test(name)) out.push(p);
  }
  return out;
}

/** app/api/v1/stations/[code]/route.ts → /api/v1/stations/{code} */
function apiPathOf(file: string): string {
  const rel = path.relative("app", path.dirname(file)).split(path.sep).join("/");
  return `/${rel}`.replace(/\[\.\.\.(\w+)\]/g, "{$1}").replace(/\[(\w+)\]/g, "{$1}");
}

function exportedMethods(file: string): string[] {
  const src = readFileSync(file, "utf8");
  const found = new Set<string>();
  for (const m of src.matchAll(/export\s+(?:const|async\s+function|function)\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)\b/g)) found.add(m[1]);
  for (const m of src.matchAll(/\bas\s+(GET|POST|PUT|PATCH|DELETE|HEAD|OPTIONS)\b/g)) found.add(m[1]);
  return [...found].sort();
}

const doc = v1OpenApiDocument();

describe("the OpenAPI document", () => {
  it("validates against the OpenAPI 3.1 schema", async () => {
    const validator = new Validator();
    const res = await validator.validate(structuredClone(doc));
    expect(res.errors ?? []).toEqual([]);
    expect(res.valid).toBe(true);
    expect(validator.version).toBe("3.1");
  });

  it("has schemas that are valid JSON Schema 2020-12 and whose references resolve", () => {
    const ajv = new Ajv2020({ strict: false, allErrors: true, validateFormats: false }) // formats are annotations in 2020-12;
    const components = (doc.components as { schemas: Record<string, unknown> }).schemas;
    const wrapper = { $id: "https://rainprint.invalid/doc", components: { schemas: components } };
    ajv.addSchema(wrapper);
    const schemas: unknown[] = [];
    const walk = (node: unknown, key?: string) => {
      if (Array.isArray(node)) return node.forEach((n) => walk(n));
      if (!node || typeof node !== "object") return;
      if (key === "schema") schemas.push(node);
      for (const [k, v] of Object.entries(node)) walk(v, k);
    };
    walk(doc.paths);
    expect(schemas.length).toBeGreaterThan(10);
    for (const s of [...schemas, ...Object.values(components)]) {
      const rewired = JSON.parse(JSON.stringify(s).replaceAll('"#/components/', '"https://rainprint.invalid/doc#/components/'));
      expect(ajv.validateSchema(rewired), JSON.stringify(ajv.errors)).toBe(true);
      expect(() => ajv.compile(rewired)).not.toThrow();
    }
  });

  it("lists every route file under app/api/v1 with every method it exports", () => {
    const files = routeFiles(V1_DIR);
    expect(files.length).toBeGreaterThanOrEqual(5);
    const missing: string[] = [];
    for (const f of files) {
      const p = apiPathOf(f);
      for (const m of exportedMethods(f)) if (!doc.paths[p]?.[m.toLowerCase()]) missing.push(`${m} ${p} (${f})`);
    }
    expect(missing, "route files whose method is not in the OpenAPI document: declare them with defineEndpoint and list them in V1_ENDPOINTS").toEqual([]);
    // … and nothing in the document lacks a route file.
    const served = new Set(files.flatMap((f) => exportedMethods(f).map((m) => `${m} ${apiPathOf(f)}`)));
    const documented = Object.entries(doc.paths).flatMap(([p, ops]) => Object.keys(ops).map((m) => `${m.toUpperCase()} ${p}`));
    expect(documented.filter((d) => !served.has(d))).toEqual([]);
  });

  it("each route file's handler is built from the declaration for its own path and method", async () => {
    for (const f of routeFiles(V1_DIR)) {
      const mod = (await import(/* @vite-ignore */ path.resolve(f))) as Record<string, V1RouteHandler | undefined>;
      for (const m of exportedMethods(f)) {
        const ep = mod[m]?.endpoint;
        expect(ep, `${m} in ${f} must be v1Handler(endpoint)`).toBeDefined();
        expect(`${ep!.method} ${ep!.path}`).toBe(`${m} ${apiPathOf(f)}`);
        expect(V1_ENDPOINTS).toContain(ep);
      }
    }
  });

  it("documents problems, quotas, keys and who may call", () => {
    const samples = doc.paths["/api/v1/stations/{code}/samples"].get as Record<string, unknown>;
    expect(samples["x-rainprint-plans"]).toEqual(["researcher", "institution"]);
    const responses = samples.responses as Record<string, { content?: Record<string, unknown>; headers?: Record<string, unknown> }>;
    for (const status of ["200", "400", "401", "403", "404", "429"]) expect(responses[status], status).toBeDefined();
    expect(responses["403"].content?.["application/problem+json"]).toBeDefined();
    expect(responses["429"].headers?.["Retry-After"]).toBeDefined();
    expect(responses["200"].headers?.RateLimit).toBeDefined();
    const params = (samples.parameters as { name: string; in: string; required: boolean }[]).map((p) => `${p.in}:${p.name}:${p.required}`);
    expect(params).toEqual(expect.arrayContaining(["path:code:true", "query:from:false", "query:limit:false"]));
    const list = doc.paths["/api/v1/stations"].get as { security: unknown[] };
    expect(list.security).toContainEqual({});
    expect(Object.keys((doc.components as { schemas: object }).schemas)).toEqual(expect.arrayContaining(["Problem", "StationSummary", "PeriodMean"]));
  });
});
