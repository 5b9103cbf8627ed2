// The intake story in headless chromium, with the demo accounts: the station operator
// registers a station, the moderator approves it, the operator uploads a CSV with bad rows,
// sees the row errors, fixes them in the grid and submits; the moderator accepts some samples
// and returns one with a reason; the operator finds the e-mail in the mail stand-in, corrects
// the sample and resubmits; the audit trail shows every step. Then two moderators decide the
// corrected sample at once over HTTP: one wins, the other gets 409.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { demoAccount } from "./helpers/accounts";
import { withBrowser } from "./helpers/browser";
import { HttpSession, signIn } from "./helpers/http";
import { listMail, waitForMail } from "./helpers/mailbox";

async function signInAs(page: Page, key: "contributor" | "moderator") {
  const a = demoAccount(key);
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").first().fill(a.email);
  await page.getByLabel("Password", { exact: true }).fill(a.password);
  await page.getByRole("button", { name: "Sign in", exact: true }).click();
  await page.waitForURL("**/account");
}

const code = `E2E-${Date.now().toString(36).toUpperCase()}`;
const CSV = [
  "station_code;collected_from;collected_until;d18O_permil;d2H_permil;amount_mm;scale",
  `${code};2026-01-01;2026-02-01;-11.2;-79.8;62;VSMOW-SLAP`,
  `${code};2026-02-01;2026-03-01;-10,4;-73.1;55;VSMOW-SLAP`,
  `${code};2026-04-01;2026-03-01;-8.9;-61.5;71;VSMOW-SLAP`,
  `${code};2026-04-01;2026-05-01;-7.6;-50.2;88;VSMOW-SLAP`,
  `${code};2026-05-01;2026-06-01;-6.1;-38.6;104;VSMOW-SLAP`,
].join("\n");

