// Renders the stand-in's records as the Stripe SDK's own types, so a field the
// SDK's API version adds, renames or removes fails the type check here.
// Fields we do not model carry Stripe's empty values (null, [], {}).
import Stripe from "stripe";
import { cataloguePrices, planSpec, type BillingInterval, type CataloguePrice } from "../../../lib/billing/plans";
import {
  periodBounds,
  type CheckoutRec,
  type CustomerRec,
  type InvoiceRec,
  type PortalRec,
  type StandinState,
  type SubscriptionRec,
} from "./store";

/** Catalogue prices are created "at" this instant (2026-01-01T00:00:00Z). */
const CATALOGUE_CREATED = 1_767_225_600;

export interface PriceRec {
  id: string;
  product: string;
  lookupKey: string;
  unitAmount: number;
  currency: string;
  interval: BillingInterval;
  nickname: string;
  catalogue: CataloguePrice;
}

export interface ProductRec {
  id: string;
  name: string;
  description: string;
  /** Seats bought per unit, with the allowed range (portal seat changes). */
  seats: { min: number; max: number } | null;
}

export interface Catalogue {
  prices: Map<string, PriceRec>;
  products: Map<string, ProductRec>;
}

export function seedCatalogue(): Catalogue {
  const prices = new Map<string, PriceRec>();
  const products = new Map<string, ProductRec>();
  for (const c of cataloguePrices()) {
    const spec = planSpec(c.plan);
    const productId = `prod_rainprint_${c.plan}`;
    if (!products.has(productId))
      products.set(productId, {
        id: productId,
        name: `Rainprint ${spec.name}`,
        description: spec.tagline,
        seats: spec.seats ? { min: spec.seats.minSeats, max: spec.seats.maxSeats } : null,
      });
    const id = `price_rainprint_${c.plan}_${c.interval}`;
    prices.set(id, {
      id,
      product: productId,
      lookupKey: c.lookupKey,
      unitAmount: c.unitAmountCents,
      currency: c.currency,
      interval: c.interval,
      nickname: `${spec.name} (${c.interval === "month" ? "monthly" : "yearly"}${spec.seats ? ", per seat" : ""})`,
      catalogue: c,
    });
  }
  return { prices, products };
}

export interface RenderCtx {
  state: StandinState;
  catalogue: Catalogue;
  /** Public base URL of the stand-in (pay, portal and invoice pages). */
  baseUrl: string;
}

const decimal = (n: number): Stripe.Decimal => Stripe.Decimal.from(String(n));

export function list<T>(data: T[], url: string, hasMore = false): Stripe.ApiList<T> {
  return { object: "list", data, has_more: hasMore, url };
}

export function renderProduct(p: ProductRec): Stripe.Product {
  return {
    id: p.id,
    object: "product",
    active: true,
    created: CATALOGUE_CREATED,
    default_price: null,
    description: p.description,
    images: [],
    livemode: false,
    marketing_features: [],
    metadata: {},
    name: p.name,
    package_dimensions: null,
    shippable: null,
    statement_descriptor: null,
    tax_code: null,
    tax_details: null,
    type: "service",
    unit_label: p.seats ? "seat" : null,
    updated: CATALOGUE_CREATED,
    url: null,
  };
}

export function renderPrice(p: PriceRec): Stripe.Price {
  return {
    id: p.id,
    object: "price",
    active: true,
    billing_scheme: "per_unit",
    created: CATALOGUE_CREATED,
    currency: p.currency,
    custom_unit_amount: null,
    livemode: false,
    lookup_key: p.lookupKey,
    metadata: { rainprint_plan: p.catalogue.plan, rainprint_interval: p.interval },
    nickname: p.nickname,
    product: p.product,
    recurring: { interval: p.interval, interval_count: 1, meter: null, trial_period_days: null, usage_type: "licensed" },
    tax_behavior: "unspecified",
    tiers_mode: null,
    transform_quantity: null,
    type: "recurring",
    unit_amount: p.unitAmount,
    unit_amount_decimal: decimal(p.unitAmount),
  };
}

/** The legacy Plan object Stripe still embeds in subscription items. */
function renderPlan(p: PriceRec): Stripe.Plan {
  return {
    id: p.id,
    object: "plan",
    active: true,
    amount: p.unitAmount,
    amount_decimal: decimal(p.unitAmount),
    billing_scheme: "per_unit",
    created: CATALOGUE_CREATED,
    currency: p.currency,
    interval: p.interval,
    interval_count: 1,
    livemode: false,
    metadata: {},
    meter: null,
    nickname: p.nickname,
    product: p.product,
    tiers_mode: null,
    transform_usage: null,
    trial_period_days: null,
    usage_type: "licensed",
  };
}

