// The stand-in's business rules: customers, checkout, subscriptions with
// renewals, invoices with payment attempts and dunning retries, the simulated
// clock, and the events each change emits. The HTTP layer (server.ts) and the
// test pages (pages.ts) only call into here.
import Stripe from "stripe";
import { randomInt } from "node:crypto";
import { StripeApiError } from "./form";
import {
  renderCheckoutSession,
  renderCustomer,
  renderInvoice,
  renderSubscription,
  priceOf,
  subscriptionPeriod,
  type Catalogue,
  type RenderCtx,
} from "./render";
import {
  MAX_EVENTS,
  newId,
  periodBounds,
  type CheckoutRec,
  type CustomerRec,
  type EventRec,
  type InvoiceRec,
  type StandinState,
  type SubscriptionRec,
} from "./store";

const DAY_S = 86_400;

/** The events this stand-in emits, as the SDK types them. */
export type EmittedEvent =
  | Stripe.CustomerCreatedEvent
  | Stripe.CustomerUpdatedEvent
  | Stripe.CheckoutSessionCompletedEvent
  | Stripe.CustomerSubscriptionCreatedEvent
  | Stripe.CustomerSubscriptionUpdatedEvent
  | Stripe.CustomerSubscriptionDeletedEvent
  | Stripe.InvoicePaidEvent
  | Stripe.InvoicePaymentSucceededEvent
  | Stripe.InvoicePaymentFailedEvent;

/** Which API request caused the next events (Stripe's `event.request`). */
export interface RequestInfo {
  id: string;
  idempotencyKey: string | null;
}

function changed<T extends object>(before: T, after: T): Partial<T> {
  const out: Partial<T> = {};
  for (const k of Object.keys(after) as (keyof T)[])
    if (JSON.stringify(before[k]) !== JSON.stringify(after[k])) out[k] = before[k];
  return out;
}

export class Engine {
  /** Set by the HTTP layer while it handles an API request. */
  currentRequest: RequestInfo | null = null;

  constructor(
    public state: StandinState,
    readonly catalogue: Catalogue,
    public baseUrl: string,
    private readonly hooks: { onEvent: (ev: EventRec) => void; hasWebhook: boolean },
  ) {}

  ctx(): RenderCtx {
    return { state: this.state, catalogue: this.catalogue, baseUrl: this.baseUrl };
  }

  /** The simulated clock in Unix seconds (wall clock + the offset tests advanced it by). */
  now(): number {
    return Math.floor((Date.now() + this.state.clockOffsetMs) / 1000);
  }

  private setClock(unixSeconds: number): void {
    // Never move backwards: the clock only advances.
    const target = Math.max(unixSeconds * 1000, Date.now() + this.state.clockOffsetMs);
    this.state.clockOffsetMs = target - Date.now();
  }

  // ───────────────────────────── events ─────────────────────────────

  emit<E extends EmittedEvent>(
    type: E["type"],
    object: E["data"]["object"],
    previous?: E["data"]["previous_attributes"],
  ): EventRec {
    const created = this.now();
    const event = {
      id: newId("evt"),
      object: "event",
      api_version: Stripe.API_VERSION,
      created,
      data: previous && Object.keys(previous).length ? { object, previous_attributes: previous } : { object },
      livemode: false,
      pending_webhooks: this.hooks.hasWebhook ? 1 : 0,
      request: this.currentRequest
        ? { id: this.currentRequest.id, idempotency_key: this.currentRequest.idempotencyKey }
        : { id: null, idempotency_key: null },
      type,
    } as E;
    const rec: EventRec = {
      id: event.id,
      type,
      created,
      payload: JSON.stringify(event, null, 2),
      deliveries: [],
      held: false,
      delivered: false,
    };
    this.state.events.push(rec);
    if (this.state.events.length > MAX_EVENTS) this.state.events.splice(0, this.state.events.length - MAX_EVENTS);
    this.hooks.onEvent(rec);
    return rec;
  }

