// An admin uploads an elevation model GeoTIFF in headless chromium; it becomes the active model for
// new builds, then is switched off again (so other tests build sea-level-equivalent editions).
import { mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { surfaceToGeoTiff } from "../../lib/downloads/geotiff";
import { demoAccount } from "./helpers/accounts";
import { waitUntil } from "./helpers/billing";
import { withBrowser } from "./helpers/browser";
import { testDb } from "./helpers/db";

async function signIn(page: Page, email: string, password: string, then: string) {
  await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(then)}`);
  await page.getByLabel("E-mail address").first().fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => u.pathname === then);
}

describe("elevation models in the browser", () => {
  it("an admin uploads a GeoTIFF, sees it active, and switches it off; a bad file gets a message", async () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), "rainprint-dem-"));
    const grid = { lon0: -179.5, lat0: 89.5, dLon: 1, dLat: 1, nx: 360, ny: 180 };
    const values = new Float32Array(grid.nx * grid.ny).map((_, i) => (Math.floor(i / grid.nx) % 30) * 50);
    const good = path.join(dir, "relief.tif");
    writeFileSync(good, surfaceToGeoTiff({ grid, values, meta: { editionId: "relief", variable: "d18O", period: 0, plane: "value", isDemo: true } }));
    const bad = path.join(dir, "notes.tif");
    writeFileSync(bad, "this is not a GeoTIFF");
    const a = demoAccount("admin");
    await withBrowser("elevation-upload", async (page) => {
      await signIn(page, a.email, a.password, "/admin/elevation");
      await page.getByLabel("Name").fill("Test relief");
      await page.getByLabel(/GeoTIFF file/).setInputFiles(bad);
      await page.getByRole("button", { name: "Upload" }).click();
      await page.getByText("The file is not a readable GeoTIFF.").waitFor();
      expect(Number((await testDb().execute("SELECT count(*) AS n FROM elevation_models")).rows[0].n)).toBe(0);

      await page.getByLabel(/GeoTIFF file/).setInputFiles(good);
      await page.getByRole("button", { name: "Upload" }).click();
      await page.getByText(/64,800 cells with an elevation/).waitFor();
      const item = page.getByTestId("elevation-models").locator("li", { hasText: "Test relief" });
      await item.getByText("active", { exact: true }).waitFor();
      expect(await item.getByText("360 × 180 cells").count()).toBe(1);
      await item.getByRole("button", { name: "Stop using" }).click();
      await item.getByText("not used").waitFor();
    });
    await waitUntil(async () => Number((await testDb().execute("SELECT count(*) AS n FROM elevation_models WHERE active = 1")).rows[0].n) === 0, "the model to be off");
  }, 120_000);
});
