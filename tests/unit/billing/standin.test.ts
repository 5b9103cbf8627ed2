// The payments stand-in answering the real `stripe` SDK (v23): shapes, errors,
// idempotency, pagination, signatures, retries, the clock and persistence.
import Stripe from "stripe";
import { mkdtempSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cataloguePrices, PLAN_CATALOGUE } from "@/lib/billing/plans";
import { signatureHeader } from "@/scripts/standins/stripe/delivery";
import { parseForm } from "@/scripts/standins/stripe/form";
import { startStripeStandin } from "@/scripts/standins/stripe/server";
import { API_KEY, getStripe, postForm, startHarness, waitFor, WEBHOOK_SECRET, type Harness } from "./harness";

let h: Harness;
let stripe: Stripe;

beforeAll(async () => {
  h = await startHarness();
  stripe = getStripe();
});
afterAll(async () => {
  await h.close();
});

describe("form bodies as the SDK encodes them", () => {
  it("nests brackets, indexes arrays and keeps empty values", () => {
    const parsed = parseForm(
      "line_items[0][price]=price_a&line_items[0][quantity]=3&metadata[rainprint_user_id]=u1&expand[0]=subscription&expand[1]=customer&lookup_keys[]=k1&lookup_keys[]=k2&description=a+b%20c&metadata[gone]=",
    );
    expect(parsed).toEqual({
      line_items: [{ price: "price_a", quantity: "3" }],
      metadata: { rainprint_user_id: "u1", gone: "" },
      expand: ["subscription", "customer"],
      lookup_keys: ["k1", "k2"],
      description: "a b c",
    });
  });

  it("refuses prototype keys", () => {
    expect(() => parseForm("__proto__[x]=1")).toThrow(/Invalid parameter/);
  });
});

describe("customers", () => {
  it("creates, retrieves, updates (metadata merged), lists and searches", async () => {
    const c = await stripe.customers.create({ email: "ana@example.test", name: "Ana", metadata: { a: "1", b: "2" } });
    expect(c.object).toBe("customer");
    expect(c.id).toMatch(/^cus_/);
    const updated = await stripe.customers.update(c.id, { name: "Ana B", metadata: { b: "", c: "3" } });
    expect(updated.metadata).toEqual({ a: "1", c: "3" });
    const got = await stripe.customers.retrieve(c.id);
    expect(got).toMatchObject({ id: c.id, name: "Ana B", email: "ana@example.test" });
    const listed = await stripe.customers.list({ email: "ana@example.test" });
    expect(listed.data.map((x) => x.id)).toEqual([c.id]);
    const found = await stripe.customers.search({ query: "metadata['a']:'1' AND email:'ana@example.test'" });
    expect(found.data.map((x) => x.id)).toEqual([c.id]);
    const none = await stripe.customers.search({ query: "email:'nobody@example.test'" });
    expect(none.data).toEqual([]);
  });

  it("pages through lists with starting_after (auto-pagination)", async () => {
    const ids: string[] = [];
    for (let i = 0; i < 5; i++) ids.push((await stripe.customers.create({ email: `page${i}@example.test` })).id);
    const first = await stripe.customers.list({ limit: 2 });
    expect(first.data).toHaveLength(2);
    expect(first.has_more).toBe(true);
    const all = await stripe.customers.list({ limit: 2 }).autoPagingToArray({ limit: 100 });
    // newest first, every customer exactly once
    expect(new Set(all.map((c) => c.id)).size).toBe(all.length);
    expect(all.slice(0, 5).map((c) => c.id)).toEqual([...ids].reverse());
  });
});

describe("prices", () => {
  it("are seeded from the plan catalogue and found by lookup key", async () => {
    const keys = cataloguePrices().map((p) => p.lookupKey);
    const res = await stripe.prices.list({ lookup_keys: keys, active: true, expand: ["data.product"] });
    expect(res.data.map((p) => p.lookup_key).sort()).toEqual([...keys].sort());
    for (const p of res.data) {
      const expected = cataloguePrices().find((c) => c.lookupKey === p.lookup_key)!;
      expect(p.unit_amount).toBe(expected.unitAmountCents);
      expect(p.recurring?.interval).toBe(expected.interval);
      expect(p.currency).toBe(expected.currency);
      // The SDK turns decimal strings into its Decimal type.
      expect(String(p.unit_amount_decimal)).toBe(String(expected.unitAmountCents));
      expect(typeof p.product === "object" && "name" in p.product && p.product.name).toContain(
        PLAN_CATALOGUE[expected.plan].name,
      );
    }
    const one = await stripe.prices.retrieve(res.data[0].id);
    expect(one.id).toBe(res.data[0].id);
  });
});

