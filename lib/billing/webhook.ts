import "server-only";
import type Stripe from "stripe";
import { eq, isNull } from "drizzle-orm";
import { getDb } from "@/db";
import { billingCustomers, organizations, reviewEvents, subscriptions, users, webhookEvents } from "@/db/schema";
import { env } from "@/lib/env";
import { onBillingNotice, type BillingNotices, type DbTx, type InvoiceSummary } from "./notices";
import { ownerColumns, ownerFromColumns, ownerFromMetadata, ownerFromReference, type BillingOwner } from "./owner";
import { PAYMENT_GRACE_DAYS, PLAN_CATALOGUE, priceForLookupKey, type CataloguePrice } from "./plans";
import { getStripe } from "./stripe";
import { customerIdOf, invoiceSubscriptionId, primaryItem, summariseInvoice } from "./stripe-objects";

// Stripe webhooks → the subscriptions table.
//
// 1. The signature is verified on the raw body (stripe.webhooks.constructEvent).
// 2. Each event id is recorded in webhook_events; an id already processed is a
//    replay and changes nothing.
// 3. State follows the subscription's own status. Events may arrive in any
//    order: a subscription event older than (or as old as) the last one applied
//    is "in doubt", and the subscription is re-read from Stripe instead of
//    trusting the payload; checkout and invoice events always re-read it.
// 4. Everything an event changes — the subscription row, the customer mapping,
//    the audit entry, the notices queued through onBillingNotice and the
//    webhook_events record — is written in one transaction. If anything fails,
//    nothing is recorded and Stripe delivers the event again.
// 5. A failed payment starts a grace period of PAYMENT_GRACE_DAYS from the
//    failure; the plan applies until it ends (lib/billing/state.ts).

export const HANDLED_EVENT_TYPES = [
  "checkout.session.completed",
  "customer.subscription.created",
  "customer.subscription.updated",
  "customer.subscription.deleted",
  "invoice.paid",
  "invoice.payment_failed",
] as const;

const DAY_MS = 86_400_000;

export class WebhookSignatureError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "WebhookSignatureError";
  }
}

export type WebhookOutcome =
  | { status: "processed"; eventId: string; type: string; changed: boolean }
  | { status: "duplicate"; eventId: string; type: string }
  | { status: "ignored"; eventId: string; type: string; reason: string };

/**
 * Verify a delivery: `rawBody` exactly as received, `signature` the
 * Stripe-Signature header. Throws WebhookSignatureError when it does not verify.
 */
export function verifyStripeEvent(
  rawBody: string,
  signature: string | null,
  opts: { toleranceSeconds?: number } = {},
): Stripe.Event {
  if (!signature) throw new WebhookSignatureError("The Stripe-Signature header is missing.");
  try {
    return getStripe().webhooks.constructEvent(rawBody, signature, env().STRIPE_WEBHOOK_SECRET, opts.toleranceSeconds);
  } catch (e) {
    throw new WebhookSignatureError((e as Error).message);
  }
}

/** Verify and process one delivery (the route handler's whole job). */
export async function handleStripeWebhook(rawBody: string, signature: string | null): Promise<WebhookOutcome> {
  return processStripeEvent(verifyStripeEvent(rawBody, signature));
}

type SubscriptionRowFull = typeof subscriptions.$inferSelect;

interface Work {
  sub: Stripe.Subscription;
  /** Read from Stripe just now (always applied) rather than taken from the event payload. */
  fresh: boolean;
  owner: BillingOwner;
  price: CataloguePrice;
  invoice?: { kind: "paid" | "failed"; summary: InvoiceSummary; nextAttemptAt: Date | null };
}

type Prepared = { ignore: string } | { work: Work };

async function findRow(stripeSubscriptionId: string): Promise<SubscriptionRowFull | undefined> {
  return getDb().select().from(subscriptions).where(eq(subscriptions.stripeSubscriptionId, stripeSubscriptionId)).get();
}

async function ownerExists(owner: BillingOwner): Promise<boolean> {
  const db = getDb();
  const row =
    owner.kind === "user"
      ? await db.select({ id: users.id }).from(users).where(eq(users.id, owner.userId)).get()
      : await db.select({ id: organizations.id }).from(organizations).where(eq(organizations.id, owner.organizationId)).get();
  return Boolean(row);
}

/** Who holds a subscription: our row, its metadata, the checkout's reference, our customer map, the customer's metadata. */
async function resolveOwner(
  sub: Stripe.Subscription,
  row: SubscriptionRowFull | undefined,
  hint: BillingOwner | null,
): Promise<BillingOwner | null> {
  const fromRow = row ? ownerFromColumns(row) : null;
  if (fromRow) return fromRow;
  const fromMeta = ownerFromMetadata(sub.metadata) ?? hint;
  if (fromMeta) return fromMeta;
  const customerId = customerIdOf(sub.customer);
  if (!customerId) return null;
  const mapped = await getDb().select().from(billingCustomers).where(eq(billingCustomers.stripeCustomerId, customerId)).get();
  const fromMap = mapped ? ownerFromColumns(mapped) : null;
  if (fromMap) return fromMap;
  const customer = await getStripe().customers.retrieve(customerId);
  return "deleted" in customer && customer.deleted ? null : ownerFromMetadata((customer as Stripe.Customer).metadata);
}

