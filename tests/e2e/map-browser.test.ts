import { mkdirSync } from "node:fs";
import path from "node:path";
import { PNG } from "pngjs";
import type { Page, Response } from "playwright-core";
import { describe, expect, inject, it } from "vitest";
import { withBrowser } from "./helpers/browser";

// The public map in headless chromium (WebGL on SwiftShader) against the seeded demo edition:
// the surface and stations show, switching variable, uncertainty and period changes the tile
// requests, and clicking the map (or typing a point) fills the readout panel. A screenshot is
// kept as test-results/map-browser.png.

function waitForTile(page: Page, layerAndPeriod: string): Promise<Response> {
  return page.waitForResponse((r) => r.url().includes("/api/tiles/") && r.url().includes(`/${layerAndPeriod}/`) && r.status() === 200, { timeout: 30_000 });
}

/** Share of the map's pixels drawn in a saturated colour (surface ramps), from a screenshot. */
async function colouredShare(page: Page): Promise<number> {
  const png = PNG.sync.read(await page.getByTestId("map-canvas").screenshot());
  let coloured = 0;
  for (let i = 0; i < png.data.length; i += 4) {
    const [r, g, b] = [png.data[i], png.data[i + 1], png.data[i + 2]];
    if (Math.max(r, g, b) - Math.min(r, g, b) > 40) coloured++;
  }
  return coloured / (png.width * png.height);
}

/**
 * Screen position of a point in the map's first view (centre 10°E 20°N, zoom 0.8; maplibre's
 * 512-pixel world at zoom 0, web mercator).
 */
function screenOf(box: { x: number; y: number; width: number; height: number }, [lon, lat]: [number, number]) {
  const world = 512 * 2 ** 0.8;
  const px = (l: number) => ((l + 180) / 360) * world;
  const py = (φ: number) => ((1 - Math.log(Math.tan(Math.PI / 4 + (φ * Math.PI) / 360)) / Math.PI) / 2) * world;
  return { x: box.x + box.width / 2 + px(lon) - px(10), y: box.y + box.height / 2 + py(lat) - py(20) };
}