export function priceOf(ctx: RenderCtx, id: string): PriceRec {
  const p = ctx.catalogue.prices.get(id);
  if (!p) throw new Error(`unknown price ${id}`);
  return p;
}

export function renderCustomer(c: CustomerRec): Stripe.Customer {
  return {
    id: c.id,
    object: "customer",
    address: null,
    balance: 0,
    created: c.created,
    currency: "eur",
    default_source: null,
    delinquent: false,
    description: c.description,
    discount: null,
    email: c.email,
    invoice_prefix: c.id.slice(4, 12).toUpperCase(),
    invoice_settings: {
      custom_fields: null,
      default_payment_method: c.paymentMethod?.id ?? null,
      footer: null,
      rendering_options: null,
    },
    livemode: false,
    metadata: c.metadata,
    name: c.name,
    next_invoice_sequence: 1,
    phone: null,
    preferred_locales: [],
    shipping: null,
    tax_exempt: "none",
    test_clock: null,
  };
}

export function subscriptionPeriod(ctx: RenderCtx, s: SubscriptionRec): { start: number; end: number } {
  return periodBounds(s, priceOf(ctx, s.price).interval);
}

export function renderSubscription(ctx: RenderCtx, s: SubscriptionRec): Stripe.Subscription {
  const price = priceOf(ctx, s.price);
  const period = subscriptionPeriod(ctx, s);
  const customer = ctx.state.customers[s.customer];
  const item: Stripe.SubscriptionItem = {
    id: s.itemId,
    object: "subscription_item",
    billing_thresholds: null,
    created: s.itemCreated,
    current_period_end: period.end,
    current_period_start: period.start,
    current_trial: null,
    discounts: [],
    metadata: {},
    plan: renderPlan(price),
    price: renderPrice(price),
    quantity: s.quantity,
    subscription: s.id,
    tax_rates: [],
  };
  return {
    id: s.id,
    object: "subscription",
    application: null,
    application_fee_percent: null,
    automatic_tax: { disabled_reason: null, enabled: false, liability: null },
    billing_cycle_anchor: s.anchor,
    billing_cycle_anchor_config: null,
    billing_mode: { flexible: null, type: "classic" },
    billing_schedules: [],
    billing_thresholds: null,
    cancel_at: s.cancelAtPeriodEnd && s.status !== "canceled" ? period.end : null,
    cancel_at_period_end: s.cancelAtPeriodEnd,
    canceled_at: s.canceledAt,
    cancellation_details: {
      comment: null,
      feedback: null,
      feedback_option: null,
      reason: s.cancellationReason,
    },
    collection_method: "charge_automatically",
    created: s.created,
    currency: price.currency,
    customer: s.customer,
    customer_account: null,
    days_until_due: null,
    default_payment_method: customer?.paymentMethod?.id ?? null,
    default_source: null,
    default_tax_rates: [],
    description: null,
    discounts: [],
    ended_at: s.endedAt,
    invoice_settings: { account_tax_ids: null, custom_fields: null, description: null, footer: null, issuer: { type: "self" } },
    items: list([item], `/v1/subscription_items?subscription=${s.id}`),
    latest_invoice: s.latestInvoice,
    livemode: false,
    managed_payments: null,
    metadata: s.metadata,
    next_pending_invoice_item_invoice: null,
    on_behalf_of: null,
    pause_collection: null,
    payment_settings: {
      payment_method_options: null,
      payment_method_types: null,
      save_default_payment_method: "off",
    },
    pending_invoice_item_interval: null,
    pending_setup_intent: null,
    pending_update: null,
    schedule: null,
    start_date: s.created,
    status: s.status,
    test_clock: null,
    transfer_data: null,
    trial_end: null,
    trial_settings: { end_behavior: { billing_cycle_anchor: null, missing_payment_method: "create_invoice" } },
    trial_start: null,
  };
}

export function invoiceTotal(inv: Pick<InvoiceRec, "lines">): number {
  return inv.lines.reduce((s, l) => s + l.amount, 0);
}

