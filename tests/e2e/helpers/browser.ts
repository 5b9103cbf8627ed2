import { mkdirSync, mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { inject } from "vitest";

// Headless Debian chromium through playwright-core, with a fresh temporary
// profile per launch (flags as recorded in the stack notes).

export const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--enable-unsafe-swiftshader",
];

export type LaunchedBrowser = { context: BrowserContext; page: Page; close(): Promise<void> };

export async function launchBrowser(opts: { viewport?: { width: number; height: number } } = {}): Promise<LaunchedBrowser> {
  const profile = mkdtempSync(path.join(os.tmpdir(), "rainprint-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH || "/usr/bin/chromium",
    args: CHROMIUM_ARGS,
    headless: true,
    baseURL: inject("baseUrl"),
    viewport: opts.viewport ?? { width: 1280, height: 900 },
  });
  const page = context.pages()[0] ?? (await context.newPage());
  return {
    context,
    page,
    async close() {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

/** Run `fn` with a fresh browser; on failure save a screenshot to test-results/<name>.png, then rethrow. */
export async function withBrowser(name: string, fn: (page: Page, b: LaunchedBrowser) => Promise<void>, opts?: Parameters<typeof launchBrowser>[0]): Promise<void> {
  const b = await launchBrowser(opts);
  try {
    await fn(b.page, b);
  } catch (e) {
    const dir = path.resolve("test-results");
    mkdirSync(dir, { recursive: true });
    await b.page.screenshot({ path: path.join(dir, `${name.replace(/\W+/g, "-")}.png`), fullPage: true }).catch(() => {});
    throw e;
  } finally {
    await b.close();
  }
}