describe("the map in the browser", () => {
  it("shows the surface and stations, switches layers and periods, and reads a clicked point", async () => {
    await withBrowser("map-browser", async (page) => {
      const firstTile = waitForTile(page, "d18O/0");
      const stations = page.waitForResponse((r) => r.url().includes("/api/map/stations") && r.status() === 200);
      await page.goto("/map");
      await expect(page.getByRole("heading", { name: "Map", level: 1 }).isVisible()).resolves.toBe(true);
      expect((await page.getByText("synthetic demo data").first().textContent()) ?? "").toContain("synthetic demo data");
      await page.locator('[data-testid="map-canvas"][data-ready="true"]').waitFor({ timeout: 60_000 });
      const tile = await firstTile;
      expect(tile.headers()["content-type"]).toBe("image/png");
      const fc = (await (await stations).json()) as { features: { geometry: { coordinates: [number, number] }; properties: { name: string; included: boolean } }[] };
      expect(fc.features.length).toBeGreaterThan(20);
      await page.locator(`[data-testid="map-canvas"][data-stations="${fc.features.length}"]`).waitFor();

      // The legend is there with its units.
      const legend = page.getByTestId("map-legend");
      await legend.getByText("δ18O, ‰").waitFor();
      expect(await legend.textContent()).toContain("Extrapolation");

      // The surface is drawn: a good share of the map is in ramp colours.
      await page.waitForTimeout(1500);
      expect(await colouredShare(page)).toBeGreaterThan(0.05);

      // Switching the variable, the period and the uncertainty layer asks for other tiles.
      const dx = waitForTile(page, "dExcess/0");
      await page.getByLabel("d-excess").check();
      await dx;
      await legend.getByText("d-excess, ‰").waitFor();
      const july = waitForTile(page, "dExcess/7");
      await page.getByLabel("Period").selectOption({ label: "July" });
      await july;
      const sd = waitForTile(page, "dExcess-sd/7");
      await page.getByLabel("Uncertainty (1 sd)").check();
      await sd;
      await legend.getByText("Uncertainty of d-excess").waitFor();
      expect(page.url()).toContain("layer=dExcess-sd");
      expect(page.url()).toContain("period=7");

      // Back to δ18O values; a station's tooltip names it and its mean.
      await page.getByLabel("Predicted value").check();
      await page.getByLabel("δ18O").check();
      const box = (await page.getByTestId("map-canvas").boundingBox())!;
      const station = fc.features.find((f) => f.properties.included && Math.abs(f.geometry.coordinates[1]) < 60)!;
      const at = screenOf(box, station.geometry.coordinates);
      const tooltip = page.locator(".deck-tooltip");
      for (const [dx, dy] of [[0, 0], [2, 0], [-2, 0], [0, 2], [0, -2]]) {
        await page.mouse.move(at.x + dx, at.y + dy);
        if (await tooltip.isVisible().catch(() => false)) break;
        await page.waitForTimeout(300);
      }
      await tooltip.waitFor({ state: "visible", timeout: 5000 });
      expect(await tooltip.textContent()).toContain("July mean δ18O:");

      // Click the middle of the map (10°E 20°N, on land).
      const readout = page.waitForResponse((r) => r.url().includes("/api/map/readout") && r.status() === 200);
      await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2);
      const body = (await (await readout).json()) as { values: { d18O: { value: number } | null } };
      expect(body.values.d18O).not.toBeNull();
      const chosen = page.getByTestId("readout-chosen");
      await chosen.waitFor();
      expect(await chosen.textContent()).toMatch(/δ18O: −?\d+\.\d\d ± \d+\.\d\d ‰ VSMOW95% interval/);
      const link = page.getByRole("link", { name: /Site lookup at/ });
      expect(await link.getAttribute("href")).toMatch(/^\/lookup\?lat=-?\d+\.\d{3}&lon=-?\d+\.\d{3}$/);

      mkdirSync(path.resolve("test-results"), { recursive: true });
      await page.screenshot({ path: path.resolve("test-results", "map-browser.png"), fullPage: true });

      // A typed point at sea: no value, said plainly; a bad one: a clear message.
      await page.getByLabel("Latitude").fill("0");
      await page.getByLabel("Longitude").fill("-150");
      await page.getByRole("button", { name: "Read value" }).click();
      await page.getByText("No surface value here").waitFor();
      await page.getByLabel("Latitude").fill("95");
      await page.getByRole("button", { name: "Read value" }).click();
      await page.getByText("Enter a latitude from −90 to 90").waitFor();
    });
  }, 180_000);

  it("serves tiles over HTTP with immutable caching, ETag and 304 (through the production server)", async () => {
    const base = inject("baseUrl");
    const moved = await fetch(`${base}/api/tiles/current/d18O/0/1/1/0.png`, { redirect: "manual" });
    expect(moved.status).toBe(302);
    const location = moved.headers.get("location")!;
    expect(location).toMatch(/^\/api\/tiles\/[\w.]+\/d18O\/0\/1\/1\/0\.png$/);
    const tile = await fetch(`${base}${location}`);
    expect(tile.status).toBe(200);
    expect(tile.headers.get("content-type")).toBe("image/png");
    expect(tile.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
    const png = PNG.sync.read(Buffer.from(await tile.arrayBuffer()));
    expect([png.width, png.height]).toEqual([256, 256]);
    const etag = tile.headers.get("etag")!;
    const again = await fetch(`${base}${location}`, { headers: { "If-None-Match": etag } });
    expect(again.status).toBe(304);
    const bad = await fetch(`${base}/api/tiles/current/d18O/0/2/9/0.png`);
    expect(bad.status).toBe(400);
    expect(bad.headers.get("content-type")).toContain("application/problem+json");
  });

  it("is linked from the home page", async () => {
    await withBrowser("map-front-door", async (page) => {
      await page.goto("/");
      await page.getByRole("link", { name: "Explore the map" }).click();
      await page.waitForURL("**/map**");
    });
  }, 60_000);
});