export function renderInvoice(ctx: RenderCtx, inv: InvoiceRec): Stripe.Invoice {
  const customer = ctx.state.customers[inv.customer];
  const total = invoiceTotal(inv);
  const paid = inv.status === "paid";
  const lines: Stripe.InvoiceLineItem[] = inv.lines.map((l) => {
    const price = priceOf(ctx, l.price);
    return {
      id: l.id,
      object: "line_item",
      amount: l.amount,
      currency: inv.currency,
      description: l.description,
      discount_amounts: [],
      discountable: true,
      discounts: [],
      invoice: inv.id,
      livemode: false,
      metadata: {},
      parent: {
        type: "subscription_item_details",
        invoice_item_details: null,
        subscription_item_details: {
          invoice_item: null,
          proration: false,
          proration_details: { credited_items: null },
          subscription: inv.subscription,
          subscription_item: ctx.state.subscriptions[inv.subscription]?.itemId ?? "",
        },
      },
      period: { start: l.periodStart, end: l.periodEnd },
      pretax_credit_amounts: [],
      pricing: {
        type: "price_details",
        price_details: { price: price.id, product: price.product },
        unit_amount_decimal: decimal(price.unitAmount),
      },
      quantity: l.quantity,
      quantity_decimal: decimal(l.quantity),
      subscription: inv.subscription,
      subtotal: l.amount,
      taxes: [],
    };
  });
  return {
    id: inv.id,
    object: "invoice",
    account_country: "IE",
    account_name: "Rainprint (local payments stand-in)",
    account_tax_ids: null,
    amount_due: total,
    amount_overpaid: 0,
    amount_paid: paid ? total : 0,
    amount_remaining: paid ? 0 : total,
    amount_shipping: 0,
    application: null,
    attempt_count: inv.attemptCount,
    attempted: inv.attemptCount > 0,
    auto_advance: !paid && inv.nextPaymentAttempt !== null,
    automatic_tax: {
      disabled_reason: null,
      enabled: false,
      liability: null,
      provider: null,
      status: null,
    },
    automatically_finalizes_at: null,
    billing_reason: inv.billingReason,
    collection_method: "charge_automatically",
    created: inv.created,
    currency: inv.currency,
    custom_fields: null,
    customer: inv.customer,
    customer_account: null,
    customer_address: null,
    customer_email: customer?.email ?? null,
    customer_name: customer?.name ?? null,
    customer_phone: null,
    customer_shipping: null,
    customer_tax_exempt: "none",
    customer_tax_ids: [],
    default_payment_method: null,
    default_source: null,
    default_tax_rates: [],
    description: null,
    discounts: [],
    due_date: null,
    effective_at: inv.finalizedAt,
    ending_balance: 0,
    footer: null,
    from_invoice: null,
    hosted_invoice_url: `${ctx.baseUrl}/invoice/${inv.id}`,
    invoice_pdf: null,
    issuer: { type: "self" },
    last_finalization_error: null,
    latest_revision: null,
    lines: list(lines, `/v1/invoices/${inv.id}/lines`),
    livemode: false,
    metadata: {},
    next_payment_attempt: inv.nextPaymentAttempt,
    number: inv.number,
    on_behalf_of: null,
    parent: {
      type: "subscription_details",
      quote_details: null,
      subscription_details: { metadata: inv.subscriptionMetadata, subscription: inv.subscription },
    },
    payment_settings: { default_mandate: null, payment_method_options: null, payment_method_types: null },
    period_end: inv.periodEnd,
    period_start: inv.periodStart,
    post_payment_credit_notes_amount: 0,
    pre_payment_credit_notes_amount: 0,
    receipt_number: paid ? `${inv.number}-R` : null,
    rendering: null,
    shipping_cost: null,
    shipping_details: null,
    starting_balance: 0,
    statement_descriptor: null,
    status: inv.status,
    status_transitions: {
      finalized_at: inv.finalizedAt,
      marked_uncollectible_at: null,
      paid_at: inv.paidAt,
      voided_at: null,
    },
    subtotal: total,
    subtotal_excluding_tax: total,
    test_clock: null,
    total,
    total_discount_amounts: [],
    total_excluding_tax: total,
    total_pretax_credit_amounts: [],
    total_taxes: [],
    webhooks_delivered_at: inv.created,
  };
}

export function checkoutAmount(ctx: RenderCtx, cs: Pick<CheckoutRec, "lines">): number {
  return cs.lines.reduce((s, l) => s + priceOf(ctx, l.price).unitAmount * l.quantity, 0);
}

