import "server-only";
import Stripe from "stripe";
import { env } from "@/lib/env";

// The one Stripe client. With STRIPE_API_BASE set (development and tests) the
// SDK talks to the local payments stand-in at that address; unset, it talks to
// Stripe itself with STRIPE_SECRET_KEY. Created on first use, so importing this
// module never needs a key.

/** SDK options for an API base URL (scheme, host and port; a path is not supported). */
export function stripeConfigFor(apiBase: string | undefined): Stripe.StripeConfig {
  const config: Stripe.StripeConfig = {
    maxNetworkRetries: 2,
    timeout: 20_000,
    appInfo: { name: "Rainprint" },
  };
  if (!apiBase) return config;
  const url = new URL(apiBase);
  if (url.pathname !== "/" && url.pathname !== "")
    throw new Error(`STRIPE_API_BASE must be scheme://host:port without a path, got ${apiBase}`);
  const protocol = url.protocol === "https:" ? "https" : url.protocol === "http:" ? "http" : null;
  if (!protocol) throw new Error(`STRIPE_API_BASE must be http or https, got ${apiBase}`);
  return {
    ...config,
    host: url.hostname,
    port: url.port ? Number(url.port) : protocol === "https" ? 443 : 80,
    protocol,
  };
}

let client: Stripe | undefined;

export function getStripe(): Stripe {
  if (!client) {
    const e = env();
    client = new Stripe(e.STRIPE_SECRET_KEY, stripeConfigFor(e.STRIPE_API_BASE));
  }
  return client;
}

/** Whether the app is talking to the local stand-in rather than Stripe. */
export function usingPaymentsStandin(): boolean {
  return Boolean(env().STRIPE_API_BASE);
}

/** Forget the client (tests that change the environment). */
export function resetStripeClient(): void {
  client = undefined;
}
