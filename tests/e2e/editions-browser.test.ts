// A moderator builds, watches and publishes a new edition in headless chromium (a 5° global grid,
// built by the real worker), then the edition pages and the API show it; visitors cannot start builds.
import type { Page } from "playwright-core";
import { describe, expect, it } from "vitest";
import { demoAccount } from "./helpers/accounts";
import { waitUntil } from "./helpers/billing";
import { withBrowser } from "./helpers/browser";
import { testDb } from "./helpers/db";
import { HttpSession, signedIn } from "./helpers/http";

async function signIn(page: Page, email: string, password: string, then: string) {
  await page.goto(`/sign-in?callbackUrl=${encodeURIComponent(then)}`);
  await page.getByLabel("E-mail address").first().fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL((u) => u.pathname === then);
}

describe("editions in the browser", () => {
  it("a moderator starts a build, watches its progress, publishes it, and it becomes the current edition", async () => {
    const m = demoAccount("moderator");
    const before = (await testDb().execute("SELECT id FROM editions WHERE status = 'published' ORDER BY published_at DESC LIMIT 1")).rows[0];
    await withBrowser("editions-build-publish", async (page) => {
      await signIn(page, m.email, m.password, "/editions/builds");
      await page.getByRole("heading", { name: "Edition builds" }).waitFor();
      const form = page.getByTestId("build-form");
      // bad input: a clear message, nothing started
      await form.getByLabel("Cell size (degrees)").fill("0.05");
      await form.getByRole("button", { name: "Start build" }).click();
      await page.getByText(/at most 4,000,000 are allowed/).waitFor();
      expect(Number((await testDb().execute("SELECT count(*) AS n FROM editions WHERE status = 'building'")).rows[0].n)).toBe(0);

      await form.getByLabel("Cell size (degrees)").fill("5");
      await form.getByRole("button", { name: "Start build" }).click();
      const item = page.locator('[data-testid^="build-"][data-status]').first();
      await item.waitFor();
      const editionId = (await item.getAttribute("data-testid"))!.slice("build-".length);
      // progress is shown while it builds (the bar or, once done, the publish button)
      const stages = new Set<string>();
      await waitUntil(
        async () => {
          // read what is there now, without waiting: the bar goes away when the build is done
          for (const text of await page.getByTestId("build-stage").allTextContents()) stages.add(text);
          return (await page.getByRole("button", { name: `Publish edition ${editionId}` }).count()) > 0;
        },
        "the build to become ready",
        120_000,
      );
      expect(stages.size).toBeGreaterThan(0);
      expect([...stages].join(" | ")).toMatch(/%/);
      // still not public before publishing
      expect((await testDb().execute({ sql: "SELECT status FROM editions WHERE id = ?", args: [editionId] })).rows[0].status).toBe("ready");
      await page.getByRole("button", { name: `Publish edition ${editionId}` }).click();
      await waitUntil(async () => (await testDb().execute({ sql: "SELECT status FROM editions WHERE id = ?", args: [editionId] })).rows[0].status === "published", "publication");

      // the edition page: charts, statistics, trend, record, diff against the previous edition
      await page.goto(`/editions/${editionId}?variable=d18O&period=0`);
      await page.getByRole("heading", { name: `Edition ${editionId}` }).waitFor();
      expect(await page.getByText("synthetic demo data").count()).toBeGreaterThan(0);
      expect(await page.getByTestId("variogram-chart").count()).toBe(1);
      expect(await page.getByTestId("cv-chart").locator("circle").count()).toBeGreaterThan(10);
      expect(await page.getByTestId("trend-table").locator("tbody tr").count()).toBe(4);
      expect(await page.getByTestId("surfaces-table").locator("tbody tr").count()).toBe(52);
      expect((await page.getByTestId("inputs-hash").textContent())?.trim()).toMatch(/^[0-9a-f]{64}$/);
      if (before) expect(await page.getByTestId("diff").textContent()).toContain(String(before.id));
      await page.getByRole("link", { name: "d-excess" }).nth(3).click();
      await page.waitForURL(/variable=dExcess&period=3/);
      await page.getByRole("heading", { name: "d-excess, March" }).waitFor();

      await page.goto("/editions");
      const row = page.getByTestId("editions-table").locator("tr", { hasText: editionId });
      expect(await row.getByText("current").count()).toBe(1);
      await page.screenshot({ path: "test-results/editions-published.png", fullPage: true });
    });

    // the API lists it as current, with cross-validation per surface
    const anon = new HttpSession();
    const list = (await (await anon.fetch("/api/v1/editions")).json()) as { editions: { id: string; current: boolean; surfaces: { crossValidation: unknown }[] }[] };
    const cur = list.editions.find((e) => e.current)!;
    expect(cur.surfaces.filter((s) => s.crossValidation).length).toBe(38);
    const one = await anon.fetch(`/api/v1/editions/${cur.id}`);
    expect(one.status).toBe(200);
    expect(((await one.json()) as { inputsHash: string }).inputsHash).toMatch(/^[0-9a-f]{64}$/);
    expect((await anon.fetch("/api/v1/editions/no-such-edition")).status).toBe(404);
  }, 240_000);

  it("a contributor cannot start a build and nothing is written", async () => {
    const c = demoAccount("newcomer");
    const s = await signedIn(c.email, c.password);
    const n = Number((await testDb().execute("SELECT count(*) AS n FROM editions")).rows[0].n);
    const r = await s.fetch("/api/editions/builds", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ resolutionDeg: 5 }) });
    expect(r.status).toBe(403);
    expect(r.headers.get("content-type")).toContain("application/problem+json");
    expect(Number((await testDb().execute("SELECT count(*) AS n FROM editions")).rows[0].n)).toBe(n);
  });
});