/** Everything that needs Stripe or reads outside the transaction. */
async function prepare(event: Stripe.Event): Promise<Prepared> {
  const stripe = getStripe();
  let sub: Stripe.Subscription;
  let fresh = true;
  let hint: BillingOwner | null = null;
  let invoice: Work["invoice"];
  switch (event.type) {
    case "customer.subscription.created":
    case "customer.subscription.updated":
    case "customer.subscription.deleted": {
      const payload = event.data.object;
      const row = await findRow(payload.id);
      const inDoubt = row?.lastEventAt != null && event.created <= row.lastEventAt;
      sub = inDoubt ? await stripe.subscriptions.retrieve(payload.id) : payload;
      fresh = inDoubt;
      break;
    }
    case "checkout.session.completed": {
      const session = event.data.object;
      if (session.mode !== "subscription" || !session.subscription) return { ignore: "not a subscription checkout" };
      const id = typeof session.subscription === "string" ? session.subscription : session.subscription.id;
      sub = await stripe.subscriptions.retrieve(id);
      hint = ownerFromReference(session.client_reference_id) ?? ownerFromMetadata(session.metadata);
      break;
    }
    case "invoice.paid":
    case "invoice.payment_failed": {
      const inv = event.data.object;
      const id = invoiceSubscriptionId(inv);
      if (!id) return { ignore: "invoice without a subscription" };
      sub = await stripe.subscriptions.retrieve(id);
      invoice = {
        kind: event.type === "invoice.paid" ? "paid" : "failed",
        summary: summariseInvoice(inv),
        nextAttemptAt: inv.next_payment_attempt ? new Date(inv.next_payment_attempt * 1000) : null,
      };
      break;
    }
    default:
      return { ignore: `event type ${event.type} is not used` };
  }
  const item = primaryItem(sub);
  const price = priceForLookupKey(item?.price.lookup_key);
  if (!item || !price) return { ignore: `subscription ${sub.id} has no price from the plan catalogue` };
  const row = await findRow(sub.id);
  const owner = await resolveOwner(sub, row, hint);
  if (!owner) return { ignore: `no Rainprint owner found for subscription ${sub.id}` };
  if (!row && !(await ownerExists(owner))) return { ignore: `the owner of subscription ${sub.id} no longer exists` };
  const holder = owner.kind === "user" ? "person" : "organization";
  if (PLAN_CATALOGUE[price.plan].holder !== holder)
    return { ignore: `subscription ${sub.id}: ${price.plan} cannot be held by a ${holder}` };
  return { work: { sub, fresh, owner, price, invoice } };
}

/** Record the event id; false when it was already processed (a replay). */
async function claim(tx: DbTx, event: Stripe.Event, note: string | null): Promise<boolean> {
  const now = new Date();
  const claimed = await tx
    .insert(webhookEvents)
    .values({ id: event.id, type: event.type, receivedAt: now, processedAt: now, error: note })
    .onConflictDoUpdate({
      target: webhookEvents.id,
      set: { processedAt: now, error: note },
      setWhere: isNull(webhookEvents.processedAt),
    })
    .returning({ id: webhookEvents.id });
  return claimed.length > 0;
}

const ENTITLED = new Set(["active", "trialing", "past_due"]);

type Tracked = Pick<SubscriptionRowFull, "plan" | "interval" | "status" | "seats" | "cancelAtPeriodEnd" | "graceUntil">;
const tracked = (r: Tracked) => ({
  plan: r.plan,
  interval: r.interval,
  status: r.status,
  seats: r.seats,
  cancelAtPeriodEnd: r.cancelAtPeriodEnd,
  graceUntil: r.graceUntil?.toISOString() ?? null,
});

