// The payments stand-in's state: compact records of our own (rendered into the
// SDK's types by render.ts on the way out), a simulated clock, and persistence
// to one JSON file so restarts keep subscriptions. Prices and products are not
// stored: they are seeded from the plan catalogue on every start.
import { randomBytes } from "node:crypto";
import { existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import path from "node:path";
import type { BillingInterval } from "../../../lib/billing/plans";

export interface CustomerRec {
  id: string;
  created: number;
  email: string | null;
  name: string | null;
  description: string | null;
  metadata: Record<string, string>;
  /** The fake card on file: id and the last four digits shown in the portal. */
  paymentMethod: { id: string; last4: string } | null;
}

export interface LineRec {
  price: string;
  quantity: number;
}

export interface CheckoutRec {
  id: string;
  created: number;
  expiresAt: number;
  customer: string | null;
  customerEmail: string | null;
  clientReferenceId: string | null;
  metadata: Record<string, string>;
  subscriptionMetadata: Record<string, string>;
  lines: LineRec[];
  successUrl: string;
  cancelUrl: string | null;
  status: "open" | "complete" | "expired";
  paymentStatus: "paid" | "unpaid";
  subscription: string | null;
  invoice: string | null;
  /** Set when the last payment attempt on the pay page was declined. */
  lastDecline: string | null;
}

export type SubscriptionStatus = "active" | "past_due" | "unpaid" | "canceled";

export interface SubscriptionRec {
  id: string;
  customer: string;
  created: number;
  itemId: string;
  itemCreated: number;
  price: string;
  quantity: number;
  status: SubscriptionStatus;
  /** Periods are anchor + cycle intervals, with Stripe's end-of-month clamping. */
  anchor: number;
  cycle: number;
  cancelAtPeriodEnd: boolean;
  canceledAt: number | null;
  endedAt: number | null;
  cancellationReason: "cancellation_requested" | "payment_failed" | null;
  latestInvoice: string | null;
  metadata: Record<string, string>;
}

export interface InvoiceLineRec {
  id: string;
  price: string;
  quantity: number;
  amount: number;
  periodStart: number;
  periodEnd: number;
  description: string;
}

export interface InvoiceRec {
  id: string;
  number: string;
  customer: string;
  subscription: string;
  subscriptionMetadata: Record<string, string>;
  created: number;
  billingReason: "subscription_create" | "subscription_cycle" | "subscription_update";
  currency: string;
  lines: InvoiceLineRec[];
  /** Stripe's invoice.period_*: the usage period before the invoice (see engine.newInvoice). */
  periodStart: number;
  periodEnd: number;
  status: "open" | "paid" | "void";
  attemptCount: number;
  nextPaymentAttempt: number | null;
  paidAt: number | null;
  finalizedAt: number;
}

export interface PortalRec {
  id: string;
  created: number;
  customer: string;
  returnUrl: string | null;
}

export interface DeliveryRec {
  at: number;
  status: number | null;
  error: string | null;
  /** "auto" first attempt, "retry", or "manual" (control API replay). */
  kind: "auto" | "retry" | "manual";
}

export interface EventRec {
  id: string;
  type: string;
  created: number;
  /** The exact JSON delivered and returned by GET /v1/events/:id. */
  payload: string;
  deliveries: DeliveryRec[];
  /** Waiting because deliveries are on hold (control API). */
  held: boolean;
  /** Delivered with a 2xx at least once. */
  delivered: boolean;
}

export interface DeclineRule {
  /** A customer id, or null for any customer. */
  customer: string | null;
  /** Attempts still to decline; "always" until the card is replaced in the portal. */
  remaining: number | "always";
}

export interface Settings {
  /** Days after each failed renewal attempt before the next retry. */
  dunningRetryDays: number[];
  /** What happens to the subscription when the last retry fails. */
  afterFinalFailure: "cancel" | "unpaid";
  /** Delays before each webhook redelivery after a non-2xx answer. */
  webhookRetryDelaysMs: number[];
}

export interface StandinState {
  version: 1;
  clockOffsetMs: number;
  invoiceSeq: number;
  customers: Record<string, CustomerRec>;
  checkoutSessions: Record<string, CheckoutRec>;
  subscriptions: Record<string, SubscriptionRec>;
  invoices: Record<string, InvoiceRec>;
  portalSessions: Record<string, PortalRec>;
  events: EventRec[];
  declines: DeclineRule[];
  settings: Settings;
  webhooksHeld: boolean;
}

export const DEFAULT_SETTINGS: Settings = {
  dunningRetryDays: [3, 5, 7],
  afterFinalFailure: "cancel",
  webhookRetryDelaysMs: [2_000, 10_000, 60_000, 300_000, 1_800_000],
};

/** Events kept (oldest dropped first), like Stripe's 30-day window. */
export const MAX_EVENTS = 2_000;

export function emptyState(): StandinState {
  return {
    version: 1,
    clockOffsetMs: 0,
    invoiceSeq: 0,
    customers: {},
    checkoutSessions: {},
    subscriptions: {},
    invoices: {},
    portalSessions: {},
    events: [],
    declines: [],
    settings: structuredClone(DEFAULT_SETTINGS),
    webhooksHeld: false,
  };
}

const ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz";

/** A Stripe-looking id: prefix + 24 random base-62 characters. */
export function newId(prefix: string): string {
  const bytes = randomBytes(24);
  let s = "";
  for (const b of bytes) s += ALPHABET[b % 62];
  return `${prefix}_${s}`;
}

/** Add whole months to a Unix time (seconds), clamping the day to the month's end like Stripe. */
export function addMonths(unixSeconds: number, months: number): number {
  const d = new Date(unixSeconds * 1000);
  const day = d.getUTCDate();
  const target = new Date(
    Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + months, 1, d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()),
  );
  const lastDay = new Date(Date.UTC(target.getUTCFullYear(), target.getUTCMonth() + 1, 0)).getUTCDate();
  target.setUTCDate(Math.min(day, lastDay));
  return Math.floor(target.getTime() / 1000);
}

