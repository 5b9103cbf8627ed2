// Billing end to end without a browser: lib/billing's Stripe calls → the
// payments stand-in (real SDK) → its pages → signed webhooks → the app's route
// handler → the subscriptions table → planFromSubscriptions.
import Stripe from "stripe";
import { count, eq } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { getDb } from "@/db";
import { billingCustomers, reviewEvents, subscriptions, webhookEvents } from "@/db/schema";
import { paidPlanForUser, subscriptionRowsForOrganization } from "@/lib/billing/account";
import { listInvoices, openBillingPortal, startCheckout } from "@/lib/billing/checkout";
import { BillingError } from "@/lib/billing/errors";
import { setBillingNoticeHandler } from "@/lib/billing/notices";
import type { BillingOwner } from "@/lib/billing/owner";
import { PAYMENT_GRACE_DAYS } from "@/lib/billing/plans";
import { planFromSubscriptions } from "@/lib/billing/state";
import { signatureHeader } from "@/scripts/standins/stripe/delivery";
import { getStripe, makeOrganization, makeUser, postForm, startHarness, waitFor, WEBHOOK_SECRET, type Harness } from "./harness";

const DAY_MS = 86_400_000;
let h: Harness;
let stripe: Stripe;

interface ControlEvent {
  id: string;
  type: string;
  created: number;
  delivered: boolean;
  held: boolean;
  deliveries: { status: number | null }[];
}

beforeAll(async () => {
  h = await startHarness();
  stripe = getStripe();
});
afterAll(async () => {
  await h.close();
});
beforeEach(async () => {
  await h.control("/reset", {});
  h.notices.length = 0;
});

const SUCCESS = "http://localhost:3000/account/billing?session={CHECKOUT_SESSION_ID}";
const CANCEL = "http://localhost:3000/pricing";

async function rowOf(stripeSubscriptionId: string) {
  return getDb().select().from(subscriptions).where(eq(subscriptions.stripeSubscriptionId, stripeSubscriptionId)).get();
}

async function rowsFor(owner: BillingOwner) {
  return getDb()
    .select()
    .from(subscriptions)
    .where(owner.kind === "user" ? eq(subscriptions.userId, owner.userId) : eq(subscriptions.organizationId, owner.organizationId));
}

async function checkoutAndPay(
  owner: BillingOwner,
  email: string,
  plan: "researcher" | "institution",
  interval: "month" | "year" = "month",
  seats?: number,
) {
  const { sessionId, url } = await startCheckout({ owner, contact: { email }, plan, interval, seats, successUrl: SUCCESS, cancelUrl: CANCEL });
  const res = await postForm(url, { action: "pay", outcome: "succeed" });
  expect(res.status).toBe(303);
  expect(res.headers.get("location")).toBe(`http://localhost:3000/account/billing?session=${sessionId}`);
  const session = await stripe.checkout.sessions.retrieve(sessionId);
  return { sessionId, stripeSubscriptionId: session.subscription as string };
}

async function researcher() {
  const u = await makeUser();
  const owner: BillingOwner = { kind: "user", userId: u.id };
  const { stripeSubscriptionId } = await checkoutAndPay(owner, u.email, "researcher");
  return { user: u, owner, stripeSubscriptionId };
}

async function institution(seats = 3) {
  const u = await makeUser("Institution Owner");
  const org = await makeOrganization(u.id);
  const owner: BillingOwner = { kind: "organization", organizationId: org.id };
  const { stripeSubscriptionId } = await checkoutAndPay(owner, u.email, "institution", "month", seats);
  return { user: u, org, owner, stripeSubscriptionId };
}

async function portal(owner: BillingOwner) {
  const { url } = await openBillingPortal(owner, "http://localhost:3000/account/billing");
  return url;
}

async function events(type?: string): Promise<ControlEvent[]> {
  const { data } = await h.control<{ data: ControlEvent[] }>(`/events${type ? `?type=${type}` : ""}`);
  return data;
}

const auditCount = async (entityId: string) =>
  (await getDb().select({ n: count() }).from(reviewEvents).where(eq(reviewEvents.entityId, entityId)).get())!.n;

