import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getClient, getDb } from "@/db";
import { apiKeys, subscriptions } from "@/db/schema";
import { forgetCachedPlans } from "@/lib/api/caller";
import { v1Handler } from "@/lib/api/endpoint";
import { createApiKey } from "@/lib/api/keys";
import { flushUsage, resetUsageMemory } from "@/lib/api/usage";
import { apiIndex, getStation, listStationSamples, listStations } from "@/lib/api/v1";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import { resetEnvCache } from "@/lib/env";
import { freshDb } from "../helpers/db";
import { institution, researcher, stationWithSamples } from "./fixtures";

// The v1 wrapper end to end against a test database, without the web server:
// callers, plans, validation before counting, quotas and the headers.

const handlers = {
  list: v1Handler(listStations),
  station: v1Handler(getStation),
  samples: v1Handler(listStationSamples),
  index: v1Handler(apiIndex),
};

type Call = { status: number; headers: Headers; body: Record<string, unknown> };

async function call(h: (typeof handlers)[keyof typeof handlers], url: string, opts: { key?: string; ip?: string; params?: Record<string, string>; authorization?: string } = {}): Promise<Call> {
  const headers = new Headers({ "x-forwarded-for": opts.ip ?? "192.0.2.10" });
  if (opts.key) headers.set("authorization", `Bearer ${opts.key}`);
  if (opts.authorization) headers.set("authorization", opts.authorization);
  const res = await h(new Request(`http://localhost${url}`, { headers }), { params: Promise.resolve(opts.params ?? {}) });
  return { status: res.status, headers: res.headers, body: (await res.json()) as Record<string, unknown> };
}

const remainingOf = (c: Call) => Number(/"daily";r=(\d+)/.exec(c.headers.get("ratelimit") ?? "")?.[1]);

async function stored(subject: string): Promise<number> {
  await flushUsage();
  const rs = await getClient().execute({ sql: "SELECT coalesce(sum(count), 0) AS n FROM api_usage WHERE subject = ?", args: [subject] });
  return Number(rs.rows[0].n);
}

beforeAll(async () => {
  process.env.API_USAGE_FLUSH_MS = "0";
  resetEnvCache();
  resetUsageMemory();
  await freshDb();
  await stationWithSamples("RP-TST-001");
  await stationWithSamples("RP-TST-002", { lon: 179.5, lat: -17 });
  await stationWithSamples("RP-TST-003", { lon: -179.5, lat: -16 });
  await stationWithSamples("RP-TST-004", { status: "pending" });
});

afterAll(() => {
  delete process.env.API_USAGE_FLUSH_MS;
  resetEnvCache();
});

describe("GET /api/v1/stations", () => {
  it("answers anonymous callers with approved stations, the demo notice, the licence and RateLimit headers", async () => {
    const c = await call(handlers.list, "/api/v1/stations");
    expect(c.status).toBe(200);
    const stations = c.body.stations as { code: string; synthetic: boolean; sampleCount: number; firstDate: string; lastDate: string }[];
    expect(stations.map((s) => s.code)).toEqual(["RP-TST-001", "RP-TST-002", "RP-TST-003"]);
    expect(stations[0]).toMatchObject({ synthetic: true, sampleCount: 36, firstDate: "2022-01-01", lastDate: "2025-01-01" });
    expect(c.body.notice).toContain("synthetic demo data");
    expect(c.body.licence).toMatchObject({ name: "CC BY 4.0" });
    expect(c.headers.get("ratelimit-policy")).toBe(`"daily";q=${PLAN_CATALOGUE.open.limits.apiRequestsPerDay};w=86400`);
    expect(c.headers.get("ratelimit")).toMatch(/^"daily";r=\d+;t=\d+$/);
    expect(c.headers.get("cache-control")).toBe("no-store");
  });

  it("filters by a bounding box across the antimeridian, by text, and pages", async () => {
    const across = await call(handlers.list, "/api/v1/stations?bbox=170,-50,-170,0");
    expect((across.body.stations as { code: string }[]).map((s) => s.code)).toEqual(["RP-TST-002", "RP-TST-003"]);
    const text = await call(handlers.list, "/api/v1/stations?q=tst-001");
    expect((text.body.stations as { code: string }[]).map((s) => s.code)).toEqual(["RP-TST-001"]);
    const page = await call(handlers.list, "/api/v1/stations?limit=2");
    expect(page.body.page).toEqual({ total: 3, limit: 2, offset: 0, next: "/api/v1/stations?limit=2&offset=2" });
  });

  it("refuses malformed queries with field messages, and counts them against nothing", async () => {
    const ip = "192.0.2.77";
    const first = await call(handlers.list, "/api/v1/stations", { ip });
    const before = await stored(`anon:${ip}`);
    for (const q of ["limit=0", "limit=abc", "bbox=1,2,3", "bbox=0,80,10,95", "country=Germany", "colour=blue", "offset=-1"]) {
      const bad = await call(handlers.list, `/api/v1/stations?${q}`, { ip });
      expect(bad.status, q).toBe(400);
      expect(bad.headers.get("content-type")).toBe("application/problem+json");
      expect(bad.body).toMatchObject({ code: "invalid-input", type: "/problems/invalid-input" });
      expect(Object.keys(bad.body.errors as object).length, q).toBeGreaterThan(0);
      expect(remainingOf(bad), q).toBe(remainingOf(first));
    }
    expect(await stored(`anon:${ip}`)).toBe(before);
    const good = await call(handlers.list, "/api/v1/stations", { ip });
    expect(remainingOf(good)).toBe(remainingOf(first) - 1);
  });
});

