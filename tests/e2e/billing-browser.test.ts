// The whole paid story in headless chromium against the production build, the
// payments stand-in and its signed webhooks: an Open user subscribes on the
// pricing page, pays on the stand-in's test pay page, downloads station data,
// cancels in the billing portal and, once the stand-in's clock passes the
// period end, is back on Open with downloads refused.
import { readFileSync } from "node:fs";
import { fromArrayBuffer } from "geotiff";
import Papa from "papaparse";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { demoAccount } from "./helpers/accounts";
import { makeAccount, standin, waitUntil } from "./helpers/billing";
import { withBrowser } from "./helpers/browser";
import { testDb } from "./helpers/db";
import { signedIn } from "./helpers/http";
import { waitForMail } from "./helpers/mailbox";

async function signIn(page: Page, email: string, password: string, then: string) {
  await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(then)}`);
  await page.getByLabel("E-mail address").first().fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => u.pathname === then);
}

async function planInBrowser(page: Page): Promise<string> {
  const res = await page.request.get("/api/me");
  expect(res.status()).toBe(200);
  return ((await res.json()) as { plan: string }).plan;
}

/** A surface of the published demo edition (the test seed builds and publishes one). */
async function publishedSurface(): Promise<{ editionId: string; variable: string; period: number; grid: Record<string, number> } | null> {
  const rs = await testDb().execute(
    "SELECT s.edition_id AS editionId, s.variable AS variable, s.period AS period, s.grid AS grid FROM surfaces s JOIN editions e ON e.id = s.edition_id WHERE e.status = 'published' ORDER BY e.published_at DESC, s.period ASC LIMIT 1",
  );
  const r = rs.rows[0];
  if (!r) return null;
  return { editionId: String(r.editionId), variable: String(r.variable), period: Number(r.period), grid: JSON.parse(String(r.grid)) };
}
const surface = await publishedSurface();

describe("subscribe → use → cancel → lapse, in the browser", () => {
  it("an Open user subscribes to Researcher, downloads station data, cancels in the portal and is Open again after the period end", async () => {
    const person = await makeAccount("subscriber", "Ilse Brook");
    await withBrowser("billing-subscribe-flow", async (page) => {
      await signIn(page, person.email, person.password, "/pricing");
      expect(await planInBrowser(page)).toBe("open");

      // Pricing states what each plan unlocks, from the catalogue.
      const researcher = page.getByTestId("plan-researcher");
      await researcher.getByText("Download accepted station data as CSV and GeoJSON").waitFor();
      await researcher.getByText("Batch lookups of up to 2,000 sites per file or API call").waitFor();
      expect(await page.getByTestId("price-researcher").textContent()).toBe("€19.00 a month");
      await page.getByRole("link", { name: /^Yearly/ }).click();
      await page.waitForURL(/interval=year/);
      expect(await page.getByTestId("price-researcher").textContent()).toBe("€190.00 a year");
      await page.getByRole("link", { name: "Monthly" }).click();
      await page.waitForURL((u) => u.pathname === "/pricing" && !u.search.includes("year"));

      // Downloads are locked on Open, naming the plan that unlocks them.
      await page.goto("/downloads");
      expect(await page.getByTestId("download-locked").first().textContent()).toContain("needs the Researcher plan or higher");

      // Checkout on the stand-in's test pay page.
      await page.goto("/pricing");
      await page.getByTestId("checkout-researcher").getByRole("button", { name: /Subscribe/ }).click();
      await page.waitForURL(/\/pay\/cs_test_/);
      await page.getByText("Local test page").waitFor();
      await page.getByRole("button", { name: "Pay €19.00" }).click();
      await page.waitForURL(/\/pricing\/success\?session=cs_test_/);
      await waitUntil(async () => (await page.getByTestId("checkout-status").getAttribute("data-status")) === "active", "the success page to show the plan", 30_000);
      await page.getByRole("heading", { name: "The Researcher plan is active" }).waitFor();
      expect(await planInBrowser(page)).toBe("researcher");
      expect((await waitForMail(person.email, { subject: /^Receipt: €19\.00 for Rainprint Researcher/ })).text).toContain("Invoice RPS-");

      // Station data downloads now work and carry the licence, credits and the demo label.
      await page.goto("/downloads");
      const [download] = await Promise.all([page.waitForEvent("download"), page.getByTestId("download-samples.csv").click()]);
      expect(download.suggestedFilename()).toMatch(/^rainprint-samples-\d{4}-\d{2}-\d{2}\.csv$/);
      const csv = Papa.parse<Record<string, string>>(readFileSync((await download.path())!, "utf8"), { header: true, skipEmptyLines: true });
      expect(csv.errors).toEqual([]);
      expect(csv.meta.fields).toEqual(expect.arrayContaining(["station_code", "d18O_permil", "d2H_permil", "credit", "data_status", "notice"]));
      expect(csv.data.length).toBeGreaterThan(1000);
      expect(csv.data[0].notice).toContain("CC BY 4.0");
      // Seeded stations carry the demo label; stations other tests register (E2E-…) are "contributed".
      const seeded = csv.data.filter((r) => !r.station_code.startsWith("E2E-"));
      expect(seeded.length).toBeGreaterThan(1000);
      expect(seeded.every((r) => r.data_status === "synthetic demo data")).toBe(true);
      expect(csv.data.filter((r) => r.station_code.startsWith("E2E-")).every((r) => r.data_status === "contributed")).toBe(true);

      // The billing page shows the plan, its renewal and the invoice.
      await page.goto("/account/billing");
      expect(await page.getByTestId("personal-standing").getAttribute("data-standing")).toBe("active");
      expect(await page.getByTestId("personal-standing").textContent()).toMatch(/Researcher, billed monthly\. Renews on \d{1,2} \w+ \d{4}\./);
      await page.getByTestId("invoices").getByText("€19.00").waitFor();

      // Cancel in the billing portal; the plan runs to the period end.
      await page.getByTestId("portal-personal").getByRole("button").click();
      await page.waitForURL(/\/portal\/bps_/);
      await page.getByRole("button", { name: "Cancel at the end of the period" }).click();
      await page.getByText("Your subscription will end at the end of the current period.").waitFor();
      await page.getByRole("link", { name: "Return to Rainprint" }).click();
      await page.waitForURL((u) => u.pathname === "/account/billing");
      expect(await page.getByTestId("personal-standing").getAttribute("data-standing")).toBe("ending");
      expect(await page.getByTestId("personal-standing").textContent()).toMatch(/Cancelled: it keeps working until/);
      expect(await planInBrowser(page)).toBe("researcher");
      await waitForMail(person.email, { subject: /will end on/ });

      // The stand-in's clock passes the period end: the subscription ends, the account is Open.
      await standin("/clock", { advance_days: 32 });
      await waitUntil(async () => (await planInBrowser(page)) === "open", "the plan to drop to Open");
      await waitForMail(person.email, { subject: /has ended/ });

      // Downloads are refused again, saying which plan unlocks them.
      const refused = await page.request.get("/api/downloads/station-data/samples.csv");
      expect(refused.status()).toBe(403);
      expect(refused.headers()["content-type"]).toContain("application/problem+json");
      const problem = (await refused.json()) as { code: string; detail: string };
      expect(problem.code).toBe("plan-required");
      expect(problem.detail).toContain("needs the Researcher plan or higher; your account is on the Open plan");
      await page.goto("/downloads");
      expect(await page.getByTestId("download-locked").first().textContent()).toContain("needs the Researcher plan or higher");
    });
  });

  it("the return page copes with a late webhook: it waits, then shows the plan once the webhook lands", async () => {
    const person = await makeAccount("late-webhook");
    await withBrowser("billing-late-webhook", async (page) => {
      await signIn(page, person.email, person.password, "/pricing");
      await standin("/webhooks/hold", {});
      try {
        await page.getByTestId("checkout-researcher").getByRole("button", { name: /Subscribe/ }).click();
        await page.waitForURL(/\/pay\/cs_test_/);
        await page.getByRole("button", { name: "Pay €19.00" }).click();
        await page.waitForURL(/\/pricing\/success\?session=cs_test_/);
        expect(await page.getByTestId("checkout-status").getAttribute("data-status")).toBe("waiting");
        await page.getByText("This page updates by itself.").waitFor();
        expect(await planInBrowser(page)).toBe("open");
      } finally {
        await standin("/webhooks/release", {});
      }
      // No reload by the test: the page refreshes itself until the plan shows.
      await page.getByRole("heading", { name: "The Researcher plan is active" }).waitFor({ timeout: 30_000 });
      expect(await planInBrowser(page)).toBe("researcher");
    });
  });

  it("cancelling on the pay page changes nothing and says so", async () => {
    const person = await makeAccount("canceller");
    await withBrowser("billing-cancel-checkout", async (page) => {
      await signIn(page, person.email, person.password, "/pricing");
      await page.getByTestId("checkout-researcher").getByRole("button", { name: /Subscribe/ }).click();
      await page.waitForURL(/\/pay\/cs_test_/);
      await page.getByRole("button", { name: "Cancel" }).click();
      await page.waitForURL((u) => u.pathname === "/pricing/cancelled");
      await page.getByRole("heading", { name: "Checkout cancelled" }).waitFor();
      expect(await planInBrowser(page)).toBe("open");
    });
  });

  it(
    "a GeoTIFF of a published edition downloads and opens with its grid and values",
    async () => {
      expect(surface, "the test seed publishes a demo edition").not.toBeNull();
      const s = surface!;
      const file = `${s.variable}-${s.period === 0 ? "annual" : `m${String(s.period).padStart(2, "0")}`}`;
      const r = demoAccount("researcher");
      const session = await signedIn(r.email, r.password);
      const tif = await session.fetch(`/api/downloads/editions/${encodeURIComponent(s.editionId)}/${file}.tif`);
      expect(tif.status).toBe(200);
      const image = await (await fromArrayBuffer(await tif.arrayBuffer())).getImage();
      const { lon0, lat0, dLon, dLat, nx, ny } = s.grid;
      expect([image.getWidth(), image.getHeight()]).toEqual([nx, ny]);
      expect(image.getOrigin()[0]).toBeCloseTo(lon0 - dLon / 2, 9);
      expect(image.getOrigin()[1]).toBeCloseTo(lat0 + dLat / 2, 9);
      expect(image.getResolution().slice(0, 2)).toEqual([dLon, -dLat]);
      expect(image.getGeoKeys()?.GeographicTypeGeoKey).toBe(4326);
      expect(await image.getGDALMetadata()).toMatchObject({ EDITION: s.editionId, VARIABLE: s.variable });
      const [band] = (await image.readRasters()) as unknown as Float32Array[];
      // The CSV of the same surface, an independent writer over the same plane, agrees cell by cell.
      const csvText = await (await session.fetch(`/api/downloads/editions/${encodeURIComponent(s.editionId)}/${file}.csv`)).text();
      const rows = Papa.parse<string[]>(csvText, { skipEmptyLines: true }).data.slice(1);
      expect(rows.length).toBeGreaterThan(0);
      for (const row of rows.filter((_, i) => i % Math.max(1, Math.floor(rows.length / 200)) === 0)) {
        const [lon, lat, value] = row.map(Number);
        const c = Math.round((lon - lon0) / dLon);
        const rr = Math.round((lat0 - lat) / dLat);
        expect(band[rr * nx + c]).toBeCloseTo(value, 3);
      }
    },
  );
});