describe("checkout → pay → plan", () => {
  it("activates Researcher after the webhooks, maps the customer and sends a welcome and a receipt", async () => {
    const { user, owner, stripeSubscriptionId } = await researcher();
    const row = await rowOf(stripeSubscriptionId);
    expect(row).toMatchObject({ userId: user.id, organizationId: null, plan: "researcher", interval: "month", status: "active", seats: 1 });
    const sub = await stripe.subscriptions.retrieve(stripeSubscriptionId);
    expect(row!.currentPeriodEnd!.getTime()).toBe(sub.items.data[0].current_period_end * 1000);
    expect(row!.cancelAtPeriodEnd).toBe(false);
    const mapping = await getDb().select().from(billingCustomers).where(eq(billingCustomers.stripeCustomerId, row!.stripeCustomerId)).get();
    expect(mapping).toMatchObject({ userId: user.id, organizationId: null });

    const plan = await paidPlanForUser(user.id);
    expect(plan).toMatchObject({ plan: "researcher", standing: "active", banner: null });
    expect(plan.renewsAt?.getTime()).toBe(row!.currentPeriodEnd!.getTime());

    expect(h.notices.map((n) => n.kind).sort()).toEqual(["payment-received", "subscription-started"]);
    const receipt = h.notices.find((n) => n.kind === "payment-received")!.data as { invoice: { amountCents: number } };
    expect(receipt.invoice.amountCents).toBe(1_900);

    // Every delivered event was recorded as processed once.
    const delivered = await events();
    for (const e of delivered) {
      const rec = await getDb().select().from(webhookEvents).where(eq(webhookEvents.id, e.id)).get();
      expect(rec?.processedAt, e.type).toBeTruthy();
    }
    const invoices = await listInvoices(owner);
    expect(invoices).toHaveLength(1);
    expect(invoices[0]).toMatchObject({ status: "paid", amountCents: 1_900, currency: "eur" });
  });

  it("gives every member of an organisation the Institution plan it bought", async () => {
    const { user, org, stripeSubscriptionId } = await institution(5);
    const row = await rowOf(stripeSubscriptionId);
    expect(row).toMatchObject({ organizationId: org.id, userId: null, plan: "institution", seats: 5, status: "active" });
    expect((await paidPlanForUser(user.id)).plan).toBe("institution");
    expect(await subscriptionRowsForOrganization(org.id)).toHaveLength(1);
  });

  it("refuses what the catalogue does not allow, with a clear message and no Stripe call", async () => {
    const u = await makeUser();
    const person: BillingOwner = { kind: "user", userId: u.id };
    const err = (p: Promise<unknown>) => p.then(() => null, (e: unknown) => e as BillingError);
    const wrong = await err(startCheckout({ owner: person, contact: { email: u.email }, plan: "institution", interval: "month", successUrl: SUCCESS, cancelUrl: CANCEL }));
    expect(wrong).toMatchObject({ code: "wrong-holder", status: 400, showable: true });
    const org = await makeOrganization(u.id);
    const seats = await err(
      startCheckout({ owner: { kind: "organization", organizationId: org.id }, contact: { email: u.email }, plan: "institution", interval: "month", seats: 2, successUrl: SUCCESS, cancelUrl: CANCEL }),
    );
    expect(seats).toMatchObject({ code: "invalid-seats" });
    expect(await stripe.customers.list({ email: u.email })).toMatchObject({ data: [] });

    await checkoutAndPay(person, u.email, "researcher");
    const twice = await err(startCheckout({ owner: person, contact: { email: u.email }, plan: "researcher", interval: "year", successUrl: SUCCESS, cancelUrl: CANCEL }));
    expect(twice).toMatchObject({ code: "already-subscribed", status: 409 });
    expect(await err(openBillingPortal({ kind: "user", userId: "nobody" }, CANCEL))).toMatchObject({ code: "no-billing-account" });
  });
});