describe("errors in Stripe's shape", () => {
  it("answers an unknown endpoint with a 404 invalid_request_error / resource_missing", async () => {
    const err = await stripe.rawRequest("GET", "/v1/terminal/readers", {}).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeInvalidRequestError);
    const e = err as Stripe.errors.StripeInvalidRequestError;
    expect(e.statusCode).toBe(404);
    expect(e.type).toBe("StripeInvalidRequestError");
    expect(e.code).toBe("resource_missing");

    const raw = await fetch(`${h.standin.url}/v1/coupons`, { headers: { Authorization: `Bearer ${API_KEY}` } });
    expect(raw.status).toBe(404);
    const body = (await raw.json()) as { error: Record<string, unknown> };
    expect(body.error.type).toBe("invalid_request_error");
    expect(body.error.code).toBe("resource_missing");
    expect(typeof body.error.message).toBe("string");
  });

  it("answers a missing object with resource_missing and a bad key with 401", async () => {
    const missing = await stripe.subscriptions.retrieve("sub_doesnotexist").catch((e: unknown) => e);
    expect(missing).toMatchObject({ statusCode: 404, code: "resource_missing" });
    const wrong = new Stripe("sk_test_wrong", { host: "127.0.0.1", port: h.standin.port, protocol: "http" });
    const denied = await wrong.customers.list().catch((e: unknown) => e);
    expect(denied).toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
  });

  it("refuses parameters it does not know, naming them", async () => {
    const err = await stripe.customers
      .create({ email: "x@example.test", tax_exempt: "exempt" })
      .catch((e: unknown) => e);
    expect(err).toMatchObject({ statusCode: 400, code: "parameter_unknown", param: "tax_exempt" });
  });
});

