import { describe, expect, it } from "vitest";
import { demoAccount, freshEmail } from "./helpers/accounts";
import { withBrowser } from "./helpers/browser";
import { linkIn, waitForMail } from "./helpers/mailbox";
import type { Locator, Page } from "playwright-core";

/** Text of an element once it is visible. */
async function textOf(l: Locator): Promise<string> {
  await l.first().waitFor({ state: "visible" });
  return (await l.first().textContent()) ?? "";
}

async function signInWithPassword(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").first().fill(email);
  await page.getByLabel("Password", { exact: true }).fill(password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL("**/account");
}

describe("in the browser", () => {
  it("sign up → confirmation e-mail → confirm → sign in → role-gated pages", async () => {
    const email = freshEmail("browser");
    const password = "quiet rain over the moor";
    await withBrowser("sign-up-flow", async (page) => {
      await page.goto("/sign-up");
      await page.getByLabel("Your name").fill("Mira Fennel");
      await page.getByLabel("E-mail address").fill(email);
      await page.getByLabel("Password", { exact: true }).fill(password);
      await page.getByRole("button", { name: "Create account" }).click();
      expect(await textOf(page.getByTestId("sign-up-done"))).toContain("If this address can be used");

      // Not confirmed yet: the password is not accepted, with the generic message.
      await page.goto("/sign-in");
      await page.getByLabel("E-mail address").first().fill(email);
      await page.getByLabel("Password", { exact: true }).fill(password);
      await page.getByRole("button", { name: "Sign in", exact: true }).click();
      expect(await textOf(page.getByTestId("sign-in-error"))).toContain("not accepted");

      const mail = await waitForMail(email, { subject: /Confirm your e-mail/ });
      expect(mail.html).toContain("Confirm my e-mail address");
      await page.goto(linkIn(mail, "/verify"));
      await page.getByRole("button", { name: "Confirm my e-mail address" }).click();
      await page.getByText("E-mail address confirmed").waitFor({ state: "visible" });

      await signInWithPassword(page, email, password);
      expect((await textOf(page.getByTestId("account-role"))).trim()).toBe("contributor");
      expect(await textOf(page.getByTestId("account-plan"))).toContain("Open");
      const nav = page.getByRole("navigation", { name: "Main" });
      expect(await nav.getByRole("link", { name: "Jobs" }).count()).toBe(0);
      expect(await nav.getByRole("link", { name: "Users" }).count()).toBe(0);

      const jobs = await page.goto("/jobs");
      expect(jobs?.status()).toBe(403);
      await page.getByRole("heading", { name: "Not available to your account" }).waitFor({ state: "visible" });
      const admin = await page.goto("/admin/users");
      expect(admin?.status()).toBe(403);
    });
  });

  it("a moderator sees the jobs page and its link; a signed-out visitor is sent to sign-in and back", async () => {
    const mod = demoAccount("moderator");
    await withBrowser("moderator-flow", async (page) => {
      await page.goto("/jobs");
      await page.waitForURL(/\/sign-in\?callbackUrl=%2Fjobs/);
      await page.getByLabel("E-mail address").first().fill(mod.email);
      await page.getByLabel("Password", { exact: true }).fill(mod.password);
      await page.getByRole("button", { name: "Sign in", exact: true }).click();
      await page.waitForURL("**/jobs");
      await page.getByRole("heading", { name: "Jobs", level: 1 }).waitFor({ state: "visible" });
      await page.getByTestId("jobs-table").waitFor({ state: "visible" });
      const nav = page.getByRole("navigation", { name: "Main" });
      await nav.getByRole("link", { name: "Jobs" }).waitFor({ state: "visible" });
      expect(await nav.getByRole("link", { name: "Users" }).count()).toBe(0);
      expect(await textOf(page.getByTestId("viewer-badge"))).toContain("moderator");
      expect((await page.goto("/admin/users"))?.status()).toBe(403);

      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL((u) => u.pathname === "/");
      await page.getByRole("link", { name: "Sign in" }).first().waitFor({ state: "visible" });
    });
  });

  it("the landing page says what Rainprint does, shows the cautions and works on a phone", async () => {
    await withBrowser(
      "landing-phone",
      async (page) => {
        await page.goto("/");
        expect(await textOf(page.getByRole("heading", { level: 1 }))).toContain("rain");
        await page.getByRole("heading", { name: "Cautions" }).waitFor({ state: "visible" });
        await page.getByText("Not a drinking-water or safety tool").waitFor({ state: "visible" });
        // No sideways scrolling on a 375 px wide screen.
        const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
        expect(overflow).toBeLessThanOrEqual(0);
        // The first Tab reaches the skip link.
        await page.keyboard.press("Tab");
        expect(await page.evaluate(() => document.activeElement?.textContent?.trim())).toBe("Skip to main content");
      },
      { viewport: { width: 375, height: 740 } },
    );
  });
});