  // ───────────────────────────── customers ─────────────────────────────

  customer(id: string): CustomerRec {
    const c = this.state.customers[id];
    if (!c) throw new StripeApiError(404, "invalid_request_error", `No such customer: '${id}'`, "resource_missing", "id");
    return c;
  }

  createCustomer(input: { email?: string; name?: string; description?: string; metadata?: Record<string, string> }) {
    const c: CustomerRec = {
      id: newId("cus"),
      created: this.now(),
      email: input.email ?? null,
      name: input.name ?? null,
      description: input.description ?? null,
      metadata: input.metadata ?? {},
      paymentMethod: null,
    };
    this.state.customers[c.id] = c;
    this.emit<Stripe.CustomerCreatedEvent>("customer.created", renderCustomer(c));
    return c;
  }

  updateCustomer(c: CustomerRec, change: (c: CustomerRec) => void): CustomerRec {
    const before = renderCustomer(c);
    change(c);
    const after = renderCustomer(c);
    const prev = changed(before, after);
    if (Object.keys(prev).length) this.emit<Stripe.CustomerUpdatedEvent>("customer.updated", after, prev);
    return c;
  }

  // ───────────────────────────── payments ─────────────────────────────

  /** One payment attempt on the customer's (fake) card, honouring the decline rules. */
  private charge(customerId: string): { ok: true } | { ok: false; message: string } {
    const i = this.state.declines.findIndex((r) => r.customer === customerId || r.customer === null);
    if (i < 0) return { ok: true };
    const rule = this.state.declines[i];
    if (rule.remaining !== "always") {
      rule.remaining -= 1;
      if (rule.remaining <= 0) this.state.declines.splice(i, 1);
    }
    return { ok: false, message: "Your card was declined. (Test decline set through the stand-in's control API.)" };
  }

  private newInvoice(sub: SubscriptionRec, reason: InvoiceRec["billingReason"]): InvoiceRec {
    const price = priceOf(this.ctx(), sub.price);
    const period = subscriptionPeriod(this.ctx(), sub);
    const product = this.catalogue.products.get(price.product);
    this.state.invoiceSeq += 1;
    const now = this.now();
    // Stripe's invoice.period_* is the usage period before the invoice: the
    // period just ended for a renewal, the creation instant otherwise. The
    // period paid for is on the line.
    const usage =
      reason === "subscription_cycle"
        ? periodBounds({ anchor: sub.anchor, cycle: sub.cycle - 1 }, price.interval)
        : { start: now, end: now };
    const inv: InvoiceRec = {
      id: newId("in"),
      number: `RPS-${String(this.state.invoiceSeq).padStart(5, "0")}`,
      customer: sub.customer,
      subscription: sub.id,
      subscriptionMetadata: { ...sub.metadata },
      created: now,
      billingReason: reason,
      currency: price.currency,
      lines: [
        {
          id: newId("il"),
          price: price.id,
          quantity: sub.quantity,
          amount: price.unitAmount * sub.quantity,
          periodStart: period.start,
          periodEnd: period.end,
          description: `${sub.quantity} × ${product?.name ?? price.nickname} (${price.interval === "month" ? "monthly" : "yearly"})`,
        },
      ],
      periodStart: usage.start,
      periodEnd: usage.end,
      status: "open",
      attemptCount: 0,
      nextPaymentAttempt: null,
      paidAt: null,
      finalizedAt: now,
    };
    this.state.invoices[inv.id] = inv;
    sub.latestInvoice = inv.id;
    return inv;
  }