export function renderLineItems(ctx: RenderCtx, cs: CheckoutRec): Stripe.ApiList<Stripe.LineItem> {
  const items: Stripe.LineItem[] = cs.lines.map((l, i) => {
    const price = priceOf(ctx, l.price);
    const amount = price.unitAmount * l.quantity;
    return {
      id: `li_${cs.id.slice(3, 20)}${i}`,
      object: "item",
      adjustable_quantity: null,
      amount_discount: 0,
      amount_subtotal: amount,
      amount_tax: 0,
      amount_total: amount,
      currency: price.currency,
      description: ctx.catalogue.products.get(price.product)?.name ?? price.nickname,
      metadata: {},
      price: renderPrice(price),
      quantity: l.quantity,
    };
  });
  return list(items, `/v1/checkout/sessions/${cs.id}/line_items`);
}

export function renderCheckoutSession(ctx: RenderCtx, cs: CheckoutRec, withLineItems = false): Stripe.Checkout.Session {
  const amount = checkoutAmount(ctx, cs);
  const currency = cs.lines[0] ? priceOf(ctx, cs.lines[0].price).currency : "eur";
  const customer = cs.customer ? ctx.state.customers[cs.customer] : undefined;
  return {
    id: cs.id,
    object: "checkout.session",
    adaptive_pricing: null,
    after_expiration: null,
    allow_promotion_codes: null,
    allowed_payment_method_types: null,
    amount_subtotal: amount,
    amount_total: amount,
    automatic_tax: { enabled: false, liability: null, provider: null, status: null },
    billing_address_collection: null,
    cancel_url: cs.cancelUrl,
    client_reference_id: cs.clientReferenceId,
    client_secret: null,
    collected_information: null,
    consent: null,
    consent_collection: null,
    created: cs.created,
    currency,
    currency_conversion: null,
    custom_fields: [],
    custom_text: { after_submit: null, shipping_address: null, submit: null, terms_of_service_acceptance: null },
    customer: cs.customer,
    customer_account: null,
    customer_creation: cs.customer ? null : "always",
    customer_details:
      cs.status === "complete"
        ? {
            address: null,
            business_name: null,
            email: customer?.email ?? cs.customerEmail,
            individual_name: null,
            name: customer?.name ?? null,
            phone: null,
            tax_exempt: "none",
            tax_ids: [],
          }
        : null,
    customer_email: cs.customerEmail,
    discounts: [],
    expires_at: cs.expiresAt,
    integration_identifier: null,
    invoice: cs.invoice,
    invoice_creation: null,
    ...(withLineItems ? { line_items: renderLineItems(ctx, cs) } : {}),
    livemode: false,
    locale: null,
    managed_payments: null,
    metadata: cs.metadata,
    mode: "subscription",
    origin_context: null,
    payment_intent: null,
    payment_link: null,
    payment_method_collection: "always",
    payment_method_configuration_details: null,
    payment_method_options: null,
    payment_method_types: ["card"],
    payment_status: cs.paymentStatus,
    permissions: null,
    recovered_from: null,
    saved_payment_method_options: null,
    setup_intent: null,
    shipping_address_collection: null,
    shipping_cost: null,
    shipping_options: [],
    status: cs.status,
    submit_type: null,
    subscription: cs.subscription,
    success_url: cs.successUrl,
    total_details: { amount_discount: 0, amount_shipping: 0, amount_tax: 0 },
    ui_mode: "hosted",
    url: cs.status === "open" ? `${ctx.baseUrl}/pay/${cs.id}` : null,
    wallet_options: null,
  };
}

export function renderPortalSession(ctx: RenderCtx, ps: PortalRec): Stripe.BillingPortal.Session {
  return {
    id: ps.id,
    object: "billing_portal.session",
    configuration: "bpc_rainprint_standin",
    created: ps.created,
    customer: ps.customer,
    customer_account: null,
    flow: null,
    livemode: false,
    locale: null,
    on_behalf_of: null,
    return_url: ps.returnUrl,
    url: `${ctx.baseUrl}/portal/${ps.id}`,
  };
}

/** Render any stored object by id prefix (used for `expand`). */
export function renderById(ctx: RenderCtx, id: string): unknown {
  const s = ctx.state;
  if (id.startsWith("cus_") && s.customers[id]) return renderCustomer(s.customers[id]);
  if (id.startsWith("sub_") && s.subscriptions[id]) return renderSubscription(ctx, s.subscriptions[id]);
  if (id.startsWith("in_") && s.invoices[id]) return renderInvoice(ctx, s.invoices[id]);
  if (id.startsWith("cs_") && s.checkoutSessions[id]) return renderCheckoutSession(ctx, s.checkoutSessions[id]);
  const price = ctx.catalogue.prices.get(id);
  if (price) return renderPrice(price);
  const product = ctx.catalogue.products.get(id);
  if (product) return renderProduct(product);
  return undefined;
}
