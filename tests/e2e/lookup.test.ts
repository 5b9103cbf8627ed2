import { writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { beforeAll, describe, expect, inject, it } from "vitest";
import { restoreKrigingModel, type KrigingModelJSON } from "@/lib/geostats";
import { demoAccount } from "./helpers/accounts";
import { withBrowser } from "./helpers/browser";
import { testDb } from "./helpers/db";
import { lookupEdition } from "./helpers/edition";
import { HttpSession, signedIn } from "./helpers/http";

// Site lookups end to end against the production build: the API's numbers against the engine
// computed directly from the same edition's stored models, the bad-input list of the issue, and
// in headless chromium a subscriber's lookup → report → own samples, a batch file, and an
// institution owner's key used on /api/v1/predict and revoked.

const base = () => inject("baseUrl");
let edition = "";

type Res = { status: number; headers: Headers; body: Record<string, unknown> };

async function call(p: string, init: RequestInit = {}): Promise<Res> {
  const res = await fetch(`${base()}${p}`, init);
  const text = await res.text();
  return { status: res.status, headers: res.headers, body: text ? (JSON.parse(text) as Record<string, unknown>) : {} };
}

const ip = (n: number) => ({ "x-forwarded-for": `198.18.7.${n}` }); // RFC 2544 benchmarking addresses, one per test

async function usage(subject: string): Promise<number> {
  await new Promise((r) => setTimeout(r, 1200)); // the app writes counts every API_USAGE_FLUSH_MS (500 ms)
  const rs = await testDb().execute({ sql: "SELECT coalesce(sum(count), 0) AS n FROM api_usage WHERE subject = ?", args: [subject] });
  return Number(rs.rows[0].n);
}

async function makeKey(account: "institution" | "researcher", name: string): Promise<string> {
  const a = demoAccount(account);
  const s = await signedIn(a.email, a.password);
  const r = await s.json<{ secret: string }>("/api/account/api-keys", "POST", { name });
  expect(r.status).toBe(201);
  return r.body.secret;
}

beforeAll(async () => {
  edition = await lookupEdition();
});

describe("GET /api/v1/predict over HTTP", () => {
  it("equals the engine's direct computation from the edition's stored models (trend + kriged residual)", async () => {
    const site = { lat: 47.1, lon: 8.4, elevation: 650 };
    const r = await call(`/api/v1/predict?lat=${site.lat}&lon=${site.lon}&elevation=${site.elevation}&edition=${edition}`, { headers: ip(1) });
    expect(r.status).toBe(200);
    const rows = await testDb().execute({ sql: "SELECT trend, model FROM surfaces WHERE edition_id = ? AND variable = 'd18O' AND period IN (0, 7) ORDER BY period", args: [edition] });
    const got = [(r.body.annual as { d18O: { value: number; sd: number } }).d18O, (r.body.monthly as { d18O: { value: number; sd: number } }[])[6].d18O];
    rows.rows.forEach((row, i) => {
      const trend = JSON.parse(String(row.trend)) as { terms: { name: string; estimate: number }[]; covariance: number[] };
      const model = restoreKrigingModel((JSON.parse(String(row.model)) as { kriging: KrigingModelJSON }).kriging);
      const k = model.predict(site.lon, site.lat);
      const xOf: Record<string, number> = { intercept: 1, absLat: Math.abs(site.lat), lat2: site.lat ** 2, elevation: site.elevation };
      const x = trend.terms.map((t) => xOf[t.name]);
      const p = x.length;
      let tv = 0;
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) tv += x[a] * trend.covariance[a * p + b] * x[b];
      const value = trend.terms.reduce((s, t, j) => s + t.estimate * x[j], 0) + k.value;
      expect(got[i].value).toBeCloseTo(value, 3);
      expect(got[i].sd).toBeCloseTo(Math.sqrt(k.variance + tv), 3);
    });
    expect(r.body).toMatchObject({ edition, synthetic: true });
    expect(r.headers.get("content-type")).toContain("application/json");
  });

  it("bad input → the right status and a problem+json body, and nothing counted", async () => {
    const h = ip(2);
    const cases: [string, number, string][] = [
      ["/api/v1/predict?lat=91&lon=8", 400, "invalid-input"],
      ["/api/v1/predict?lat=47&lon=181", 400, "invalid-input"],
      ["/api/v1/predict?lat=north&lon=8", 400, "invalid-input"],
      ["/api/v1/predict?lat=47&lon=8&elevation=tall", 400, "invalid-input"],
      ["/api/v1/predict?lat=47&lon=8&edition=1999.1.1", 404, "unknown-edition"],
    ];
    for (const [url, status, code] of cases) {
      const r = await call(url, { headers: h });
      expect(r.status, url).toBe(status);
      expect(r.headers.get("content-type"), url).toBe("application/problem+json");
      expect(r.body.code, url).toBe(code);
    }
    expect(await usage(`anon:${h["x-forwarded-for"]}`)).toBe(0);
    expect(await usage(`lookups:anon:${h["x-forwarded-for"]}`)).toBe(0);
  });

  it("an exhausted daily site-lookup allowance → 429 with Retry-After", async () => {
    const h = ip(3);
    const open = await call("/api/v1", { headers: h });
    const cap = (open.body.caller as { siteLookupsPerDay: number }).siteLookupsPerDay;
    await testDb().execute({ sql: "INSERT INTO api_usage (subject, day, count) VALUES (?, ?, ?)", args: [`lookups:anon:${h["x-forwarded-for"]}`, new Date().toISOString().slice(0, 10), cap] });
    const r = await call(`/api/v1/predict?lat=47&lon=8`, { headers: h });
    expect(r.status).toBe(429);
    expect(r.headers.get("content-type")).toBe("application/problem+json");
    expect(Number(r.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(r.body).toMatchObject({ code: "quota-exceeded", "violated-policies": ["lookups"] });
  });
});

describe("POST /api/v1/predict over HTTP", () => {
  let key = "";
  beforeAll(async () => {
    key = await makeKey("institution", `lookup e2e ${Date.now().toString(36)}`);
  });
  const auth = () => ({ authorization: `Bearer ${key}` });

  it("JSON and CSV batches answer one prediction per site; a 10,001-site batch, malformed CSV and a missing key are refused", async () => {
    const json = await call("/api/v1/predict", { method: "POST", headers: { ...auth(), "content-type": "application/json" }, body: JSON.stringify({ edition, sites: [{ id: "a", lat: 46.5, lon: 7.2 }, { id: "b", lat: "47 22 N", lon: "8 33 E", elevation: 400 }] }) });
    expect(json.status).toBe(200);
    expect((json.body.results as { site: { id: string } }[]).map((x) => x.site.id)).toEqual(["a", "b"]);
    const csv = await call(`/api/v1/predict`, { method: "POST", headers: { ...auth(), "content-type": "text/csv" }, body: "id,latitude,longitude\nx,46.5,7.2\n" });
    expect(csv.status).toBe(200);
    const big = JSON.stringify({ sites: Array.from({ length: 10_001 }, (_, i) => ({ lat: 45 + (i % 50) / 10, lon: 6 + (i % 40) / 10 })) });
    const tooMany = await call("/api/v1/predict", { method: "POST", headers: { ...auth(), "content-type": "application/json" }, body: big });
    expect(tooMany.status).toBe(400);
    expect(tooMany.headers.get("content-type")).toBe("application/problem+json");
    const malformed = await call("/api/v1/predict", { method: "POST", headers: { ...auth(), "content-type": "text/csv" }, body: 'id,latitude,longitude\n"x,46.5,7.2\ny,91,7\n' });
    expect(malformed.status).toBe(400);
    expect(malformed.headers.get("content-type")).toBe("application/problem+json");
    expect(JSON.stringify(malformed.body.errors)).toContain("line 2");
    const nokey = await call("/api/v1/predict", { method: "POST", headers: { ...ip(4), "content-type": "application/json" }, body: JSON.stringify({ sites: [{ lat: 1, lon: 1 }] }) });
    expect(nokey.status).toBe(401);
    expect(nokey.headers.get("content-type")).toBe("application/problem+json");
    const badKey = await call("/api/v1/predict?lat=47&lon=8", { headers: { authorization: `Bearer rp_live_${"Q".repeat(32)}` } });
    expect(badKey).toMatchObject({ status: 401, body: { code: "invalid-api-key" } });
  });
});

async function signInAs(page: Page, account: "researcher" | "institution", next: string) {
  const a = demoAccount(account);
  await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(next)}`);
  await page.getByLabel("E-mail address").first().fill(a.email);
  await page.getByLabel("Password", { exact: true }).fill(a.password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL(`**${next}`);
}

describe("site lookups in the browser", () => {
  it("a subscriber looks up a site in DMS, opens its report, pastes samples and sees them placed against the line", async () => {
    await withBrowser("lookup-report-samples", async (page) => {
      await signInAs(page, "researcher", "/lookup");
      await page.getByLabel("Latitude").fill(`46°30'15"N`);
      await page.getByLabel("Longitude").fill("7 12 30 E");
      await page.getByLabel("Elevation, m (optional)").fill("1200");
      await page.getByLabel("Edition").selectOption(edition);
      await page.getByRole("button", { name: "Look up this site" }).click();
      await page.getByTestId("lookup-result").waitFor({ state: "visible" });
      expect(await page.getByTestId("edition-id").textContent()).toContain(edition);
      expect(await page.getByTestId("prediction-table").locator("tbody tr").count()).toBe(13);
      expect(await page.getByTestId("water-line").textContent()).toMatch(/δ2H = \d+\.\d\d · δ18O/);
      expect(await page.getByTestId("informing-stations").locator("tbody tr").count()).toBeGreaterThan(0);
      expect(await page.getByTestId("citation").textContent()).toContain(`edition ${edition}`);
      expect(await page.getByText("Estimates, not measurements").count()).toBeGreaterThan(0);

      await page.getByTestId("open-report").click();
      await page.getByTestId("site-report").waitFor({ state: "visible" });
      await page.getByTestId("dual-isotope-chart").waitFor({ state: "visible" });
      expect(await page.getByTestId("monthly-chart-d18O").count()).toBe(1);
      // evaporated samples below the predicted line: take the line's own monthly points and enrich along slope 5
      const cells = page.getByTestId("prediction-table").locator("tbody tr[data-period='Year (annual)'] td");
      const d18O = Number(await cells.nth(0).getAttribute("data-value"));
      const d2H = Number(await cells.nth(1).getAttribute("data-value"));
      expect(Number.isFinite(d18O) && Number.isFinite(d2H)).toBe(true);
      const samples = [1, 2, 3, 4].map((t) => `pond-${t}, ${(d18O + 1.5 * t).toFixed(2)}, ${(d2H + 7.5 * t).toFixed(1)}`).join("\n");
      await page.getByTestId("samples-input").fill(samples);
      await page.getByTestId("place-samples").click();
      await page.getByTestId("samples-result").waitFor({ state: "visible" });
      expect(await page.getByTestId("dual-isotope-chart").getAttribute("data-samples")).toBe("4");
      expect(await page.getByTestId("sample-point").count()).toBe(4);
      expect(await page.getByTestId("sample-row").count()).toBe(4);
      expect(await page.getByTestId("sample-row").last().textContent()).toContain("below the line");
      await page.getByTestId("source-water-estimate").waitFor({ state: "visible" });
      expect(await page.getByTestId("source-water-estimate").textContent()).toMatch(/source water is about δ18O/);
      expect(await page.getByTestId("evaporation-line").count()).toBe(1);
    });
  });

  it("a subscriber uploads a file of sites and downloads the results", async () => {
    const file = path.join(os.tmpdir(), `rainprint-sites-${Date.now()}.csv`);
    writeFileSync(file, `id,latitude,longitude,elevation_m\n${Array.from({ length: 1200 }, (_, i) => `s${i},${(40 + (i % 90) / 10).toFixed(2)},${(2 + (i % 70) / 10).toFixed(2)},${i % 2 ? 300 : ""}`).join("\n")}\n`);
    await withBrowser("batch-lookup", async (page) => {
      await signInAs(page, "researcher", "/lookup/batch");
      expect(await page.getByTestId("batch-limits").textContent()).toContain("2,000");
      await page.getByTestId("batch-file").setInputFiles(file);
      await page.getByTestId("batch-run").click();
      await page.getByTestId("batch-download").waitFor({ state: "visible" });
      expect(await page.getByTestId("batch-progress").textContent()).toContain("1,200 of 1,200 sites");
      const href = await page.getByTestId("batch-download").getAttribute("href");
      const text = await page.evaluate(async (u) => (await fetch(u!)).text(), href);
      const lines = text.trim().split("\r\n");
      expect(lines).toHaveLength(1201);
      expect(lines[0]).toContain("d18O_permil_lower95_annual");
      expect(lines[1]).toContain("synthetic demo data");
      // a file with a bad row is refused whole, each problem named by line
      const bad = file.replace(/\.csv$/, "-bad.csv");
      writeFileSync(bad, "id,latitude,longitude\na,91,7\nb,46,abc\n");
      await page.getByTestId("batch-file").setInputFiles(bad);
      await page.getByTestId("batch-run").click();
      await page.getByTestId("batch-problem").waitFor({ state: "visible" });
      const problem = await page.getByTestId("batch-problem").textContent();
      expect(problem).toContain("line 2, latitude: Latitude 91 is outside");
      expect(problem).toContain("line 3, longitude");
    });
  });

  it("an Open visitor sees the lookup allowance and that batch lookups need a paid plan", async () => {
    const s = new HttpSession();
    const page = await s.fetch(`/lookup?lat=47.2&lon=8.1&edition=${edition}`, { headers: ip(9) });
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toMatch(/\d+ of 20 site lookups left today/);
    expect(html).toContain("synthetic demo data");
    const batch = await (await s.fetch("/lookup/batch")).text();
    expect(batch).toContain("Batch lookups are part of the paid plans");
  });

  it("an institution owner makes a key, calls /api/v1/predict with it, revokes it, and the next call fails", async () => {
    const keyName = `predict ${Date.now().toString(36)}`;
    await withBrowser("predict-key-flow", async (page) => {
      await signInAs(page, "institution", "/account/api-keys");
      await page.getByLabel("Key name").fill(keyName);
      await page.getByRole("button", { name: "Make key" }).click();
      const secretBox = page.getByTestId("new-key-secret");
      await secretBox.waitFor({ state: "visible" });
      const secret = await secretBox.inputValue();
      const ok = await call(`/api/v1/predict?lat=47.1&lon=8.4&edition=${edition}`, { headers: { authorization: `Bearer ${secret}` } });
      expect(ok.status).toBe(200);
      expect(ok.body.edition).toBe(edition);
      const row = page.locator(`tr[data-key-name="${keyName}"]`);
      await row.getByRole("button", { name: `Revoke key ${keyName}` }).click();
      await row.getByRole("button", { name: "Revoke now" }).click();
      await page.getByText(`Key “${keyName}” is revoked`).waitFor({ state: "visible" });
      const after = await call(`/api/v1/predict?lat=47.1&lon=8.4&edition=${edition}`, { headers: { authorization: `Bearer ${secret}` } });
      expect(after.status).toBe(401);
      expect(after.headers.get("content-type")).toBe("application/problem+json");
      expect(after.body.code).toBe("invalid-api-key");
    });
  });
});