  /** Attempt to collect an open invoice; emits invoice.paid/payment_succeeded or payment_failed. */
  private attemptInvoice(inv: InvoiceRec): boolean {
    const result = this.charge(inv.customer);
    inv.attemptCount += 1;
    if (result.ok) {
      inv.status = "paid";
      inv.paidAt = this.now();
      inv.nextPaymentAttempt = null;
      const rendered = renderInvoice(this.ctx(), inv);
      this.emit<Stripe.InvoicePaidEvent>("invoice.paid", rendered);
      this.emit<Stripe.InvoicePaymentSucceededEvent>("invoice.payment_succeeded", rendered);
      return true;
    }
    const retries = this.state.settings.dunningRetryDays;
    const wait = retries[inv.attemptCount - 1];
    inv.nextPaymentAttempt = wait === undefined ? null : this.now() + Math.round(wait * DAY_S);
    this.emit<Stripe.InvoicePaymentFailedEvent>("invoice.payment_failed", renderInvoice(this.ctx(), inv));
    return false;
  }

  // ───────────────────────────── checkout ─────────────────────────────

  checkout(id: string): CheckoutRec {
    const cs = this.state.checkoutSessions[id];
    if (!cs) throw new StripeApiError(404, "invalid_request_error", `No such checkout.session: '${id}'`, "resource_missing", "session");
    return cs;
  }

  /**
   * The pay page's "Pay" button (`forceDecline`: the page's "be declined" choice). On success: customer (if new), subscription,
   * paid first invoice, and events customer.subscription.created, invoice.paid,
   * invoice.payment_succeeded, checkout.session.completed. On a decline the
   * session stays open and nothing else changes.
   */
  payCheckout(cs: CheckoutRec, forceDecline = false): { ok: true; redirect: string } | { ok: false; message: string } {
    if (cs.status !== "open") return { ok: false, message: `This checkout is ${cs.status}.` };
    if (this.now() >= cs.expiresAt) {
      cs.status = "expired";
      return { ok: false, message: "This checkout has expired." };
    }
    const customer = cs.customer ? this.customer(cs.customer) : null;
    const decision = forceDecline
      ? { ok: false as const, message: "The test card was declined, as chosen on this page." }
      : this.charge(customer?.id ?? "(new customer)");
    if (!decision.ok) {
      cs.lastDecline = decision.message;
      return { ok: false, message: decision.message };
    }
    const c = customer ?? this.createCustomer({ email: cs.customerEmail ?? undefined });
    cs.customer = c.id;
    if (!c.paymentMethod)
      this.updateCustomer(c, (x) => {
        x.paymentMethod = { id: newId("pm"), last4: String(randomInt(0, 10_000)).padStart(4, "0") };
      });
    const line = cs.lines[0];
    const now = this.now();
    const sub: SubscriptionRec = {
      id: newId("sub"),
      customer: c.id,
      created: now,
      itemId: newId("si"),
      itemCreated: now,
      price: line.price,
      quantity: line.quantity,
      status: "active",
      anchor: now,
      cycle: 0,
      cancelAtPeriodEnd: false,
      canceledAt: null,
      endedAt: null,
      cancellationReason: null,
      latestInvoice: null,
      metadata: { ...cs.subscriptionMetadata },
    };
    this.state.subscriptions[sub.id] = sub;
    const inv = this.newInvoice(sub, "subscription_create");
    // The checkout payment is the first invoice's payment: mark it paid directly.
    inv.status = "paid";
    inv.attemptCount = 1;
    inv.paidAt = now;
    this.emit<Stripe.CustomerSubscriptionCreatedEvent>("customer.subscription.created", renderSubscription(this.ctx(), sub));
    const renderedInv = renderInvoice(this.ctx(), inv);
    this.emit<Stripe.InvoicePaidEvent>("invoice.paid", renderedInv);
    this.emit<Stripe.InvoicePaymentSucceededEvent>("invoice.payment_succeeded", renderedInv);
    cs.status = "complete";
    cs.paymentStatus = "paid";
    cs.subscription = sub.id;
    cs.invoice = inv.id;
    cs.lastDecline = null;
    this.emit<Stripe.CheckoutSessionCompletedEvent>("checkout.session.completed", renderCheckoutSession(this.ctx(), cs));
    return { ok: true, redirect: cs.successUrl.replaceAll("{CHECKOUT_SESSION_ID}", cs.id) };
  }