describe("portal", () => {
  it("changes seats and interval, cancels at period end, resumes — and the row follows", async () => {
    const { owner, user, stripeSubscriptionId } = await institution(3);
    const url = await portal(owner);
    const page = await (await fetch(url)).text();
    expect(page).toContain("Local test page");
    expect(page).toContain("Return to Rainprint");

    expect((await postForm(url, { action: "change-seats", subscription: stripeSubscriptionId, quantity: "7" })).status).toBe(303);
    expect(await rowOf(stripeSubscriptionId)).toMatchObject({ seats: 7, interval: "month" });
    expect(h.notices.filter((n) => n.kind === "plan-changed")).toHaveLength(1);

    const tooMany = await postForm(url, { action: "change-seats", subscription: stripeSubscriptionId, quantity: "999" });
    expect(tooMany.status).toBe(400);
    expect(await tooMany.text()).toContain("between 3 and 250");
    expect((await rowOf(stripeSubscriptionId))!.seats).toBe(7);

    const yearly = (await stripe.prices.list({ lookup_keys: ["rainprint_institution_year"] })).data[0];
    await postForm(url, { action: "change-price", subscription: stripeSubscriptionId, price: yearly.id });
    const afterYear = (await rowOf(stripeSubscriptionId))!;
    expect(afterYear).toMatchObject({ interval: "year", seats: 7, status: "active" });
    const sub = await stripe.subscriptions.retrieve(stripeSubscriptionId);
    expect(afterYear.currentPeriodEnd!.getTime()).toBe(sub.items.data[0].current_period_end * 1000);
    // A new interval restarts the period and bills it at once.
    expect((await listInvoices(owner)).map((i) => i.amountCents)).toEqual([7 * 49_000, 3 * 4_900]);

    await postForm(url, { action: "cancel", subscription: stripeSubscriptionId });
    const cancelling = (await rowOf(stripeSubscriptionId))!;
    expect(cancelling).toMatchObject({ cancelAtPeriodEnd: true, status: "active" });
    const ending = await paidPlanForUser(user.id);
    expect(ending).toMatchObject({ plan: "institution", standing: "ending", banner: { kind: "ending" } });
    expect(ending.endsAt?.getTime()).toBe(cancelling.currentPeriodEnd!.getTime());

    await postForm(url, { action: "resume", subscription: stripeSubscriptionId });
    expect((await rowOf(stripeSubscriptionId))!.cancelAtPeriodEnd).toBe(false);
    expect(h.notices.map((n) => n.kind)).toEqual(
      expect.arrayContaining(["cancellation-scheduled", "cancellation-withdrawn"]),
    );
  });

  it("a new test card retries an unpaid invoice at once", async () => {
    const { owner, stripeSubscriptionId, user } = await researcher();
    const customer = (await rowOf(stripeSubscriptionId))!.stripeCustomerId;
    await h.control("/payments/decline", { customer, attempts: "always" });
    const end = (await rowOf(stripeSubscriptionId))!.currentPeriodEnd!.getTime() / 1000;
    await h.control("/clock", { to: end + 60 });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("past_due");
    await postForm(await portal(owner), { action: "payment-method" });
    const row = (await rowOf(stripeSubscriptionId))!;
    expect(row).toMatchObject({ status: "active", graceUntil: null });
    expect((await paidPlanForUser(user.id)).banner).toBeNull();
  });
});

