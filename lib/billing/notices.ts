import "server-only";
import type { Db } from "@/db";
import type { BillingInterval, Plan } from "./plans";
import type { BillingOwner } from "./owner";

// Billing notices: what the webhook handler tells the people concerned about
// (receipts, plan changes, failed payments, endings). The handler calls
// onBillingNotice(kind, data, { tx }) inside the same transaction that records
// the Stripe event, so a notice is queued exactly once per event: if the
// handler throws, the event is not recorded and Stripe delivers it again.
// lib/mail wires itself in with setBillingNoticeHandler (it should queue the
// e-mail in `tx`, not send it inline).

export type DbTx = Parameters<Parameters<Db["transaction"]>[0]>[0];

interface Common {
  owner: BillingOwner;
  plan: Exclude<Plan, "open">;
  interval: BillingInterval;
  seats: number;
  stripeCustomerId: string;
  stripeSubscriptionId: string;
  /** The Stripe event that caused the notice. */
  eventId: string;
}

export interface InvoiceSummary {
  id: string;
  number: string | null;
  /** Minor units (cents). */
  amountCents: number;
  currency: string;
  periodStart: Date;
  periodEnd: Date;
  hostedUrl: string | null;
}

export interface BillingNotices {
  /** A new subscription is active (after Checkout). */
  "subscription-started": Common & { renewsAt: Date | null };
  /** A payment went through: a receipt. */
  "payment-received": Common & { invoice: InvoiceSummary };
  /** Plan, interval or seats changed. */
  "plan-changed": Common & { before: { plan: Plan; interval: BillingInterval; seats: number } };
  /** Set to end at the period end (portal "cancel"). */
  "cancellation-scheduled": Common & { endsAt: Date | null };
  /** A scheduled cancellation was withdrawn. */
  "cancellation-withdrawn": Common & { renewsAt: Date | null };
  /** A payment failed: the plan keeps working until graceUntil. */
  "payment-failed": Common & { invoice: InvoiceSummary; graceUntil: Date; nextAttemptAt: Date | null };
  /** The subscription ended (after cancellation or failed payments): the account is on Open. */
  "subscription-ended": Common & { reason: "cancelled" | "payment-failed" | "other" };
}

export type BillingNoticeKind = keyof BillingNotices;

export type BillingNoticeHandler = <K extends BillingNoticeKind>(
  kind: K,
  data: BillingNotices[K],
  ctx: { tx: DbTx },
) => Promise<void> | void;

let handler: BillingNoticeHandler | null = null;

/** Install the handler (lib/mail); returns a function that removes it. */
export function setBillingNoticeHandler(h: BillingNoticeHandler | null): () => void {
  handler = h;
  return () => {
    if (handler === h) handler = null;
  };
}

/** Called by the webhook handler; a no-op until a handler is installed. */
export async function onBillingNotice<K extends BillingNoticeKind>(
  kind: K,
  data: BillingNotices[K],
  ctx: { tx: DbTx },
): Promise<void> {
  if (handler) await handler(kind, data, ctx);
}