  // ───────────────────────────── subscriptions ─────────────────────────────

  subscription(id: string): SubscriptionRec {
    const s = this.state.subscriptions[id];
    if (!s) throw new StripeApiError(404, "invalid_request_error", `No such subscription: '${id}'`, "resource_missing", "id");
    return s;
  }

  private updated(sub: SubscriptionRec, before: Stripe.Subscription): void {
    const after = renderSubscription(this.ctx(), sub);
    const prev = changed(before, after);
    if (Object.keys(prev).length)
      this.emit<Stripe.CustomerSubscriptionUpdatedEvent>("customer.subscription.updated", after, prev);
  }

  /**
   * Change price, seats, cancel-at-period-end or metadata. A price with another
   * interval restarts the billing period now and invoices it at once; other
   * changes apply at once without proration (the next renewal bills them).
   */
  updateSubscription(
    sub: SubscriptionRec,
    change: { price?: string; quantity?: number; cancelAtPeriodEnd?: boolean; metadata?: Record<string, string> },
  ): SubscriptionRec {
    if (sub.status === "canceled")
      throw new StripeApiError(
        400,
        "invalid_request_error",
        "A canceled subscription can only update its cancellation_details and metadata.",
        "subscription_canceled",
      );
    const before = renderSubscription(this.ctx(), sub);
    let restart = false;
    if (change.price && change.price !== sub.price) {
      const next = this.catalogue.prices.get(change.price);
      if (!next) throw new StripeApiError(400, "invalid_request_error", `No such price: '${change.price}'`, "resource_missing", "items[0][price]");
      restart = next.interval !== priceOf(this.ctx(), sub.price).interval;
      sub.price = next.id;
    }
    if (change.quantity !== undefined) {
      const product = this.catalogue.products.get(priceOf(this.ctx(), sub.price).product);
      const rule = product?.seats ?? { min: 1, max: 1 };
      if (change.quantity < rule.min || change.quantity > rule.max)
        throw new StripeApiError(
          400,
          "invalid_request_error",
          `Quantity must be between ${rule.min} and ${rule.max} for this price.`,
          "parameter_invalid_integer",
          "items[0][quantity]",
        );
      sub.quantity = change.quantity;
    }
    if (change.cancelAtPeriodEnd !== undefined && change.cancelAtPeriodEnd !== sub.cancelAtPeriodEnd) {
      sub.cancelAtPeriodEnd = change.cancelAtPeriodEnd;
      // Stripe: canceled_at is the time of the request to cancel at period end.
      sub.canceledAt = change.cancelAtPeriodEnd ? this.now() : null;
      sub.cancellationReason = change.cancelAtPeriodEnd ? "cancellation_requested" : null;
    }
    if (change.metadata) sub.metadata = change.metadata;
    if (restart) {
      sub.anchor = this.now();
      sub.cycle = 0;
      const inv = this.newInvoice(sub, "subscription_update");
      const ok = this.attemptInvoice(inv);
      if (!ok) sub.status = "past_due";
      else if (sub.status === "past_due" || sub.status === "unpaid") sub.status = "active";
    }
    this.updated(sub, before);
    return sub;
  }

  /** Cancel at once (DELETE /v1/subscriptions/:id). */
  cancelSubscription(sub: SubscriptionRec, reason: SubscriptionRec["cancellationReason"] = "cancellation_requested") {
    if (sub.status === "canceled")
      throw new StripeApiError(400, "invalid_request_error", `This subscription is already canceled: '${sub.id}'`, "subscription_canceled");
    const now = this.now();
    sub.status = "canceled";
    sub.canceledAt = now;
    sub.endedAt = now;
    sub.cancellationReason = reason;
    sub.cancelAtPeriodEnd = false;
    this.emit<Stripe.CustomerSubscriptionDeletedEvent>("customer.subscription.deleted", renderSubscription(this.ctx(), sub));
    return sub;
  }