describe("GET /api/v1/stations/{code}", () => {
  it("gives the long-term amount-weighted means", async () => {
    const c = await call(handlers.station, "/api/v1/stations/rp-tst-001", { params: { code: "rp-tst-001" } });
    expect(c.status).toBe(200);
    const means = c.body.means as { annual: { d18O: number; d2H: number; dExcess: number; included: boolean }; monthly: { period: number; d18O: number }[] };
    // Equal 50 mm amounts: 5 months at −4‰ and 7 at −8‰ → (5·−4 + 7·−8)/12 = −6.333‰; δ2H = 8·δ18O + 10.
    expect(means.annual.d18O).toBeCloseTo(-6.33, 2);
    expect(means.annual.d2H).toBeCloseTo(8 * (-76 / 12) + 10, 1);
    expect(means.annual.dExcess).toBeCloseTo(10, 2);
    expect(means.annual.included).toBe(true);
    expect(means.monthly.map((m) => m.d18O)).toEqual([-8, -8, -8, -8, -4, -4, -4, -4, -4, -8, -8, -8]);
    expect(c.body.credit).toBe("Test Basin Cooperative, via Rainprint");
  });

  it("404 for an unknown or unapproved station, 400 for a malformed code", async () => {
    expect((await call(handlers.station, "/api/v1/stations/RP-TST-004", { params: { code: "RP-TST-004" } })).body.code).toBe("not-found");
    const bad = await call(handlers.station, "/api/v1/stations/%20x", { params: { code: " x" } });
    expect(bad.status).toBe(400);
  });
});