describe("time passing on the stand-in's clock", () => {
  it("renews at the period end: new invoice, later period end, a receipt", async () => {
    const { stripeSubscriptionId } = await researcher();
    const first = (await rowOf(stripeSubscriptionId))!;
    h.notices.length = 0;
    const { events: evs } = await h.control<{ events: ControlEvent[] }>("/clock", { to: first.currentPeriodEnd!.getTime() / 1000 + 60 });
    expect(evs.map((e) => e.type)).toEqual(["invoice.paid", "invoice.payment_succeeded", "customer.subscription.updated"]);
    const renewed = (await rowOf(stripeSubscriptionId))!;
    expect(renewed.status).toBe("active");
    const days = (renewed.currentPeriodEnd!.getTime() - first.currentPeriodEnd!.getTime()) / DAY_MS;
    expect(days).toBeGreaterThanOrEqual(28);
    expect(days).toBeLessThanOrEqual(31);
    expect(h.notices.map((n) => n.kind)).toEqual(["payment-received"]);
  });

  it("ends a subscription cancelled in the portal once the clock passes the period end", async () => {
    const { owner, user, stripeSubscriptionId } = await researcher();
    await postForm(await portal(owner), { action: "cancel", subscription: stripeSubscriptionId });
    const end = (await rowOf(stripeSubscriptionId))!.currentPeriodEnd!.getTime() / 1000;
    await h.control("/clock", { to: end - 3600 });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("active");
    const { events: evs } = await h.control<{ events: ControlEvent[] }>("/clock", { to: end + 60 });
    expect(evs.map((e) => e.type)).toEqual(["customer.subscription.deleted"]);
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("canceled");
    expect(await paidPlanForUser(user.id)).toMatchObject({ plan: "open", banner: null });
    const ended = h.notices.find((n) => n.kind === "subscription-ended")!.data as { reason: string };
    expect(ended.reason).toBe("cancelled");
    expect((await stripe.invoices.list({ subscription: stripeSubscriptionId })).data).toHaveLength(1);
  });

  it("failed payment → past due → grace → Open, then cancelled when the retries run out", async () => {
    const { user, stripeSubscriptionId } = await researcher();
    const row0 = (await rowOf(stripeSubscriptionId))!;
    await h.control("/payments/decline", { customer: row0.stripeCustomerId, attempts: "always" });
    h.notices.length = 0;
    const { events: evs } = await h.control<{ events: ControlEvent[] }>("/clock", { to: row0.currentPeriodEnd!.getTime() / 1000 + 60 });
    expect(evs.map((e) => e.type)).toEqual(["invoice.payment_failed", "customer.subscription.updated"]);
    const failedAt = evs[0].created * 1000;

    const pastDue = (await rowOf(stripeSubscriptionId))!;
    expect(pastDue.status).toBe("past_due");
    expect(pastDue.graceUntil!.getTime()).toBe(failedAt + PAYMENT_GRACE_DAYS * DAY_MS);
    expect(h.notices.map((n) => n.kind)).toEqual(["payment-failed"]);

    const rows = await rowsFor({ kind: "user", userId: user.id });
    const inGrace = planFromSubscriptions(rows, new Date(failedAt + DAY_MS));
    expect(inGrace).toMatchObject({ plan: "researcher", standing: "grace", banner: { kind: "payment-failed" } });
    expect(inGrace.endsAt!.getTime()).toBe(pastDue.graceUntil!.getTime());
    const afterGrace = planFromSubscriptions(rows, new Date(pastDue.graceUntil!.getTime() + 1000));
    expect(afterGrace).toMatchObject({ plan: "open", banner: { kind: "lapsed", plan: "researcher" } });

    // Retries 3, 5 and 7 days apart all fail; then the subscription is cancelled.
    const { events: later } = await h.control<{ events: ControlEvent[] }>("/clock", { advance_days: 16 });
    expect(later.filter((e) => e.type === "invoice.payment_failed")).toHaveLength(3);
    expect(later.at(-1)!.type).toBe("customer.subscription.deleted");
    const ended = (await rowOf(stripeSubscriptionId))!;
    expect(ended.status).toBe("canceled");
    // The grace start is not moved by later failures.
    expect(ended.graceUntil!.getTime()).toBe(pastDue.graceUntil!.getTime());
    expect(await paidPlanForUser(user.id)).toMatchObject({ plan: "open" });
    expect((h.notices.find((n) => n.kind === "subscription-ended")!.data as { reason: string }).reason).toBe("payment-failed");
  });

  it("a payment that succeeds on retry ends the grace period", async () => {
    const { user, stripeSubscriptionId } = await researcher();
    const row0 = (await rowOf(stripeSubscriptionId))!;
    await h.control("/payments/decline", { customer: row0.stripeCustomerId, attempts: 1 });
    await h.control("/clock", { to: row0.currentPeriodEnd!.getTime() / 1000 + 60 });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("past_due");
    await h.control("/clock", { advance_days: 3.5 });
    expect(await rowOf(stripeSubscriptionId)).toMatchObject({ status: "active", graceUntil: null });
    expect((await paidPlanForUser(user.id)).banner).toBeNull();
  });

  it("with after_final_failure=unpaid the subscription stays but grants nothing", async () => {
    await h.control("/settings", { after_final_failure: "unpaid", dunning_retry_days: [1] });
    const { user, stripeSubscriptionId } = await researcher();
    const row0 = (await rowOf(stripeSubscriptionId))!;
    await h.control("/payments/decline", { customer: row0.stripeCustomerId, attempts: "always" });
    await h.control("/clock", { to: row0.currentPeriodEnd!.getTime() / 1000 + 2 * 86_400 });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("unpaid");
    expect(await paidPlanForUser(user.id)).toMatchObject({ plan: "open", banner: { kind: "lapsed" } });
  });
});