describe("idempotency keys", () => {
  it("replays the first result for the same key and parameters", async () => {
    const key = `test-${Date.now()}`;
    const a = await stripe.customers.create({ email: "idem@example.test" }, { idempotencyKey: key });
    const b = await stripe.customers.create({ email: "idem@example.test" }, { idempotencyKey: key });
    expect(b.id).toBe(a.id);
    expect(b.lastResponse.headers["idempotent-replayed"]).toBe("true");
    const listed = await stripe.customers.list({ email: "idem@example.test" });
    expect(listed.data).toHaveLength(1);
  });

  it("refuses the same key with different parameters", async () => {
    const key = `test-diff-${Date.now()}`;
    await stripe.customers.create({ email: "one@example.test" }, { idempotencyKey: key });
    const err = await stripe.customers.create({ email: "two@example.test" }, { idempotencyKey: key }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(Stripe.errors.StripeIdempotencyError);
  });
});

describe("checkout sessions", () => {
  it("creates a subscription-mode session with a pay page, and expands line items", async () => {
    const customer = await stripe.customers.create({ email: "cs@example.test" });
    const price = (await stripe.prices.list({ lookup_keys: ["rainprint_institution_year"] })).data[0];
    const cs = await stripe.checkout.sessions.create({
      mode: "subscription",
      customer: customer.id,
      line_items: [{ price: price.id, quantity: 5 }],
      client_reference_id: "org:abc",
      metadata: { k: "v" },
      subscription_data: { metadata: { k: "v" } },
      success_url: "http://localhost:3000/done?session={CHECKOUT_SESSION_ID}",
      cancel_url: "http://localhost:3000/pricing",
    });
    expect(cs.status).toBe("open");
    expect(cs.amount_total).toBe(price.unit_amount! * 5);
    expect(cs.url).toBe(`${h.standin.url}/pay/${cs.id}`);
    const again = await stripe.checkout.sessions.retrieve(cs.id, { expand: ["line_items", "customer"] });
    expect(again.line_items?.data[0]).toMatchObject({ quantity: 5, amount_total: price.unit_amount! * 5 });
    expect(typeof again.customer === "object" && again.customer?.id).toBe(customer.id);

    const page = await fetch(cs.url!);
    const html = await page.text();
    expect(html).toContain("Local test page");
    expect(html).toContain("never enter real card details");
    expect(html).not.toMatch(/name="(card|number|cvc|cvv|exp)/i);

    const cancelled = await postForm(cs.url!, { action: "cancel" });
    expect(cancelled.status).toBe(303);
    expect(cancelled.headers.get("location")).toBe("http://localhost:3000/pricing");

    const declined = await postForm(cs.url!, { action: "pay", outcome: "decline" });
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain("declined");
    expect((await stripe.checkout.sessions.retrieve(cs.id)).status).toBe("open");

    const paid = await postForm(cs.url!, { action: "pay", outcome: "succeed" });
    expect(paid.status).toBe(303);
    expect(paid.headers.get("location")).toBe(`http://localhost:3000/done?session=${cs.id}`);
    const done = await stripe.checkout.sessions.retrieve(cs.id, { expand: ["subscription"] });
    expect(done.status).toBe("complete");
    expect(done.payment_status).toBe("paid");
    const sub = done.subscription as Stripe.Subscription;
    expect(sub.status).toBe("active");
    expect(sub.items.data[0].quantity).toBe(5);
    expect(sub.metadata).toEqual({ k: "v" });
    const invoices = await stripe.invoices.list({ subscription: sub.id });
    expect(invoices.data).toHaveLength(1);
    expect(invoices.data[0]).toMatchObject({ status: "paid", amount_paid: price.unit_amount! * 5 });
  });
});

describe("webhook signatures", () => {
  it("verify with the SDK's constructEvent; a tampered body or a stale timestamp is rejected", async () => {
    const before = h.deliveries.length;
    await stripe.customers.create({ email: "signed@example.test" });
    await h.settle();
    const d = h.deliveries.slice(before).find((x) => x.raw.includes("signed@example.test"));
    expect(d?.signature).toMatch(/^t=\d+,v1=[0-9a-f]{64}$/);
    const event = Stripe.webhooks.constructEvent(d!.raw, d!.signature!, WEBHOOK_SECRET);
    expect(event.type).toBe("customer.created");
    // The stand-in's copy of the event is the same.
    const fetched = await stripe.events.retrieve(event.id);
    expect(fetched.id).toBe(event.id);

    const tampered = d!.raw.replace("signed@example.test", "other@example.test");
    expect(() => Stripe.webhooks.constructEvent(tampered, d!.signature!, WEBHOOK_SECRET)).toThrow(
      Stripe.errors.StripeSignatureVerificationError,
    );
    expect(() => Stripe.webhooks.constructEvent(d!.raw, d!.signature!, "whsec_someone_else")).toThrow(
      Stripe.errors.StripeSignatureVerificationError,
    );
    // The same delivery replayed ten minutes later is outside the SDK's 300 s tolerance.
    expect(() =>
      Stripe.webhooks.constructEvent(d!.raw, d!.signature!, WEBHOOK_SECRET, undefined, undefined, Date.now() + 600_000),
    ).toThrow(/tolerance/);
    const old = signatureHeader(d!.raw, WEBHOOK_SECRET, Math.floor(Date.now() / 1000) - 600);
    expect(() => Stripe.webhooks.constructEvent(d!.raw, old, WEBHOOK_SECRET)).toThrow(/tolerance/);
  });

  it("match the SDK's own test header for the same timestamp", () => {
    const payload = JSON.stringify({ id: "evt_1", object: "event" });
    const t = 1_800_000_000;
    expect(signatureHeader(payload, WEBHOOK_SECRET, t)).toBe(
      Stripe.webhooks.generateTestHeaderString({ payload, secret: WEBHOOK_SECRET, timestamp: t }),
    );
  });

  it("are retried after a non-2xx answer until one succeeds", async () => {
    await h.control("/settings", { webhook_retry_delays_ms: [50, 50, 50] });
    h.forceStatus.value = 503;
    const c = await stripe.customers.create({ email: "retry@example.test" });
    await h.settle();
    h.forceStatus.value = null;
    type Ev = { id: string; type: string; delivered: boolean; deliveries: { status: number }[] };
    const find = async () =>
      (await h.control<{ data: Ev[] }>("/events?type=customer.created")).data.find((e) =>
        h.deliveries.some((d) => d.raw.includes(e.id) && d.raw.includes(c.id)),
      );
    await waitFor(async () => (await find())?.delivered === true, "the retried delivery");
    const ev = (await find())!;
    expect(ev.delivered).toBe(true);
    expect(ev.deliveries[0].status).toBe(503);
    expect(ev.deliveries.at(-1)!.status).toBe(200);
  });
});

describe("events API", () => {
  it("retrieves and lists events by type", async () => {
    const list = await stripe.events.list({ type: "customer.created", limit: 3 });
    expect(list.data.length).toBeGreaterThan(0);
    expect(list.data.every((e) => e.type === "customer.created")).toBe(true);
    const one = await stripe.events.retrieve(list.data[0].id);
    expect(one).toMatchObject({ id: list.data[0].id, object: "event", api_version: Stripe.API_VERSION });
  });
});

describe("persistence", () => {
  it("keeps customers and subscriptions across a restart", async () => {
    const file = path.join(mkdtempSync(path.join(os.tmpdir(), "rainprint-standin-")), "state.json");
    const a = await startStripeStandin({ statePath: file, apiKey: API_KEY, control: true, log: () => undefined });
    const sa = new Stripe(API_KEY, { host: "127.0.0.1", port: a.port, protocol: "http" });
    const customer = await sa.customers.create({ email: "kept@example.test" });
    const price = (await sa.prices.list({ lookup_keys: ["rainprint_researcher_month"] })).data[0];
    const cs = await sa.checkout.sessions.create({
      mode: "subscription",
      customer: customer.id,
      line_items: [{ price: price.id, quantity: 1 }],
      success_url: "http://localhost/ok",
    });
    await postForm(cs.url!, { action: "pay", outcome: "succeed" });
    const subId = (await sa.checkout.sessions.retrieve(cs.id)).subscription as string;
    await a.close();

    const b = await startStripeStandin({ statePath: file, apiKey: API_KEY, log: () => undefined });
    const sb = new Stripe(API_KEY, { host: "127.0.0.1", port: b.port, protocol: "http" });
    expect((await sb.customers.retrieve(customer.id)).id).toBe(customer.id);
    expect((await sb.subscriptions.retrieve(subId)).status).toBe("active");
    expect((await sb.subscriptions.list({ customer: customer.id })).data).toHaveLength(1);
    await b.close();
  });
});
