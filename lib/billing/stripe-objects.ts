import type Stripe from "stripe";
import type { InvoiceSummary } from "./notices";

// Small readers over Stripe objects of the SDK's API version, in one place so
// a change in Stripe's shapes is fixed once.

/** The subscription an invoice bills, if any (API 2025+: invoice.parent.subscription_details). */
export function invoiceSubscriptionId(inv: Stripe.Invoice): string | null {
  const sub = inv.parent?.subscription_details?.subscription;
  if (sub) return typeof sub === "string" ? sub : sub.id;
  for (const line of inv.lines?.data ?? []) {
    const s = line.parent?.subscription_item_details?.subscription;
    if (s) return s;
  }
  return null;
}

/** The period a subscription invoice pays for: its first line's period. */
export function summariseInvoice(inv: Stripe.Invoice): InvoiceSummary {
  const line = inv.lines?.data?.[0];
  const start = line?.period.start ?? inv.period_start;
  const end = line?.period.end ?? inv.period_end;
  return {
    id: inv.id,
    number: inv.number,
    amountCents: inv.total,
    currency: inv.currency,
    periodStart: new Date(start * 1000),
    periodEnd: new Date(end * 1000),
    hostedUrl: inv.hosted_invoice_url ?? null,
  };
}

/** A Rainprint subscription has one item: its price and quantity (seats). */
export function primaryItem(sub: Stripe.Subscription): Stripe.SubscriptionItem | null {
  return sub.items.data[0] ?? null;
}

export function customerIdOf(customer: string | { id: string } | null): string | null {
  if (!customer) return null;
  return typeof customer === "string" ? customer : customer.id;
}