describe("delivery order and replays", () => {
  it("handles the same event twice with one effect", async () => {
    const { owner, stripeSubscriptionId } = await institution(3);
    const rowId = (await rowOf(stripeSubscriptionId))!.id;
    await postForm(await portal(owner), { action: "change-seats", subscription: stripeSubscriptionId, quantity: "4" });
    const updated = (await events("customer.subscription.updated")).at(-1)!;
    const audits = await auditCount(rowId);
    const notices = h.notices.length;
    const before = await rowOf(stripeSubscriptionId);

    const replay = await h.control<{ delivery: { status: number } }>(`/events/${updated.id}/deliver`, {});
    expect(replay.delivery.status).toBe(200);
    expect(JSON.parse(h.deliveries.at(-1)!.response)).toMatchObject({ status: "duplicate", eventId: updated.id });
    expect(await auditCount(rowId)).toBe(audits);
    expect(h.notices.length).toBe(notices);
    expect(await rowOf(stripeSubscriptionId)).toEqual(before);
  });

  it("reaches the right state when `updated` arrives before `created`", async () => {
    const u = await makeUser();
    const org = await makeOrganization(u.id);
    const owner: BillingOwner = { kind: "organization", organizationId: org.id };
    await h.control("/webhooks/hold", {});
    const { stripeSubscriptionId } = await checkoutAndPay(owner, u.email, "institution", "month", 3);
    await postForm(await portal(owner), { action: "change-seats", subscription: stripeSubscriptionId, quantity: "9" });
    const held = (await events()).filter((e) => e.held);
    const created = held.find((e) => e.type === "customer.subscription.created")!;
    const updated = held.find((e) => e.type === "customer.subscription.updated")!;
    expect(await rowOf(stripeSubscriptionId)).toBeUndefined();

    await h.control(`/events/${updated.id}/deliver`, {});
    expect(await rowOf(stripeSubscriptionId)).toMatchObject({ seats: 9, organizationId: org.id });
    await h.control(`/events/${created.id}/deliver`, {});
    // The created event's payload says 3 seats; the subscription says 9.
    const createdPayload = (await stripe.events.retrieve(created.id)).data.object as Stripe.Subscription;
    expect(createdPayload.items.data[0].quantity).toBe(3);
    expect(await rowOf(stripeSubscriptionId)).toMatchObject({ seats: 9, status: "active" });

    await h.control("/webhooks/release", {});
    expect(await rowOf(stripeSubscriptionId)).toMatchObject({ seats: 9, status: "active", plan: "institution" });
    expect(h.notices.filter((n) => n.kind === "subscription-started")).toHaveLength(1);
  });

  it("never brings a deleted subscription back with an older `updated`", async () => {
    const { user, owner, stripeSubscriptionId } = await researcher();
    await h.control("/webhooks/hold", {});
    const url = await portal(owner);
    await postForm(url, { action: "cancel", subscription: stripeSubscriptionId });
    await stripe.subscriptions.cancel(stripeSubscriptionId);
    const held = (await events()).filter((e) => e.held);
    const order = [...held].reverse().map((e) => e.id); // deleted first, then the older updated
    await h.control("/webhooks/release", { order });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("canceled");
    expect((await paidPlanForUser(user.id)).plan).toBe("open");
  });

  it("records nothing when the handler fails, and applies the event once on redelivery", async () => {
    // Several retries, so one that fires before the fault is cleared does not end the test.
    await h.control("/settings", { webhook_retry_delays_ms: [200, 200, 200, 200, 200] });
    let fail = true;
    const seen: string[] = [];
    // The route logs the failure; keep the test output quiet.
    const quiet = vi.spyOn(console, "error").mockImplementation(() => undefined);
    const restore = setBillingNoticeHandler((kind) => {
      if (fail && kind === "subscription-started") throw new Error("mail queue unavailable");
      seen.push(kind);
    });
    try {
      const u = await makeUser();
      const owner: BillingOwner = { kind: "user", userId: u.id };
      const { stripeSubscriptionId } = await checkoutAndPay(owner, u.email, "researcher");
      const created = (await events("customer.subscription.created"))[0];
      expect(created.deliveries[0].status).toBe(500);
      fail = false;
      await waitFor(async () => (await events()).every((e) => e.delivered), "the retries to be delivered");
      const after = (await events("customer.subscription.created"))[0];
      expect(after.deliveries.at(-1)!.status).toBe(200);
      expect(seen.filter((k) => k === "subscription-started")).toHaveLength(1);
      expect((await rowOf(stripeSubscriptionId))!.status).toBe("active");
      const rec = await getDb().select().from(webhookEvents).where(eq(webhookEvents.id, created.id)).get();
      expect(rec?.processedAt).toBeTruthy();
    } finally {
      quiet.mockRestore();
      restore();
      setBillingNoticeHandler((kind, data) => {
        h.notices.push({ kind, data });
      });
    }
  });
});

