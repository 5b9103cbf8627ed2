import "server-only";
import { and, eq, notInArray } from "drizzle-orm";
import { getDb } from "@/db";
import { billingCustomers, subscriptions } from "@/db/schema";
import { BillingError } from "./errors";
import type { InvoiceSummary } from "./notices";
import { ownerColumns, ownerMetadata, ownerReference, type BillingOwner } from "./owner";
import { PLAN_CATALOGUE, type BillingInterval, type Plan } from "./plans";
import { stripePriceFor } from "./prices";
import { getStripe } from "./stripe";
import { summariseInvoice } from "./stripe-objects";

// The Stripe calls behind the billing page's buttons: Checkout to subscribe,
// the billing portal to change or cancel, invoices to list. These functions
// trust their caller to have authorised `owner` (the route or server action
// does that through lib/auth); they never see card data.

/** Subscription statuses that block a second Checkout for the same holder. */
const ENDED = ["canceled", "incomplete_expired"];

function ownerWhere(table: typeof subscriptions | typeof billingCustomers, owner: BillingOwner) {
  return owner.kind === "user" ? eq(table.userId, owner.userId) : eq(table.organizationId, owner.organizationId);
}

/** The holder's Stripe customer id, if one was made. */
export async function stripeCustomerFor(owner: BillingOwner): Promise<string | null> {
  const row = await getDb()
    .select({ id: billingCustomers.stripeCustomerId })
    .from(billingCustomers)
    .where(ownerWhere(billingCustomers, owner))
    .orderBy(billingCustomers.createdAt)
    .get();
  return row?.id ?? null;
}

/**
 * The holder's Stripe customer, created on first use with the owner in its
 * metadata. The idempotency key makes two simultaneous first clicks create one customer.
 */
export async function ensureStripeCustomer(owner: BillingOwner, contact: { email: string; name?: string | null }): Promise<string> {
  const existing = await stripeCustomerFor(owner);
  if (existing) return existing;
  const customer = await getStripe().customers.create(
    { email: contact.email, name: contact.name ?? undefined, metadata: ownerMetadata(owner) },
    { idempotencyKey: `rainprint-customer-${ownerReference(owner)}` },
  );
  await getDb()
    .insert(billingCustomers)
    .values({ stripeCustomerId: customer.id, ...ownerColumns(owner) })
    .onConflictDoNothing();
  return customer.id;
}

export interface CheckoutInput {
  owner: BillingOwner;
  /** Who receives Stripe's e-mails for this customer (the person, or the organisation's owner). */
  contact: { email: string; name?: string | null };
  plan: Exclude<Plan, "open">;
  interval: BillingInterval;
  /** Institution seats (ignored for Researcher). */
  seats?: number;
  /** Absolute URLs; `{CHECKOUT_SESSION_ID}` in successUrl is replaced by the session id. */
  successUrl: string;
  cancelUrl: string;
}

/** Start Stripe Checkout for a plan; returns the URL to send the browser to. */
export async function startCheckout(input: CheckoutInput): Promise<{ sessionId: string; url: string }> {
  const spec = PLAN_CATALOGUE[input.plan];
  const holder = input.owner.kind === "user" ? "person" : "organization";
  if (spec.holder !== holder)
    throw new BillingError(
      "wrong-holder",
      spec.holder === "organization"
        ? `${spec.name} is bought for an organisation. Create or choose an organisation first.`
        : `${spec.name} is bought by one person, not an organisation.`,
      400,
      true,
    );
  let seats = 1;
  if (spec.seats) {
    seats = input.seats ?? spec.seats.minSeats;
    if (!Number.isInteger(seats) || seats < spec.seats.minSeats || seats > spec.seats.maxSeats)
      throw new BillingError(
        "invalid-seats",
        `Choose between ${spec.seats.minSeats} and ${spec.seats.maxSeats} seats.`,
        400,
        true,
      );
  }
  const live = await getDb()
    .select({ id: subscriptions.id })
    .from(subscriptions)
    .where(and(ownerWhere(subscriptions, input.owner), notInArray(subscriptions.status, ENDED)))
    .get();
  if (live)
    throw new BillingError(
      "already-subscribed",
      "There is already a subscription here. Change or cancel it under Manage billing.",
      409,
      true,
    );
  const price = await stripePriceFor(input.plan, input.interval);
  const customer = await ensureStripeCustomer(input.owner, input.contact);
  const metadata = { ...ownerMetadata(input.owner), rainprint_plan: input.plan, rainprint_interval: input.interval };
  const session = await getStripe().checkout.sessions.create({
    mode: "subscription",
    customer,
    client_reference_id: ownerReference(input.owner),
    line_items: [{ price: price.stripePriceId, quantity: seats }],
    metadata,
    subscription_data: { metadata },
    success_url: input.successUrl,
    cancel_url: input.cancelUrl,
  });
  if (!session.url) throw new BillingError("payments-unavailable", "Stripe returned a Checkout session without a URL", 502, false);
  return { sessionId: session.id, url: session.url };
}

/** Open the Stripe billing portal for the holder; returns its URL. */
export async function openBillingPortal(owner: BillingOwner, returnUrl: string): Promise<{ url: string }> {
  const customer = await stripeCustomerFor(owner);
  if (!customer)
    throw new BillingError("no-billing-account", "There is nothing to manage yet: no plan has been bought here.", 404, true);
  const session = await getStripe().billingPortal.sessions.create({ customer, return_url: returnUrl });
  return { url: session.url };
}

export interface InvoiceListItem extends InvoiceSummary {
  created: Date;
  status: "paid" | "open" | "void" | "uncollectible" | "draft" | "other";
}

const INVOICE_STATUSES = ["paid", "open", "void", "uncollectible", "draft"] as const;
function invoiceStatus(s: string | null): InvoiceListItem["status"] {
  return (INVOICE_STATUSES as readonly string[]).includes(s ?? "") ? (s as (typeof INVOICE_STATUSES)[number]) : "other";
}

/** The holder's invoices, newest first, straight from Stripe (for the billing page). */
export async function listInvoices(owner: BillingOwner, limit = 24): Promise<InvoiceListItem[]> {
  const customer = await stripeCustomerFor(owner);
  if (!customer) return [];
  const page = await getStripe().invoices.list({ customer, limit });
  return page.data.map((inv) => ({
    ...summariseInvoice(inv),
    created: new Date(inv.created * 1000),
    status: invoiceStatus(inv.status),
  }));
}
