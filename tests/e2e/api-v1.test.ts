import { Validator } from "@seriousme/openapi-schema-validator";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { demoAccount } from "./helpers/accounts";
import { withBrowser } from "./helpers/browser";
import { testDb } from "./helpers/db";
import { HttpSession, signedIn } from "./helpers/http";

// The public API over HTTP against the production build: the document, keys,
// plans, quotas and their headers, and the keys page in a real browser.

const base = () => inject("baseUrl");
const SAMPLES = "/api/v1/stations/RP-EUR-001/samples?limit=3";

async function get(path: string, headers: Record<string, string> = {}): Promise<{ status: number; headers: Headers; body: Record<string, unknown> }> {
  const res = await fetch(`${base()}${path}`, { headers });
  const text = await res.text();
  return { status: res.status, headers: res.headers, body: text ? (JSON.parse(text) as Record<string, unknown>) : {} };
}

const remaining = (h: Headers) => Number(/"daily";r=(\d+)/.exec(h.get("ratelimit") ?? "")?.[1] ?? NaN);
/** A documentation address (RFC 5737) per test, so anonymous quotas do not mix. */
const address = (n: number) => `203.0.113.${n}`;

describe("public API v1 over HTTP", () => {
  it("serves a valid OpenAPI 3.1 document that lists the station endpoints", async () => {
    const r = await get("/api/v1/openapi.json");
    expect(r.status).toBe(200);
    const v = new Validator();
    const res = await v.validate(r.body);
    expect(res.errors ?? []).toEqual([]);
    expect(Object.keys(r.body.paths as object)).toEqual(expect.arrayContaining(["/api/v1/stations", "/api/v1/stations/{code}", "/api/v1/stations/{code}/samples"]));
    expect(r.headers.get("ratelimit-policy")).toMatch(/^"daily";q=\d+;w=86400$/);
  });

  it("answers station data with the synthetic-data notice and the licence", async () => {
    const list = await get("/api/v1/stations?q=RP-EUR&limit=5", { "x-forwarded-for": address(1) });
    expect(list.status).toBe(200);
    const stations = list.body.stations as { code: string; synthetic: boolean; sampleCount: number }[];
    expect(stations.length).toBe(5);
    expect(stations.every((s) => s.synthetic && s.sampleCount > 0)).toBe(true);
    expect(list.body.notice).toContain("synthetic demo data");
    const one = await get("/api/v1/stations/rp-eur-001", { "x-forwarded-for": address(1) });
    expect(one.status).toBe(200);
    expect((one.body.means as { monthly: unknown[] }).monthly).toHaveLength(12);
  });

  it("missing or unknown key → 401; an Open account → 403 naming the plan that unlocks it; all problem+json", async () => {
    const missing = await get(SAMPLES, { "x-forwarded-for": address(2) });
    expect(missing.status).toBe(401);
    expect(missing.headers.get("content-type")).toBe("application/problem+json");
    expect(missing.headers.get("ratelimit")).toMatch(/^"daily";r=\d+;t=\d+$/);
    const unknown = await get(SAMPLES, { authorization: `Bearer rp_live_${"Z".repeat(32)}` });
    expect(unknown).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
    const malformed = await get(SAMPLES, { authorization: "Bearer not-a-key" });
    expect(malformed).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
    const open = await signedIn(demoAccount("newcomer").email, demoAccount("newcomer").password);
    const res = await open.json(SAMPLES, "GET");
    expect(res.status).toBe(403);
    expect(res.body).toMatchObject({ code: "plan-required", "required-plan": "researcher" });
    expect(String(res.body.detail)).toContain("Researcher");
  });

  it("anonymous callers: malformed requests count for nothing; after the daily quota, 429 with Retry-After and RateLimit", async () => {
    const ip = { "x-forwarded-for": address(3) };
    const first = await get("/api/v1/stations?limit=1", ip);
    expect(first.status).toBe(200);
    const left = remaining(first.headers);
    const policy = first.headers.get("ratelimit-policy");
    expect(policy).toMatch(/^"daily";q=(\d+);w=86400$/);
    const quota = Number(/q=(\d+)/.exec(policy!)![1]);
    expect(left).toBe(quota - 1);
    for (const bad of ["/api/v1/stations?limit=0", "/api/v1/stations?bbox=1,2", "/api/v1/stations/%20bad%20/samples", "/api/v1/stations?unknown=1"]) {
      const r = await get(bad, ip);
      expect(r.status, bad).toBeGreaterThanOrEqual(400);
      expect(r.status, bad).toBeLessThan(402);
      expect(remaining(r.headers), bad).toBe(left);
    }
    for (let i = 0; i < left; i++) expect((await get("/api/v1/stations?limit=1", ip)).status).toBe(200);
    const refused = await get("/api/v1/stations?limit=1", ip);
    expect(refused.status).toBe(429);
    expect(refused.headers.get("content-type")).toBe("application/problem+json");
    const retry = Number(refused.headers.get("retry-after"));
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(86_400);
    expect(refused.headers.get("ratelimit")).toMatch(/^"daily";r=0;t=\d+$/);
    expect(refused.body).toMatchObject({ code: "quota-exceeded", "violated-policies": ["daily"] });
    // Another address is not affected; free endpoints still answer.
    expect((await get("/api/v1/stations?limit=1", { "x-forwarded-for": address(4) })).status).toBe(200);
    expect((await get("/api/v1", ip)).status).toBe(200);
  });
});