describe("the webhook route", () => {
  it("answers 400 problem+json to a bad, missing or stale signature, and changes nothing", async () => {
    const { POST } = await import("@/app/api/stripe/webhook/route");
    const u = await makeUser();
    await h.control("/webhooks/hold", {});
    const { stripeSubscriptionId } = await checkoutAndPay({ kind: "user", userId: u.id }, u.email, "researcher");
    const created = (await events("customer.subscription.created")).find((e) => e.held)!;
    const raw = JSON.stringify(await stripe.events.retrieve(created.id), null, 2);
    const body = (await fetch(`${h.standin.url}/_standin/state`).then((r) => r.json())) as { events: { id: string; payload: string }[] };
    const payload = body.events.find((e) => e.id === created.id)!.payload;
    expect(JSON.parse(payload).id).toBe(JSON.parse(raw).id);

    const post = (sig: string | null, text = payload) =>
      POST(
        new Request("http://localhost/api/stripe/webhook", {
          method: "POST",
          headers: sig ? { "stripe-signature": sig, "content-type": "application/json" } : { "content-type": "application/json" },
          body: text,
        }),
      );
    const now = Math.floor(Date.now() / 1000);
    const cases = [
      post(signatureHeader(payload, "whsec_not_ours", now)),
      post(null),
      post(signatureHeader(payload, WEBHOOK_SECRET, now - 600)),
      post(signatureHeader(payload, WEBHOOK_SECRET, now), payload.replace('"active"', '"canceled"')),
    ];
    for (const res of await Promise.all(cases)) {
      expect(res.status).toBe(400);
      expect(res.headers.get("content-type")).toBe("application/problem+json");
      const problem = (await res.json()) as { type: string; title: string; status: number };
      expect(problem).toMatchObject({ type: "/problems/stripe-signature", status: 400 });
    }
    expect(await rowOf(stripeSubscriptionId)).toBeUndefined();
    expect(await getDb().select().from(webhookEvents).where(eq(webhookEvents.id, created.id)).get()).toBeUndefined();

    const good = await post(signatureHeader(payload, WEBHOOK_SECRET, now));
    expect(good.status).toBe(200);
    expect(await good.json()).toMatchObject({ received: true, status: "processed", eventId: created.id });
    expect((await rowOf(stripeSubscriptionId))!.status).toBe("active");
    await h.control("/webhooks/release", {});
  });

  it("records events it does not act on, once", async () => {
    const c = await stripe.customers.create({ email: "unrelated@example.test" });
    await h.settle();
    const ev = (await events("customer.created")).find((e) => h.deliveries.some((d) => d.raw.includes(c.id) && d.raw.includes(e.id)))!;
    const rec = await getDb().select().from(webhookEvents).where(eq(webhookEvents.id, ev.id)).get();
    expect(rec?.processedAt).toBeTruthy();
    expect(rec?.error).toMatch(/^ignored: event type customer.created/);
  });
});
