// The payments stand-in and the app's webhook route as the deployment runs
// them: separate processes, real HTTP, the production build.
import Stripe from "stripe";
import { describe, expect, inject, it } from "vitest";

interface ControlEvent {
  id: string;
  type: string;
  delivered: boolean;
  deliveries: { status: number | null }[];
}

describe("Stripe webhooks in the running app", () => {
  const env = inject("env");
  const stripeUrl = new URL(inject("stripeUrl"));
  const stripe = new Stripe(env.STRIPE_SECRET_KEY, {
    host: stripeUrl.hostname,
    port: Number(stripeUrl.port),
    protocol: "http",
  });

  it("refuses an unsigned or badly signed delivery with 400 problem+json", async () => {
    const body = JSON.stringify({ id: "evt_forged", object: "event", type: "customer.subscription.created" });
    for (const signature of [null, "t=1,v1=00"]) {
      const res = await fetch(`${inject("baseUrl")}/api/stripe/webhook`, {
        method: "POST",
        headers: { "Content-Type": "application/json", ...(signature ? { "Stripe-Signature": signature } : {}) },
        body,
      });
      expect(res.status).toBe(400);
      expect(res.headers.get("content-type")).toContain("application/problem+json");
      expect(await res.json()).toMatchObject({ type: "/problems/stripe-signature", status: 400 });
    }
  });

  it("accepts the stand-in's signed deliveries", async () => {
    const customer = await stripe.customers.create({ email: "e2e-webhook@example.test" });
    const res = await fetch(`${stripeUrl.origin}/_standin/events?type=customer.created`);
    const { data } = (await res.json()) as { data: ControlEvent[] };
    const ev = (await stripe.events.list({ type: "customer.created", limit: 10 })).data.find(
      (e) => (e.data.object as Stripe.Customer).id === customer.id,
    )!;
    const delivered = data.find((e) => e.id === ev.id)!;
    expect(delivered.delivered).toBe(true);
    expect(delivered.deliveries.at(-1)!.status).toBe(200);
  });
});