describe("API keys in the browser", () => {
  let subscriptionId: string | null = null;

  beforeAll(async () => {
    // The demo Institution organisation subscribes (the billing flow has its own tests).
    const db = testDb();
    const org = await db.execute("SELECT id FROM organizations WHERE slug = 'lakeshore-basin'");
    const orgId = String(org.rows[0].id);
    subscriptionId = `e2e-api-${Date.now()}`;
    await db.execute({
      sql: "INSERT INTO subscriptions (id, organization_id, plan, interval, status, stripe_customer_id, stripe_subscription_id, seats, cancel_at_period_end, created_at) VALUES (?, ?, 'institution', 'year', 'active', ?, ?, 5, 0, ?)",
      args: [subscriptionId, orgId, `cus_${subscriptionId}`, `sub_${subscriptionId}`, Date.now()],
    });
  });

  afterAll(async () => {
    if (subscriptionId) await testDb().execute({ sql: "DELETE FROM subscriptions WHERE id = ?", args: [subscriptionId] });
  });

  async function signInAs(page: Page, key: "institution") {
    const a = demoAccount(key);
    await page.goto("/sign-in?callbackUrl=%2Faccount%2Fapi-keys");
    await page.getByLabel("E-mail address").first().fill(a.email);
    await page.getByLabel("Password", { exact: true }).fill(a.password);
    await page.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL("**/account/api-keys");
  }

  it("an Institution owner makes a key, calls the API with it, sees its use, revokes it, and the next call is refused", async () => {
    const keyName = `pipeline ${Date.now().toString(36)}`;
    await withBrowser("api-key-flow", async (page) => {
      await signInAs(page, "institution");
      const accountNav = page.getByRole("link", { name: "API keys" });
      await accountNav.first().waitFor({ state: "visible" });
      expect(await page.getByTestId("key-allowance").textContent()).toContain("Lakeshore Basin Water Institute");

      await page.getByLabel("Key name").fill(keyName);
      await page.getByRole("button", { name: "Make key" }).click();
      const secretBox = page.getByTestId("new-key-secret");
      await secretBox.waitFor({ state: "visible" });
      const secret = await secretBox.inputValue();
      expect(secret).toMatch(/^rp_live_[0-9A-Za-z]{32}$/);
      const row = page.locator(`tr[data-key-name="${keyName}"]`);
      await row.waitFor({ state: "visible" });
      expect(await row.getByTestId("key-state").textContent()).toBe("Active");
      expect(await row.textContent()).toContain(secret.slice(0, 14));
      expect(await row.textContent()).not.toContain(secret.slice(14));

      // The key works for a paid endpoint and counts on the organisation's quota.
      const ok = await get(SAMPLES, { authorization: `Bearer ${secret}` });
      expect(ok.status).toBe(200);
      expect((ok.body.samples as unknown[]).length).toBe(3);
      expect(ok.headers.get("ratelimit-policy")).toBe('"daily";q=50000;w=86400');
      const who = await get("/api/v1", { authorization: `Bearer ${secret}` });
      expect(who.body.caller).toMatchObject({ kind: "key", plan: "institution", key: { name: keyName } });

      // Last use and usage appear on the pages.
      await page.reload();
      await row.waitFor({ state: "visible" });
      expect(await row.getByTestId("key-last-used").textContent()).not.toBe("never");
      await page.goto("/account/usage");
      await page.getByTestId("usage-chart").waitFor({ state: "visible" });
      expect(await page.getByTestId("usage-table").textContent()).toContain(keyName);

      // Revoke, effective at once.
      await page.goto("/account/api-keys");
      await row.getByRole("button", { name: `Revoke key ${keyName}` }).click();
      await row.getByRole("button", { name: "Revoke now" }).click();
      await page.getByText(`Key “${keyName}” is revoked`).waitFor({ state: "visible" });
      await expect.poll(async () => row.getByTestId("key-state").textContent()).toMatch(/^Revoked/);
      const after = await get(SAMPLES, { authorization: `Bearer ${secret}` });
      expect(after.status).toBe(401);
      expect(after.body.code).toBe("invalid-api-key");
    });

    const events = await testDb().execute({
      sql: "SELECT e.action FROM review_events e JOIN api_keys k ON k.id = e.entity_id WHERE e.entity_type = 'api-key' AND k.name = ? ORDER BY e.at",
      args: [keyName],
    });
    expect(events.rows.map((r) => r.action)).toEqual(["create", "revoke"]);
    const stored = await testDb().execute({ sql: "SELECT hash, prefix FROM api_keys WHERE name = ?", args: [keyName] });
    expect(String(stored.rows[0].hash)).toMatch(/^[0-9a-f]{64}$/);
  });

  it("the API guide lists every endpoint with examples and the quotas per plan", async () => {
    const s = new HttpSession();
    const res = await s.fetch("/api");
    expect(res.status).toBe(200);
    const html = await res.text();
    for (const p of ["/api/v1/stations", "/api/v1/stations/{code}", "/api/v1/stations/{code}/samples", "/api/v1/openapi.json"]) expect(html).toContain(p);
    expect(html).toContain("curl");
    expect(html).toContain("RateLimit-Policy");
    expect(html).toContain("synthetic demo data");
    expect(html).toContain("50,000");
  });
});
