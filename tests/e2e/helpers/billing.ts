import { randomUUID } from "node:crypto";
import bcrypt from "bcryptjs";
import { expect, inject } from "vitest";
import { freshEmail } from "./accounts";
import { testDb } from "./db";
import type { HttpSession } from "./http";

// Billing helpers for end-to-end tests: confirmed accounts made directly in
// the test database (sign-up itself is tested elsewhere), the payments
// stand-in's control API, and polling for webhook-driven state.

export type TestAccount = { id: string; email: string; password: string; name: string };

/** A confirmed contributor account on the Open plan. */
export async function makeAccount(label: string, name = "Test Person"): Promise<TestAccount> {
  const email = freshEmail(label);
  const password = "long quiet rain on the fen";
  const id = randomUUID();
  const now = Date.now();
  await testDb().execute({
    sql: "INSERT INTO users (id, name, email, email_verified, password_hash, role, is_demo, created_at) VALUES (?, ?, ?, ?, ?, 'contributor', 0, ?)",
    args: [id, name, email, now, await bcrypt.hash(password, 8), now],
  });
  return { id, email, password, name };
}

/** Call the payments stand-in's control API (test-only). */
export async function standin<T = Record<string, unknown>>(path: string, body?: unknown): Promise<T> {
  const res = await fetch(`${inject("stripeUrl")}/_standin${path}`, {
    method: body === undefined ? "GET" : "POST",
    headers: { "Content-Type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const json = (await res.json()) as T;
  if (!res.ok) throw new Error(`stand-in ${path} → ${res.status}: ${JSON.stringify(json)}`);
  return json;
}

/** Poll until `check` is true. */
export async function waitUntil(check: () => Promise<boolean>, what: string, timeoutMs = 30_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** The plan the guard gives this session now (GET /api/me). */
export async function planOf(session: HttpSession): Promise<string> {
  const me = await session.json<{ plan: string }>("/api/me", "GET");
  expect(me.status).toBe(200);
  return me.body.plan;
}

/** Start Checkout through the app's route and pay it on the stand-in's page as a browser would. */
export async function checkoutAndPay(session: HttpSession, body: Record<string, unknown>): Promise<{ sessionId: string; organizationSlug: string | null }> {
  const started = await session.json<{ url: string; sessionId: string; organizationSlug: string | null }>("/api/billing/checkout", "POST", body);
  expect(started.status, JSON.stringify(started.body)).toBe(201);
  const paid = await fetch(started.body.url, {
    method: "POST",
    headers: { "Content-Type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ action: "pay", outcome: "succeed" }).toString(),
    redirect: "manual",
  });
  expect(paid.status).toBe(303);
  return { sessionId: started.body.sessionId, organizationSlug: started.body.organizationSlug };
}

/** The Stripe customer id the app mapped for a person. */
export async function customerOf(userId: string): Promise<string> {
  const rs = await testDb().execute({ sql: "SELECT stripe_customer_id AS id FROM billing_customers WHERE user_id = ?", args: [userId] });
  if (!rs.rows[0]) throw new Error(`no Stripe customer for user ${userId}`);
  return String(rs.rows[0].id);
}