export function periodBounds(
  sub: Pick<SubscriptionRec, "anchor" | "cycle">,
  interval: BillingInterval,
): { start: number; end: number } {
  const months = interval === "year" ? 12 : 1;
  return { start: addMonths(sub.anchor, sub.cycle * months), end: addMonths(sub.anchor, (sub.cycle + 1) * months) };
}

/** Where state lives: a JSON file, or nothing (tests). */
export class Persistence {
  private timer: NodeJS.Immediate | null = null;
  constructor(private readonly file: string | null) {}

  load(): StandinState {
    if (!this.file || !existsSync(this.file)) return emptyState();
    try {
      const parsed = JSON.parse(readFileSync(this.file, "utf8")) as StandinState;
      if (parsed.version !== 1) throw new Error(`unknown state version ${String(parsed.version)}`);
      return { ...emptyState(), ...parsed, settings: { ...DEFAULT_SETTINGS, ...parsed.settings } };
    } catch (e) {
      // A corrupt file is kept aside rather than silently overwritten.
      const aside = `${this.file}.unreadable-${Date.now()}`;
      renameSync(this.file, aside);
      console.error(`payments stand-in: could not read ${this.file} (${(e as Error).message}); moved it to ${aside}`);
      return emptyState();
    }
  }

  /** Write soon (coalesces the writes of one request). */
  save(state: StandinState): void {
    if (!this.file || this.timer) return;
    this.timer = setImmediate(() => {
      this.timer = null;
      this.writeNow(state);
    });
  }

  writeNow(state: StandinState): void {
    if (!this.file) return;
    if (this.timer) {
      clearImmediate(this.timer);
      this.timer = null;
    }
    mkdirSync(path.dirname(this.file), { recursive: true });
    const tmp = `${this.file}.tmp`;
    writeFileSync(tmp, JSON.stringify(state));
    renameSync(tmp, this.file);
  }
}