  /**
   * The portal's "update payment method": a new fake card; declines set for
   * this customer (and "always" declines for everyone) are lifted, and open
   * invoices of past-due or unpaid subscriptions are retried at once.
   */
  replacePaymentMethod(c: CustomerRec): void {
    this.updateCustomer(c, (x) => {
      x.paymentMethod = { id: newId("pm"), last4: String(randomInt(0, 10_000)).padStart(4, "0") };
    });
    this.state.declines = this.state.declines.filter(
      (r) => !(r.customer === c.id || (r.customer === null && r.remaining === "always")),
    );
    for (const sub of Object.values(this.state.subscriptions)) {
      if (sub.customer !== c.id || (sub.status !== "past_due" && sub.status !== "unpaid")) continue;
      const inv = sub.latestInvoice ? this.state.invoices[sub.latestInvoice] : undefined;
      if (!inv || inv.status !== "open") continue;
      this.retry(sub, inv);
    }
  }

  /** One dunning retry (or a retry after a new card). */
  private retry(sub: SubscriptionRec, inv: InvoiceRec): void {
    const before = renderSubscription(this.ctx(), sub);
    if (this.attemptInvoice(inv)) {
      sub.status = "active";
      this.updated(sub, before);
      return;
    }
    if (inv.nextPaymentAttempt !== null) return;
    // The last retry failed: the dunning window is over.
    if (this.state.settings.afterFinalFailure === "cancel") {
      this.cancelSubscription(sub, "payment_failed");
    } else if (sub.status !== "unpaid") {
      sub.status = "unpaid";
      this.updated(sub, before);
    }
  }

  /** What happens when a subscription reaches the end of its period. */
  private periodEnd(sub: SubscriptionRec): void {
    const end = subscriptionPeriod(this.ctx(), sub).end;
    if (sub.cancelAtPeriodEnd) {
      sub.status = "canceled";
      sub.endedAt = end;
      sub.cancelAtPeriodEnd = false;
      this.emit<Stripe.CustomerSubscriptionDeletedEvent>("customer.subscription.deleted", renderSubscription(this.ctx(), sub));
      return;
    }
    const before = renderSubscription(this.ctx(), sub);
    sub.cycle += 1;
    const inv = this.newInvoice(sub, "subscription_cycle");
    if (this.attemptInvoice(inv)) {
      if (sub.status === "past_due") sub.status = "active";
    } else {
      sub.status = "past_due";
    }
    this.updated(sub, before);
  }

  /**
   * Move the clock forward to `target` (Unix seconds), handling every period
   * end and dunning retry due on the way, in time order.
   */
  advanceTo(target: number): void {
    if (target < this.now())
      throw new StripeApiError(400, "invalid_request_error", "The clock only moves forward.", "parameter_invalid_integer", "to");
    for (let guard = 0; guard < 10_000; guard++) {
      let next: { at: number; run: () => void } | null = null;
      for (const sub of Object.values(this.state.subscriptions)) {
        if (sub.status !== "active" && sub.status !== "past_due") continue;
        const end = subscriptionPeriod(this.ctx(), sub).end;
        if (!next || end < next.at) next = { at: end, run: () => this.periodEnd(sub) };
        const inv = sub.latestInvoice ? this.state.invoices[sub.latestInvoice] : undefined;
        if (sub.status === "past_due" && inv?.status === "open" && inv.nextPaymentAttempt !== null) {
          const at = inv.nextPaymentAttempt;
          if (at < next.at) next = { at, run: () => this.retry(sub, inv) };
        }
      }
      if (!next || next.at > target) break;
      this.setClock(next.at);
      next.run();
    }
    this.setClock(target);
  }

  /** Expire open checkout sessions whose time is up (called before reads). */
  expireCheckouts(): void {
    const now = this.now();
    for (const cs of Object.values(this.state.checkoutSessions))
      if (cs.status === "open" && now >= cs.expiresAt) cs.status = "expired";
  }
}