describe("keys, plans and quotas", () => {
  it("accepted samples need a paid plan: anonymous 401, a Researcher key 200 (counted on the account and the key)", async () => {
    const url = "/api/v1/stations/RP-TST-001/samples";
    const params = { code: "RP-TST-001" };
    const anon = await call(handlers.samples, url, { params });
    expect(anon.status).toBe(401);
    expect(anon.body.detail).toContain("Researcher");

    const r = await researcher();
    const { key, secret } = await createApiKey(await r.viewer(), { name: "test" });
    const ok = await call(handlers.samples, `${url}?from=2023-01-01&to=2023-07-01`, { params, key: secret });
    expect(ok.status).toBe(200);
    expect((ok.body.samples as unknown[]).length).toBe(6);
    expect(ok.body.page).toMatchObject({ total: 6 });
    expect(ok.headers.get("ratelimit-policy")).toBe(`"daily";q=${PLAN_CATALOGUE.researcher.limits.apiRequestsPerDay};w=86400`);
    expect(await stored(`user:${r.id}`)).toBe(1);
    expect(await stored(`key:${key.id}`)).toBe(1);
    const row = await getDb().select().from(apiKeys).where(eq(apiKeys.id, key.id)).get();
    expect(row?.lastUsedAt).toBeInstanceOf(Date);

    // The subscription ends: the key's account is on Open, the key no longer opens paid endpoints.
    await getDb().update(subscriptions).set({ status: "canceled" }).where(eq(subscriptions.userId, r.id));
    forgetCachedPlans(); // plans behind keys are remembered for PLAN_CACHE_MS
    const lapsed = await call(handlers.samples, url, { params, key: secret });
    expect(lapsed.status).toBe(403);
    expect(lapsed.body.code).toBe("plan-required");
  });

  it("401 for a malformed, unknown or revoked key — never anonymous instead", async () => {
    const bad = await call(handlers.list, "/api/v1/stations", { authorization: "Token abc" });
    expect(bad).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
    const unknown = await call(handlers.list, "/api/v1/stations", { key: `rp_live_${"a".repeat(32)}` });
    expect(unknown).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
    expect(unknown.headers.get("ratelimit")).toMatch(/"daily";r=\d+/);
  });

  it("429 with Retry-After and RateLimit r=0 once the day's quota is used up; an organisation's keys share one quota", async () => {
    const { org, owner } = await institution();
    const a = await createApiKey(await owner.viewer(), { name: "a" });
    const b = await createApiKey(await owner.viewer(), { name: "b" });
    const limit = PLAN_CATALOGUE.institution.limits.apiRequestsPerDay;
    const today = new Date().toISOString().slice(0, 10);
    await getClient().execute({ sql: "INSERT INTO api_usage (subject, day, count) VALUES (?, ?, ?)", args: [`org:${org.id}`, today, limit - 2] });
    expect((await call(handlers.list, "/api/v1/stations", { key: a.secret })).status).toBe(200);
    const last = await call(handlers.list, "/api/v1/stations", { key: b.secret });
    expect(last.status).toBe(200);
    expect(remainingOf(last)).toBe(0);
    const refused = await call(handlers.list, "/api/v1/stations", { key: a.secret });
    expect(refused.status).toBe(429);
    expect(refused.headers.get("content-type")).toBe("application/problem+json");
    expect(Number(refused.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(Number(refused.headers.get("retry-after"))).toBeLessThanOrEqual(86_400);
    expect(refused.headers.get("ratelimit")).toMatch(/^"daily";r=0;t=\d+$/);
    expect(refused.body).toMatchObject({ code: "quota-exceeded", "violated-policies": ["daily"] });
    expect(await stored(`org:${org.id}`)).toBe(limit);
    expect(await stored(`key:${a.key.id}`)).toBe(1);
    // A malformed request is still answered 400 (not 429): validation comes first.
    expect((await call(handlers.list, "/api/v1/stations?limit=0", { key: a.secret })).status).toBe(400);
    // Free endpoints still answer and say where the caller stands.
    const index = await call(handlers.index, "/api/v1", { key: a.secret });
    expect(index.status).toBe(200);
    expect(index.body.caller).toMatchObject({ kind: "key", plan: "institution", key: { name: "a" } });
  });
});

describe("site-lookup meter (for lookup endpoints)", () => {
  it("Open callers are also capped by siteLookupsPerDay; both policies appear in the headers; paid plans have no lookup cap", async () => {
    const { defineEndpoint } = await import("@/lib/api/endpoint");
    const { z } = await import("zod");
    const lookup = v1Handler(
      defineEndpoint({
        id: "testLookup",
        method: "GET",
        path: "/api/v1/test-lookup",
        tag: "Test",
        summary: "test",
        description: "test",
        access: "everyone",
        response: z.object({ ok: z.boolean() }),
        responseDescription: "ok",
        quota: { meter: "lookups" },
        examples: [],
        handler: async () => ({ ok: true }),
      }),
    );
    const cap = PLAN_CATALOGUE.open.limits.siteLookupsPerDay!;
    const ip = "192.0.2.200";
    let last: Call | null = null;
    for (let i = 0; i < cap; i++) {
      last = await call(lookup as typeof handlers.list, "/api/v1/test-lookup", { ip });
      expect(last.status).toBe(200);
    }
    expect(last!.headers.get("ratelimit-policy")).toBe(`"daily";q=${PLAN_CATALOGUE.open.limits.apiRequestsPerDay};w=86400, "lookups";q=${cap};w=86400`);
    expect(last!.headers.get("ratelimit")).toMatch(new RegExp(`^"daily";r=${PLAN_CATALOGUE.open.limits.apiRequestsPerDay - cap};t=\\d+, "lookups";r=0;t=\\d+$`));
    const refused = await call(lookup as typeof handlers.list, "/api/v1/test-lookup", { ip });
    expect(refused.status).toBe(429);
    expect(refused.body["violated-policies"]).toEqual(["lookups"]);
    // The refused lookup did not use up a request either.
    expect(await stored(`anon:${ip}`)).toBe(cap);

    const r = await researcher();
    const { secret } = await createApiKey(await r.viewer(), { name: "lookups" });
    const paid = await call(lookup as typeof handlers.list, "/api/v1/test-lookup", { key: secret });
    expect(paid.headers.get("ratelimit-policy")).toBe(`"daily";q=${PLAN_CATALOGUE.researcher.limits.apiRequestsPerDay};w=86400`);
  });
});