async function apply(tx: DbTx, event: Stripe.Event, w: Work): Promise<boolean> {
  const { sub, owner, price } = w;
  const row = await tx.select().from(subscriptions).where(eq(subscriptions.stripeSubscriptionId, sub.id)).get();
  if (row && !w.fresh && row.lastEventAt != null && event.created < row.lastEventAt) return false; // stale payload
  const item = primaryItem(sub)!;
  const customerId = customerIdOf(sub.customer)!;
  const eventMs = event.created * 1000;
  const status = sub.status;

  // Grace: starts at the first failure, ends when the subscription is healthy again.
  let graceUntil = row?.graceUntil ?? null;
  if (status === "active" || status === "trialing") graceUntil = null;
  else if (status === "past_due" && !graceUntil) graceUntil = new Date(eventMs + PAYMENT_GRACE_DAYS * DAY_MS);

  const values = {
    ...ownerColumns(owner),
    plan: price.plan,
    interval: price.interval,
    status,
    stripeCustomerId: customerId,
    stripeSubscriptionId: sub.id,
    stripePriceId: item.price.id,
    seats: item.quantity ?? 1,
    currentPeriodEnd: new Date(item.current_period_end * 1000),
    cancelAtPeriodEnd: sub.cancel_at_period_end || (sub.cancel_at !== null && status !== "canceled"),
    graceUntil,
    lastEventAt: Math.max(row?.lastEventAt ?? 0, event.created),
    updatedAt: new Date(),
  };
  let id: string;
  if (row) {
    id = row.id;
    await tx.update(subscriptions).set(values).where(eq(subscriptions.id, row.id));
  } else {
    const inserted = await tx.insert(subscriptions).values(values).returning({ id: subscriptions.id });
    id = inserted[0].id;
  }
  await tx.insert(billingCustomers).values({ stripeCustomerId: customerId, ...ownerColumns(owner) }).onConflictDoNothing();

  const before = row ? tracked(row) : null;
  const after = tracked(values);
  const changed = JSON.stringify(before) !== JSON.stringify(after);
  if (changed)
    await tx.insert(reviewEvents).values({
      entityType: "subscription",
      entityId: id,
      action: `stripe:${event.type}`,
      before,
      after,
      reason: `Stripe event ${event.id}`,
    });

  // Notices, from what changed (so replays and re-reads never repeat one).
  const common = {
    owner,
    plan: price.plan,
    interval: price.interval,
    seats: values.seats,
    stripeCustomerId: customerId,
    stripeSubscriptionId: sub.id,
    eventId: event.id,
  };
  const notify = <K extends keyof BillingNotices>(kind: K, data: BillingNotices[K]) => onBillingNotice(kind, data, { tx });
  const renewsAt = values.cancelAtPeriodEnd || status === "canceled" ? null : values.currentPeriodEnd;
  if (!row) {
    if (ENTITLED.has(status)) await notify("subscription-started", { ...common, renewsAt });
  } else {
    if (row.plan !== values.plan || row.interval !== values.interval || row.seats !== values.seats)
      await notify("plan-changed", { ...common, before: { plan: row.plan, interval: row.interval, seats: row.seats } });
    if (status !== "canceled" && !row.cancelAtPeriodEnd && values.cancelAtPeriodEnd)
      await notify("cancellation-scheduled", { ...common, endsAt: values.currentPeriodEnd });
    if (status !== "canceled" && row.cancelAtPeriodEnd && !values.cancelAtPeriodEnd)
      await notify("cancellation-withdrawn", { ...common, renewsAt });
  }
  if (row && row.status !== "canceled" && status === "canceled") {
    const reason = sub.cancellation_details?.reason;
    await notify("subscription-ended", {
      ...common,
      reason: reason === "payment_failed" ? "payment-failed" : reason === "cancellation_requested" ? "cancelled" : "other",
    });
  }
  if (w.invoice?.kind === "paid") await notify("payment-received", { ...common, invoice: w.invoice.summary });
  if (w.invoice?.kind === "failed") {
    // The grace period is counted from the first failure even if the subscription is not (yet) past due.
    const grace = values.graceUntil ?? new Date(eventMs + PAYMENT_GRACE_DAYS * DAY_MS);
    await notify("payment-failed", { ...common, invoice: w.invoice.summary, graceUntil: grace, nextAttemptAt: w.invoice.nextAttemptAt });
  }
  return changed;
}

/** Apply one verified event (exported for tests and for re-processing tools). */
export async function processStripeEvent(event: Stripe.Event): Promise<WebhookOutcome> {
  const db = getDb();
  const base = { eventId: event.id, type: event.type };
  const seen = await db.select().from(webhookEvents).where(eq(webhookEvents.id, event.id)).get();
  if (seen?.processedAt) return { status: "duplicate", ...base };
  try {
    const prepared = await prepare(event);
    return await db.transaction(async (tx): Promise<WebhookOutcome> => {
      if ("ignore" in prepared) {
        if (!(await claim(tx, event, `ignored: ${prepared.ignore}`))) return { status: "duplicate", ...base };
        return { status: "ignored", ...base, reason: prepared.ignore };
      }
      if (!(await claim(tx, event, null))) return { status: "duplicate", ...base };
      const changed = await apply(tx, event, prepared.work);
      return { status: "processed", ...base, changed };
    });
  } catch (e) {
    // Keep a trace of the failure; processedAt stays empty so a redelivery is processed.
    const message = (e as Error).message.slice(0, 2000);
    await db
      .insert(webhookEvents)
      .values({ id: event.id, type: event.type, error: message })
      .onConflictDoUpdate({ target: webhookEvents.id, set: { error: message }, setWhere: isNull(webhookEvents.processedAt) })
      .catch(() => undefined);
    throw e;
  }
}
