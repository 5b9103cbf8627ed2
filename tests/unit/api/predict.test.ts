import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getClient } from "@/db";
import { forgetCachedPlans } from "@/lib/api/caller";
import { v1Handler } from "@/lib/api/endpoint";
import { createApiKey, revokeApiKey } from "@/lib/api/keys";
import { flushUsage, resetUsageMemory } from "@/lib/api/usage";
import { predictBatch, predictSite } from "@/lib/api/v1";
import { apiPrediction, BATCH_STATIONS, batchItemJson, batchResponse } from "@/lib/api/v1/predict";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import { forgetEditionPredictors, loadEditionPredictor } from "@/lib/editions/predictor";
import { resetEnvCache } from "@/lib/env";
import { freshDb } from "../helpers/db";
import { insertTestEdition, insertTestStations } from "../helpers/edition";
import { testStations } from "../../shared/test-edition";
import { institution, person, researcher } from "./fixtures";

// GET and POST /api/v1/predict through the v1 wrapper against a test database holding an
// invented edition (synthetic test data): answers equal the predictor's, bad input and
// unknown editions are refused with problem+json and count nothing, batches count per site.

const GET = v1Handler(predictSite);
const POST = v1Handler(predictBatch);
const STATIONS = testStations("RP-API", 30, { lat: [40, 50], lon: [0, 15] }, 3);

type Call = { status: number; headers: Headers; body: Record<string, unknown> };

async function call(h: typeof GET, url: string, opts: { key?: string; ip?: string; method?: string; body?: string; type?: string } = {}): Promise<Call> {
  const headers = new Headers({ "x-forwarded-for": opts.ip ?? "192.0.2.50" });
  if (opts.key) headers.set("authorization", `Bearer ${opts.key}`);
  if (opts.type) headers.set("content-type", opts.type);
  const res = await h(new Request(`http://localhost${url}`, { method: opts.method ?? "GET", headers, body: opts.body }), { params: Promise.resolve({}) });
  return { status: res.status, headers: res.headers, body: (await res.json()) as Record<string, unknown> };
}

async function stored(subject: string): Promise<number> {
  await flushUsage();
  const rs = await getClient().execute({ sql: "SELECT coalesce(sum(count), 0) AS n FROM api_usage WHERE subject = ?", args: [subject] });
  return Number(rs.rows[0].n);
}

const jsonBody = (sites: unknown[], extra: Record<string, unknown> = {}) => ({ method: "POST", type: "application/json", body: JSON.stringify({ sites, ...extra }) });

beforeAll(async () => {
  process.env.API_USAGE_FLUSH_MS = "0";
  resetEnvCache();
  resetUsageMemory();
  await freshDb();
  await insertTestStations(STATIONS);
  await insertTestEdition({ id: "2026.05.1", stations: STATIONS, maxNeighbors: 16 });
  forgetEditionPredictors();
  forgetCachedPlans();
});

afterAll(() => {
  delete process.env.API_USAGE_FLUSH_MS;
  resetEnvCache();
});

