// Shared set-up for the billing tests: a migrated temporary database, the
// payments stand-in running in this process on a free port, and a small HTTP
// server that hands webhook deliveries to the app's real route handler
// (app/api/stripe/webhook/route.ts), exactly as Next would.
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { getDb } from "@/db";
import { memberships, organizations, users } from "@/db/schema";
import { migrateDb } from "@/db/migrate";
import { resetEnvCache } from "@/lib/env";
import { setBillingNoticeHandler, type BillingNoticeKind, type BillingNotices } from "@/lib/billing/notices";
import { clearPriceCache } from "@/lib/billing/prices";
import { getStripe, resetStripeClient } from "@/lib/billing/stripe";
import { startStripeStandin, type RunningStandin } from "@/scripts/standins/stripe/server";

export const WEBHOOK_SECRET = "whsec_unit_test_secret";
export const API_KEY = "sk_test_unit_tests";

export interface Delivery {
  raw: string;
  signature: string | null;
  status: number;
  response: string;
}

export interface Harness {
  standin: RunningStandin;
  /** Every delivery the app received, in order. */
  deliveries: Delivery[];
  /** Every billing notice queued, in order. */
  notices: { kind: BillingNoticeKind; data: BillingNotices[BillingNoticeKind] }[];
  /** Make the app's webhook route answer this status instead (to test retries); null = normal. */
  forceStatus: { value: number | null };
  control<T = Record<string, unknown>>(path: string, body?: unknown, method?: string): Promise<T>;
  /** Wait until the stand-in has finished delivering what it has queued. */
  settle(): Promise<void>;
  close(): Promise<void>;
}

function listen(server: Server): Promise<number> {
  return new Promise((resolve) => server.listen(0, "127.0.0.1", () => resolve((server.address() as AddressInfo).port)));
}

export async function startHarness(): Promise<Harness> {
  process.env.STRIPE_WEBHOOK_SECRET = WEBHOOK_SECRET;
  process.env.STRIPE_SECRET_KEY = API_KEY;
  await migrateDb();
  // Imported after the environment is set: the route reads env() lazily, but keep it obvious.
  const { POST } = await import("@/app/api/stripe/webhook/route");

  const deliveries: Delivery[] = [];
  const forceStatus = { value: null as number | null };
  const receiver = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", () => {
      void (async () => {
        const raw = Buffer.concat(chunks).toString("utf8");
        const signature = (req.headers["stripe-signature"] as string | undefined) ?? null;
        let status: number;
        let text: string;
        if (forceStatus.value !== null) {
          status = forceStatus.value;
          text = "forced";
        } else {
          const headers = new Headers();
          for (const [k, v] of Object.entries(req.headers)) if (typeof v === "string") headers.set(k, v);
          const response = await POST(new Request("http://localhost/api/stripe/webhook", { method: "POST", headers, body: raw }));
          status = response.status;
          text = await response.text();
        }
        deliveries.push({ raw, signature, status, response: text });
        res.writeHead(status, { "Content-Type": "application/json" });
        res.end(text);
      })();
    });
  });
  const receiverPort = await listen(receiver);

  const standin = await startStripeStandin({
    port: 0,
    webhookUrl: `http://127.0.0.1:${receiverPort}/api/stripe/webhook`,
    webhookSecret: WEBHOOK_SECRET,
    apiKey: API_KEY,
    statePath: null,
    control: true,
    log: () => undefined,
  });
  process.env.STRIPE_API_BASE = standin.url;
  resetEnvCache();
  resetStripeClient();
  clearPriceCache();

  const notices: Harness["notices"] = [];
  setBillingNoticeHandler((kind, data) => {
    notices.push({ kind, data });
  });

  const control = async <T,>(path: string, body?: unknown, method = body === undefined ? "GET" : "POST"): Promise<T> => {
    const res = await fetch(`${standin.url}/_standin${path}`, {
      method,
      headers: { "Content-Type": "application/json" },
      body: method === "GET" ? undefined : JSON.stringify(body ?? {}),
    });
    const json = (await res.json()) as T;
    if (!res.ok) throw new Error(`control ${path} → ${res.status}: ${JSON.stringify(json)}`);
    return json;
  };

  return {
    standin,
    deliveries,
    notices,
    forceStatus,
    control,
    settle: () => standin.delivery.idle(),
    async close() {
      setBillingNoticeHandler(null);
      await standin.close();
      await new Promise<void>((r) => receiver.close(() => r()));
    },
  };
}

/** Poll until `check` returns true (webhook retries run on timers); fails after `timeoutMs`. */
export async function waitFor(check: () => Promise<boolean> | boolean, what: string, timeoutMs = 20_000): Promise<void> {
  const start = Date.now();
  while (!(await check())) {
    if (Date.now() - start > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

let counter = 0;

/** A person in the database (what the auth module will create in the real app). */
export async function makeUser(name = "Test Researcher"): Promise<{ id: string; email: string }> {
  counter += 1;
  const email = `person${counter}-${Date.now()}@example.test`;
  const [u] = await getDb().insert(users).values({ email, name }).returning({ id: users.id, email: users.email });
  return u;
}

/** An organisation with an owner. */
export async function makeOrganization(ownerId: string): Promise<{ id: string }> {
  counter += 1;
  const [o] = await getDb()
    .insert(organizations)
    .values({ name: `Test Institute ${counter}`, slug: `test-institute-${counter}-${Date.now()}` })
    .returning({ id: organizations.id });
  await getDb().insert(memberships).values({ organizationId: o.id, userId: ownerId, role: "owner" });
  return o;
}

/** Post a form to one of the stand-in's pages, as the browser would; returns the response. */
export async function postForm(url: string, fields: Record<string, string>): Promise<Response> {
  return fetch(url, {
    method: "POST",
    headers: { "Content-Type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams(fields).toString(),
    redirect: "manual",
  });
}

export { getStripe };