describe("intake story in the browser", () => {
  it("register → approve → upload with bad rows → fix → submit → decide → e-mail → correct → audit trail", async () => {
    const contributor = demoAccount("contributor");
    let batchUrl = "";
    await withBrowser("intake-contributor-1", async (page) => {
      await signInAs(page, "contributor");
      await page.goto("/contribute/stations/new");
      await page.getByLabel("Station code").fill(code);
      await page.getByLabel("Station name").fill("Story test collector");
      await page.getByLabel("Latitude (°)").fill(String(46.2 + Math.random() * 0.5));
      await page.getByLabel("Longitude (°)").fill(String(9.2 + Math.random() * 0.5));
      await page.getByLabel("Elevation (m above sea level)").fill("820");
      await page.getByRole("button", { name: "Register station" }).click();
      await page.getByTestId("station-registered").waitFor();
      expect(await page.getByTestId("station-registered").textContent()).toContain("waits for a moderator");
    });

    await withBrowser("intake-moderator-1", async (page) => {
      await signInAs(page, "moderator");
      await page.goto("/review");
      const card = page.locator(`[data-station="${code}"]`);
      await card.waitFor();
      await page.getByRole("button", { name: `Approve ${code}` }).click();
      await page.getByText(`Station ${code} is now approved.`).waitFor();
    });

    await withBrowser("intake-contributor-2", async (page) => {
      await signInAs(page, "contributor");
      await page.goto("/contribute/batches/new");
      await page.getByLabel("Sample file").setInputFiles({ name: "season.csv", mimeType: "text/csv", buffer: Buffer.from(CSV) });
      await page.getByTestId("preview-summary").waitFor();
      expect(await page.getByTestId("preview-summary").textContent()).toContain("2 with problems");
      const errors = (await page.getByTestId("row-errors").allTextContents()).join(" | ");
      expect(errors).toContain("uses a decimal comma; write -10.4");
      expect(errors).toContain("Collected until (2026-03-01) is before collected from (2026-04-01)");
      expect(await page.getByRole("button", { name: "Submit batch" }).isDisabled()).toBe(true);
      // The problems as a CSV list to work through in a spreadsheet.
      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Download the problems as a CSV list" }).click()]);
      const list = readFileSync((await download.path())!, "utf8");
      expect(list.split("\r\n")[0]).toBe("file_line,column,value_as_entered,problem");
      expect(list).toContain("3,d18O_permil,\"'-10,4\",\"“-10,4” uses a decimal comma; write -10.4 with a decimal point.\"");
      // Fix the two rows in the grid and check again.
      await page.getByLabel("δ18O (‰), row 2").fill("-10.4");
      await page.getByLabel("Collected from, row 3").fill("2026-03-01");
      await page.getByLabel("Collected until, row 3").fill("2026-04-01");
      await page.getByRole("button", { name: "Check rows" }).click();
      await page.waitForFunction(() => document.querySelector('[data-testid="preview-summary"]')?.textContent?.includes("0 with problems"));
      await page.getByRole("button", { name: "Submit batch" }).click();
      await page.getByTestId("batch-submitted").waitFor();
      batchUrl = (await page.getByRole("link", { name: "Open the batch" }).getAttribute("href"))!;
      expect(batchUrl).toMatch(/^\/contribute\/batches\//);
      await page.goto(batchUrl);
      expect(await page.getByTestId("batch-upload").textContent()).toMatch(/season\.csv: \d+ bytes, SHA-256 [0-9a-f]{64}/);
    });
    const received = await waitForMail(contributor.email, { subject: new RegExp(`Batch received: 5 samples \\(${code}\\)`) });
    expect(received.text).toContain(batchUrl);

    const batchId = batchUrl.split("/").pop()!;
    const seen = (await listMail(contributor.email)).map((m) => m.id);
    await withBrowser("intake-moderator-2", async (page) => {
      await signInAs(page, "moderator");
      await page.goto("/review");
      await page.locator(`[data-batch="${batchId}"]`).waitFor();
      await page.goto(`/review/batches/${batchId}`);
      await page.getByTestId("isotope-chart").first().waitFor();
      for (const d of ["2026-01-01", "2026-02-01", "2026-03-01", "2026-05-01"]) await page.getByLabel(`Select ${code} ${d}`).check();
      await page.getByRole("button", { name: "Accept selected" }).click();
      await page.getByText("4 samples accepted.").waitFor();
      await page.getByLabel(`Select ${code} 2026-04-01`).check();
      await page.getByLabel(/Reason \(needed to reject or return/).fill("δ2H does not match the laboratory report; please check the value.");
      await page.getByRole("button", { name: "Return selected for correction" }).click();
      await page.getByText("1 sample returned.").waitFor();
    });

    const decided = await waitForMail(contributor.email, { subject: /Batch decided: 4 accepted, 1 returned, 0 rejected/, seen });
    expect(decided.text).toContain("δ2H does not match the laboratory report");
    const link = (decided.text ?? "").match(/https?:\/\/\S+\/contribute\/batches\/\S+/)![0];

    await withBrowser("intake-contributor-3", async (page) => {
      await signInAs(page, "contributor");
      await page.goto("/contribute");
      expect(await page.getByTestId("returned-samples").textContent()).toContain(`${code}, 2026-04-01`);
      await page.goto(new URL(link).pathname);
      const form = page.getByRole("form", { name: `Correct ${code} 2026-04-01` });
      await form.getByLabel("δ2H (‰)").fill("-50.9");
      await form.getByRole("button", { name: "Send the corrected sample" }).click();
      // The page reloads its data: the returned version is now shown as corrected.
      await page.getByText("Corrected; the new version is in another batch.").waitFor();
      await page.goto(`/contribute/stations/${code}`);
      const trail = page.getByTestId("audit-trail");
      await trail.waitFor();
      const actions = await trail.locator("li").evaluateAll((els) => els.map((e) => `${e.getAttribute("data-entity")}:${e.getAttribute("data-action")}`));
      for (const step of ["station:register", "station:approve", "batch:submit", "sample:accept", "sample:return", "batch:decide", "sample:supersede", "sample:resubmit"])
        expect(actions, step).toContain(step);
      expect(await trail.textContent()).toContain("δ2H does not match the laboratory report");
    });

    // Two moderators decide the corrected sample at once: one wins, the other is told so (409).
    const mod = new HttpSession();
    const admin = new HttpSession();
    expect(await signIn(mod, demoAccount("moderator").email, demoAccount("moderator").password)).toBeNull();
    expect(await signIn(admin, demoAccount("admin").email, demoAccount("admin").password)).toBeNull();
    const queue = await mod.json<{ rows: { id: string; stationCodes: string[]; source: string }[] }>(`/api/review/queue?station=${code}`, "GET");
    const corrected = queue.body.rows.find((r) => r.source === "resubmission")!;
    const b = await mod.json<{ samples: { id: string; rowVersion: number; version: number; previousId: string | null }[] }>(`/api/batches/${corrected.id}`, "GET");
    const s = b.body.samples[0];
    expect(s.version).toBe(2);
    expect(s.previousId).toBeTruthy();
    const [x, y] = await Promise.all([
      mod.json("/api/review/decisions", "POST", { decision: "accept", reason: "", samples: [{ id: s.id, rowVersion: s.rowVersion }] }),
      admin.json("/api/review/decisions", "POST", { decision: "reject", reason: "second opinion", samples: [{ id: s.id, rowVersion: s.rowVersion }] }),
    ]);
    expect([x.status, y.status].sort()).toEqual([200, 409]);
    const loser = (x.status === 409 ? x : y) as unknown as { headers: Headers; body: { detail: string } };
    expect(loser.headers.get("content-type")).toContain("application/problem+json");
    expect(loser.body.detail).toMatch(/got there first|changed after you opened/);
  });
});