describe("GET /api/v1/predict", () => {
  it("answers the predictor's numbers (rounded to 0.001 ‰) with the edition, citation, water line and stations", async () => {
    const c = await call(GET, "/api/v1/predict?lat=46.5042&lon=7.2083&elevation=1200", { ip: "192.0.2.51" });
    expect(c.status).toBe(200);
    const direct = (await loadEditionPredictor("2026.05.1")).predict({ lat: 46.5042, lon: 7.2083, elevationM: 1200 });
    const annual = c.body.annual as Record<string, { value: number; sd: number; lower95: number; upper95: number }>;
    expect(annual.d18O.value).toBeCloseTo(direct.annual.d18O.value, 3);
    expect(annual.d18O.lower95).toBeCloseTo(direct.annual.d18O.lower95, 3);
    expect(annual.d2H.sd).toBeCloseTo(direct.annual.d2H.sd, 3);
    const monthly = c.body.monthly as { month: number; dExcess: { value: number } }[];
    expect(monthly).toHaveLength(12);
    expect(monthly[6].dExcess.value).toBeCloseTo(direct.monthly[6].dExcess.value, 3);
    expect(c.body.edition).toBe("2026.05.1");
    expect(c.body.citation).toContain("edition 2026.05.1");
    expect(c.body.citation).toContain("Synthetic demo data");
    expect(c.body.waterLine).toMatchObject({ method: "pwlsr" });
    expect((c.body.stations as unknown[]).length).toBeGreaterThan(0);
    expect(c.body.site).toMatchObject({ elevationM: 1200, seaLevelEquivalent: false });
    expect(c.headers.get("ratelimit-policy")).toContain('"lookups"');
  });

  it("reads degrees-minutes-seconds and gives the sea-level equivalent without an elevation", async () => {
    const c = await call(GET, `/api/v1/predict?lat=${encodeURIComponent(`46°30'15"N`)}&lon=${encodeURIComponent("7 12 30 E")}&edition=2026.05.1`, { ip: "192.0.2.52" });
    expect(c.status).toBe(200);
    expect((c.body.site as { lat: number }).lat).toBeCloseTo(46.504166667, 8);
    expect(c.body.site).toMatchObject({ elevationM: null, seaLevelEquivalent: true });
  });

  it("refuses latitude 91, longitude 181, non-numbers and unknown parameters with 400 problem+json, counting nothing", async () => {
    const ip = "192.0.2.53";
    for (const q of ["lat=91&lon=7", "lat=46&lon=181", "lat=abc&lon=7", "lat=46", "lat=46&lon=7&elevation=high", "lat=46&lon=7&colour=red", "lat=46&lon=7&edition=../x"]) {
      const c = await call(GET, `/api/v1/predict?${q}`, { ip });
      expect(c.status, q).toBe(400);
      expect(c.headers.get("content-type")).toBe("application/problem+json");
      expect(c.body.code).toBe("invalid-input");
    }
    const c = await call(GET, "/api/v1/predict?lat=91&lon=7", { ip });
    expect(JSON.stringify(c.body.errors)).toContain("Latitude 91 is outside −90…90°");
    expect(await stored(`anon:${ip}`)).toBe(0);
    expect(await stored(`lookups:anon:${ip}`)).toBe(0);
  });

  it("an unknown or unpublished edition is a 404 unknown-edition that counts nothing", async () => {
    const ip = "192.0.2.54";
    const c = await call(GET, "/api/v1/predict?lat=46&lon=7&edition=1999.1.1", { ip });
    expect(c.status).toBe(404);
    expect(c.headers.get("content-type")).toBe("application/problem+json");
    expect(c.body).toMatchObject({ code: "unknown-edition", type: "/problems/unknown-edition" });
    expect(await stored(`anon:${ip}`)).toBe(0);
  });

  it("Open callers get their daily site lookups, then 429 with Retry-After", async () => {
    const ip = "192.0.2.55";
    const cap = PLAN_CATALOGUE.open.limits.siteLookupsPerDay!;
    await getClient().execute({ sql: "INSERT INTO api_usage (subject, day, count) VALUES (?, ?, ?)", args: [`lookups:anon:${ip}`, new Date().toISOString().slice(0, 10), cap - 1] });
    expect((await call(GET, "/api/v1/predict?lat=46&lon=7", { ip })).status).toBe(200);
    const refused = await call(GET, "/api/v1/predict?lat=46&lon=7", { ip });
    expect(refused.status).toBe(429);
    expect(refused.body).toMatchObject({ code: "quota-exceeded", "violated-policies": ["lookups"] });
    expect(Number(refused.headers.get("retry-after"))).toBeGreaterThan(0);
  });

  it("missing, unknown and revoked keys", async () => {
    const r = await researcher();
    const { key, secret } = await createApiKey(await r.viewer(), { name: "predict" });
    expect((await call(GET, "/api/v1/predict?lat=46&lon=7", { key: secret })).status).toBe(200);
    await revokeApiKey(await r.viewer(), key.id);
    const revoked = await call(GET, "/api/v1/predict?lat=46&lon=7", { key: secret });
    expect(revoked).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
    const missingKeyBatch = await call(POST, "/api/v1/predict", jsonBody([{ lat: 46, lon: 7 }]));
    expect(missingKeyBatch).toMatchObject({ status: 401, body: { code: "sign-in-required" } });
  });
});

describe("POST /api/v1/predict", () => {
  it("JSON: one answer per site in order, equal to the single-site answers; costs one unit per site", async () => {
    const { org, owner } = await institution("batch");
    const { secret } = await createApiKey(await owner.viewer(), { name: "batch" });
    const sites = [
      { id: "a", lat: 46.5, lon: 7.2, elevation: 1200 },
      { id: "b", lat: "47°22'N", lon: "8°33'E" },
      { lat: 41, lon: 2, elevation: null },
    ];
    const c = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody(sites) });
    expect(c.status).toBe(200);
    const results = c.body.results as { site: { id: string; lat: number }; annual: unknown }[];
    expect(c.body.count).toBe(3);
    expect(results.map((r) => r.site.id)).toEqual(["a", "b", "3"]);
    const single = await call(GET, "/api/v1/predict?lat=46.5&lon=7.2&elevation=1200", { key: secret });
    expect(results[0].annual).toEqual(single.body.annual);
    expect(await stored(`org:${org.id}`)).toBe(3 + 1);
    // the hand-written JSON is the documented shape, and equals the single-site object less what the batch gives once
    const parsed = batchResponse.parse(c.body);
    expect(parsed.citation).toContain("edition 2026.05.1");
    const predictor = await loadEditionPredictor("2026.05.1");
    const direct = predictor.predictMany([{ lat: 46.5, lon: 7.2, elevationM: 1200 }, { lat: 47 + 22 / 60, lon: 8 + 33 / 60, elevationM: null }, { lat: 41, lon: 2, elevationM: null }]);
    direct.forEach((p, i) => {
      const { citation, synthetic, notice, ...rest } = apiPrediction(p, predictor, ["a", "b", "3"][i]);
      void citation;
      void synthetic;
      void notice;
      expect(results[i]).toEqual({ ...rest, stations: rest.stations.slice(0, BATCH_STATIONS) });
      expect(JSON.parse(batchItemJson(p, ["a", "b", "3"][i]))).toEqual(JSON.parse(JSON.stringify({ ...rest, stations: rest.stations.slice(0, BATCH_STATIONS) })));
    });
  });

  it("CSV: the same answers; a malformed file is refused whole with every problem by line, counting nothing", async () => {
    const { org, owner } = await institution("csv");
    const { secret } = await createApiKey(await owner.viewer(), { name: "csv" });
    const ok = await call(POST, "/api/v1/predict", { key: secret, method: "POST", type: "text/csv", body: "id,latitude,longitude,elevation_m\r\nspring,46.5,7.2,1200\r\nwell,46 30 15 N,7 12 30 E,\r\n" });
    expect(ok.status).toBe(200);
    expect((ok.body.results as { site: { id: string } }[]).map((r) => r.site.id)).toEqual(["spring", "well"]);
    const bad = await call(POST, "/api/v1/predict", { key: secret, method: "POST", type: "text/csv", body: 'id,latitude,longitude\nx,91,7\ny,46,181\nz,abc,7\n"w,46,7\n' });
    expect(bad.status).toBe(400);
    expect(bad.headers.get("content-type")).toBe("application/problem+json");
    const lines = (bad.body.errors as { csv: string[] }).csv;
    expect(lines).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^line 2, latitude: Latitude 91 is outside/),
        expect.stringMatching(/^line 3, longitude: Longitude 181 is outside/),
        expect.stringMatching(/^line 4, latitude: .*"abc" is not a number/),
        expect.stringMatching(/^line 5: A quoted field is not closed/),
      ]),
    );
    const noHeader = await call(POST, "/api/v1/predict", { key: secret, method: "POST", type: "text/csv", body: "46,7\n47,8\n" });
    expect(noHeader.status).toBe(400);
    expect(noHeader.body.detail).toMatch(/latitude and longitude are missing/);
    const notJson = await call(POST, "/api/v1/predict", { key: secret, method: "POST", type: "application/json", body: "{sites:" });
    expect(notJson).toMatchObject({ status: 400, body: { code: "malformed-body" } });
    expect(await stored(`org:${org.id}`)).toBe(2);
  });

  it("10,001 sites → 400; more than the plan's batch size → 403 naming the plan; an unknown edition → 404; none of them count", async () => {
    const r = await researcher("batch-limits");
    const { key, secret } = await createApiKey(await r.viewer(), { name: "limits" });
    const many = (n: number) => Array.from({ length: n }, (_, i) => ({ lat: 40 + (i % 100) / 10, lon: (i % 150) / 10 }));
    const tooMany = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody(many(10_001)) });
    expect(tooMany.status).toBe(400);
    expect(tooMany.headers.get("content-type")).toBe("application/problem+json");
    expect(JSON.stringify(tooMany.body)).toContain("at most 10,000 sites");
    const overPlan = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody(many(PLAN_CATALOGUE.researcher.limits.batchLookupMaxSites + 1)) });
    expect(overPlan.status).toBe(403);
    expect(overPlan.body).toMatchObject({ code: "plan-required", "required-plan": "institution" });
    const unknown = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody([{ lat: 46, lon: 7 }], { edition: "2001.1.1" }) });
    expect(unknown).toMatchObject({ status: 404, body: { code: "unknown-edition" } });
    const badSite = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody([{ lat: 46, lon: 7 }, { lat: 91, lon: 7 }]) });
    expect(badSite.status).toBe(400);
    expect(JSON.stringify(badSite.body.errors)).toContain("sites.1.lat");
    expect(await stored(`user:${r.id}`)).toBe(0);
    expect(await stored(`key:${key.id}`)).toBe(0);
  });

  it("a batch that does not fit in what is left of the day's quota is refused (429) and counts nothing", async () => {
    const r = await researcher("batch-quota");
    const { secret } = await createApiKey(await r.viewer(), { name: "quota" });
    const limit = PLAN_CATALOGUE.researcher.limits.apiRequestsPerDay;
    await getClient().execute({ sql: "INSERT INTO api_usage (subject, day, count) VALUES (?, ?, ?)", args: [`user:${r.id}`, new Date().toISOString().slice(0, 10), limit - 2] });
    const refused = await call(POST, "/api/v1/predict", { key: secret, ...jsonBody([{ lat: 46, lon: 7 }, { lat: 47, lon: 8 }, { lat: 48, lon: 9 }]) });
    expect(refused.status).toBe(429);
    expect(refused.body.detail).toMatch(/costing 3 units/);
    expect(await stored(`user:${r.id}`)).toBe(limit - 2);
    expect((await call(POST, "/api/v1/predict", { key: secret, ...jsonBody([{ lat: 46, lon: 7 }, { lat: 47, lon: 8 }]) })).status).toBe(200);
  });

  it("an Open account is told batch lookups need a paid plan", async () => {
    const p = await person("open-batch");
    void p;
    const anon = await call(POST, "/api/v1/predict", jsonBody([{ lat: 46, lon: 7 }]));
    expect(anon.status).toBe(401);
    expect(anon.body.detail).toMatch(/Batch lookups need the Researcher plan/);
  });
});
