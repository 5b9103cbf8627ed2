import { spawn, type ChildProcess } from "node:child_process";
import net from "node:net";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { jobs, mailLog } from "@/db/schema";
import { resetEnvCache } from "@/lib/env";
import { claimJob, runClaimedJob } from "@/lib/jobs/runner";
import { jobRegistry } from "@/lib/jobs/registry";
import { queueMail } from "@/lib/mail";
import { usingMailStandin } from "@/lib/mail/client";
import { readStandinMailbox } from "@/lib/mail/standin";
import { renderTemplate, templates } from "@/lib/mail/templates";
import { freshDb } from "./helpers/db";

let standin: ChildProcess;
let base: string;

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, "127.0.0.1", () => {
      const p = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(p));
    });
  });
}

beforeAll(async () => {
  await freshDb();
  const port = await freePort();
  base = `http://127.0.0.1:${port}`;
  standin = spawn(path.resolve("node_modules/.bin/tsx"), [path.resolve("scripts/standins/mail.ts")], {
    env: { ...process.env, MAIL_STANDIN_PORT: String(port), MAIL_STANDIN_STORE: "" },
    stdio: "ignore",
  });
  for (let i = 0; i < 100; i++) {
    try {
      if ((await fetch(`${base}/health`)).ok) break;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  process.env.RESEND_BASE_URL = base;
  process.env.RESEND_API_KEY = "re_test_key";
  resetEnvCache();
});

afterAll(() => {
  standin?.kill("SIGTERM");
});

describe("the /dev/mailbox source", () => {
  it("is absent (null → 404 page) when RESEND_BASE_URL is unset, i.e. with real Resend", async () => {
    const saved = process.env.RESEND_BASE_URL;
    delete process.env.RESEND_BASE_URL;
    resetEnvCache();
    try {
      expect(await readStandinMailbox()).toBeNull();
      expect(usingMailStandin()).toBe(false);
    } finally {
      process.env.RESEND_BASE_URL = saved;
      resetEnvCache();
    }
    expect(Array.isArray(await readStandinMailbox())).toBe(true);
  });
});

const billingCommon = { name: "Noor", organization: null, planName: "Researcher", interval: "month", seats: null } as const;
const billingInvoice = {
  number: "RPS-00001",
  amountCents: 1900,
  currency: "eur",
  periodStart: "2026-01-01T00:00:00Z",
  periodEnd: "2026-02-01T00:00:00Z",
  hostedUrl: "https://x.example/invoice/in_1",
};
const billingSamples = {
  "billing-subscription-started": { ...billingCommon, renewsAt: "2026-02-01T00:00:00Z" },
  "billing-payment-received": { ...billingCommon, invoice: billingInvoice },
  "billing-plan-changed": { ...billingCommon, organization: "Lakeshore Basin", planName: "Institution", seats: 3, before: { planName: "Institution", interval: "month", seats: 5 } },
  "billing-cancellation-scheduled": { ...billingCommon, endsAt: "2026-02-01T00:00:00Z" },
  "billing-cancellation-withdrawn": { ...billingCommon, renewsAt: "2026-02-01T00:00:00Z" },
  "billing-payment-failed": { ...billingCommon, invoice: billingInvoice, graceUntil: "2026-02-08T00:00:00Z", nextAttemptAt: "2026-02-04T00:00:00Z" },
  "billing-subscription-ended": { ...billingCommon, reason: "payment-failed" },
} as const;

describe("templates", () => {
  it("every template renders a subject, real HTML and plain text without external images", () => {
    const samples = {
      "verify-email": { name: "Ada", url: "https://x.example/verify?token=abc", expiresHours: 24 },
      "magic-link": { url: "https://x.example/cb?token=abc", expiresMinutes: 15 },
      "password-reset": { name: null, url: "https://x.example/reset?token=abc", expiresMinutes: 60 },
      "role-changed": { name: "Ada", from: "contributor", to: "moderator", reason: "<b>trusted</b>" },
      "account-exists": { signInUrl: "https://x.example/sign-in", resetUrl: "https://x.example/reset-password" },
      ...billingSamples,
      "seat-invitation": { organization: "Lakeshore Basin", inviterName: "Greta", url: "https://x.example/invitations/accept?token=abc", expiresDays: 14 },
      "batch-received": { name: "Ada", batchId: "b1", sampleCount: 3, worstSeverity: "warn", stationCodes: ["HILL-01"] },
      "batch-decided": { name: "Ada", batchId: "b1", accepted: 2, rejected: 0, returned: 1, samples: [{ stationCode: "HILL-01", startDate: "2026-06-01", endDate: "2026-07-01", decision: "returned", reason: "δ columns swapped" }] },
      "station-decided": { name: "Ada", code: "HILL-01", stationName: "Hill", decision: "approve", reason: null },
      "review-digest": { name: "Tomas", day: "2026-11-20", queuedBatches: 7, pendingSamples: 60, failSamples: 12, warnSamples: 9, oldestDays: 3, pendingStations: 1 },
    } as const;
    expect(Object.keys(samples).sort()).toEqual(Object.keys(templates).sort());
    for (const [name, data] of Object.entries(samples)) {
      const r = renderTemplate(name as keyof typeof templates, { ...data, appUrl: "https://rainprint.example" } as never);
      expect(r.subject.length).toBeGreaterThan(5);
      expect(r.html).toMatch(/^<!doctype html>/);
      expect(r.html).not.toMatch(/<img|src="http/i);
      expect(r.text).toContain("RAINPRINT");
      expect(r.text).not.toMatch(/<(p|table|a |h1)/);
    }
    // Data is escaped in HTML.
    const rc = renderTemplate("role-changed", { ...samples["role-changed"], appUrl: "https://rainprint.example" });
    expect(rc.html).toContain("&lt;b&gt;trusted&lt;/b&gt;");
  });
});

describe("the mail stand-in", () => {
  it("requires an API key and validates the message", async () => {
    const noKey = await fetch(`${base}/emails`, { method: "POST", body: "{}", headers: { "content-type": "application/json" } });
    expect(noKey.status).toBe(401);
    const bad = await fetch(`${base}/emails`, {
      method: "POST",
      body: JSON.stringify({ from: "a@x.example", to: "b@x.example" }),
      headers: { "content-type": "application/json", authorization: "Bearer re_x" },
    });
    expect(bad.status).toBe(422);
    expect((await bad.json()).message).toMatch(/subject/);
  });

  it("accepts batches and lists messages by recipient", async () => {
    const res = await fetch(`${base}/emails/batch`, {
      method: "POST",
      body: JSON.stringify([
        { from: "a@x.example", to: ["one@x.example"], subject: "One", text: "1" },
        { from: "a@x.example", to: "two@x.example", subject: "Two", html: "<p>2</p>" },
      ]),
      headers: { "content-type": "application/json", authorization: "Bearer re_x" },
    });
    expect(res.status).toBe(200);
    expect((await res.json()).data).toHaveLength(2);
    const list = await (await fetch(`${base}/_standin/messages?to=two@x.example`)).json();
    expect(list.data).toHaveLength(1);
    expect(list.data[0]).toMatchObject({ subject: "Two", html: "<p>2</p>", to: ["two@x.example"] });
  });
});

describe("queueMail and the send-email job", () => {
  it("writes the log row and the job together, and the job delivers it through the Resend SDK exactly once", async () => {
    const { mailId, jobId } = await queueMail({ to: "reader@x.example", template: "magic-link", data: { url: "https://x.example/cb?token=t", expiresMinutes: 15 } });
    const row = await getDb().select().from(mailLog).where(eq(mailLog.id, mailId)).get();
    expect(row?.status).toBe("queued");
    const job = await getDb().select().from(jobs).where(eq(jobs.id, jobId)).get();
    expect(job).toMatchObject({ kind: "send-email", payload: { mailId } });

    const registry = jobRegistry();
    const claimed = (await claimJob("w", ["send-email"], 10_000))!;
    expect(claimed.id).toBe(jobId);
    expect(await runClaimedJob(claimed, { registry, workerId: "w", leaseMs: 10_000 })).toBe("succeeded");
    const sent = await getDb().select().from(mailLog).where(eq(mailLog.id, mailId)).get();
    expect(sent?.status).toBe("sent");
    expect(sent?.providerId).toBeTruthy();

    const inbox = await (await fetch(`${base}/_standin/messages?to=reader@x.example`)).json();
    expect(inbox.data).toHaveLength(1);
    expect(inbox.data[0].subject).toBe("Your Rainprint sign-in link");
    expect(inbox.data[0].id).toBe(sent?.providerId);

    // Running the same delivery again (a retried job) sends nothing new.
    await getDb().insert(jobs).values({ kind: "send-email", payload: { mailId }, runAfter: new Date() });
    const again = (await claimJob("w", ["send-email"], 10_000))!;
    expect(await runClaimedJob(again, { registry, workerId: "w", leaseMs: 10_000 })).toBe("succeeded");
    const inbox2 = await (await fetch(`${base}/_standin/messages?to=reader@x.example`)).json();
    expect(inbox2.data).toHaveLength(1);
  });

  it("a queueMail inside a failed transaction leaves neither row nor job", async () => {
    const before = (await getDb().select().from(mailLog).all()).length;
    await expect(
      getDb().transaction(async (tx) => {
        await queueMail({ to: "ghost@x.example", template: "magic-link", data: { url: "https://x.example", expiresMinutes: 15 } }, tx as never);
        throw new Error("the change that caused the mail failed");
      }),
    ).rejects.toThrow();
    expect((await getDb().select().from(mailLog).all()).length).toBe(before);
  });
});
