import "server-only";
import type Stripe from "stripe";
import { BillingError } from "./errors";
import { cataloguePrice, cataloguePrices, type BillingInterval, type CataloguePrice, type Plan } from "./plans";
import { getStripe } from "./stripe";

// The catalogue's prices as they exist in Stripe, found by lookup key. A price
// that is missing, or whose amount, currency or interval differs from the
// catalogue, is refused: the pricing page must never promise one amount while
// Checkout charges another.

export interface StripeCataloguePrice extends CataloguePrice {
  stripePriceId: string;
}

const CACHE_MS = 5 * 60_000;
let cache: { at: number; prices: Map<string, StripeCataloguePrice> } | null = null;

function check(expected: CataloguePrice, p: Stripe.Price): void {
  const problems: string[] = [];
  if (p.unit_amount !== expected.unitAmountCents) problems.push(`amount ${p.unit_amount} ≠ ${expected.unitAmountCents}`);
  if (p.currency !== expected.currency) problems.push(`currency ${p.currency} ≠ ${expected.currency}`);
  if (p.recurring?.interval !== expected.interval || p.recurring.interval_count !== 1)
    problems.push(`interval ${p.recurring?.interval_count ?? "?"} ${p.recurring?.interval ?? "none"} ≠ 1 ${expected.interval}`);
  if (problems.length)
    throw new BillingError(
      "price-mismatch",
      `Stripe price ${p.id} (${expected.lookupKey}) does not match the plan catalogue: ${problems.join("; ")}`,
      503,
      false,
    );
}

/** Every catalogue price with its Stripe id (cached for five minutes). */
export async function loadCataloguePrices(opts: { fresh?: boolean } = {}): Promise<Map<string, StripeCataloguePrice>> {
  if (!opts.fresh && cache && Date.now() - cache.at < CACHE_MS) return cache.prices;
  const wanted = cataloguePrices();
  const found = await getStripe().prices.list({ lookup_keys: wanted.map((p) => p.lookupKey), active: true, limit: 100 });
  const prices = new Map<string, StripeCataloguePrice>();
  for (const expected of wanted) {
    const p = found.data.find((x) => x.lookup_key === expected.lookupKey);
    if (!p)
      throw new BillingError("price-missing", `No active Stripe price has the lookup key ${expected.lookupKey}`, 503, false);
    check(expected, p);
    prices.set(expected.lookupKey, { ...expected, stripePriceId: p.id });
  }
  cache = { at: Date.now(), prices };
  return prices;
}

export async function stripePriceFor(plan: Exclude<Plan, "open">, interval: BillingInterval): Promise<StripeCataloguePrice> {
  const key = cataloguePrice(plan, interval).lookupKey;
  const p = (await loadCataloguePrices()).get(key);
  if (!p) throw new BillingError("price-missing", `No Stripe price for ${key}`, 503, false);
  return p;
}

export function clearPriceCache(): void {
  cache = null;
}
