// The payments stand-in's HTTP server: the Stripe API endpoints Rainprint
// calls (/v1/…), the test pay and portal pages, and a control API for tests
// (/_standin/…). Listens on 127.0.0.1 only.
import type Stripe from "stripe";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { Engine } from "./engine";
import { WebhookDelivery } from "./delivery";
import { Params, parseForm, StripeApiError, type FormObject } from "./form";
import { indexPage, invoicePage, messagePage, payPage, portalPage } from "./pages";
import {
  list,
  renderById,
  renderCheckoutSession,
  renderCustomer,
  renderInvoice,
  renderLineItems,
  renderPortalSession,
  renderPrice,
  renderProduct,
  renderSubscription,
  seedCatalogue,
  type RenderCtx,
} from "./render";
import { emptyState, newId, Persistence, type CheckoutRec, type DeclineRule, type PortalRec, type StandinState } from "./store";

export interface StandinOptions {
  /** 0 (default) picks a free port. */
  port?: number;
  /** Interface to listen on (default 127.0.0.1; docker-compose uses 0.0.0.0 inside its network). */
  host?: string;
  /** Base URL browsers use for the pay and portal pages; default http://127.0.0.1:<port>. */
  publicUrl?: string;
  /** Where events are POSTed (the app's /api/stripe/webhook); null = no delivery. */
  webhookUrl?: string | null;
  webhookSecret?: string;
  /** The secret key the SDK must present. */
  apiKey?: string;
  /** JSON file that keeps state across restarts; null = memory only. */
  statePath?: string | null;
  /** Serve the /_standin control API. */
  control?: boolean;
  log?: (msg: string) => void;
}

export interface RunningStandin {
  url: string;
  port: number;
  engine: Engine;
  delivery: WebhookDelivery;
  close(): Promise<void>;
}

const MAX_BODY_BYTES = 1_000_000;
const IDEMPOTENCY_KEEP = 10_000;
const CHECKOUT_LIFETIME_S = 24 * 3600;

type Handler = (p: Params, m: RegExpExecArray) => Promise<unknown> | unknown;
interface Route {
  method: "GET" | "POST" | "DELETE";
  pattern: RegExp;
  /** Top-level parameters the endpoint accepts (besides `expand`). */
  allowed: readonly string[];
  handler: Handler;
}

function readBody(req: IncomingMessage): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    req.on("data", (c: Buffer) => {
      size += c.length;
      if (size > MAX_BODY_BYTES) {
        reject(new StripeApiError(413, "invalid_request_error", "Request body too large."));
        req.destroy();
        return;
      }
      chunks.push(c);
    });
    req.on("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
    req.on("error", reject);
  });
}

function send(res: ServerResponse, status: number, body: string, type: string, headers: Record<string, string> = {}) {
  res.writeHead(status, { "Content-Type": type, "Cache-Control": "no-store", ...headers });
  res.end(body);
}

const json = (res: ServerResponse, status: number, value: unknown, headers: Record<string, string> = {}) =>
  send(res, status, JSON.stringify(value), "application/json; charset=utf-8", headers);
const html = (res: ServerResponse, status: number, body: string) => send(res, status, body, "text/html; charset=utf-8");
const redirect = (res: ServerResponse, location: string) => {
  res.writeHead(303, { Location: location, "Cache-Control": "no-store" });
  res.end();
};

/** Stripe's list pagination over items ordered newest first. */
function paginate<T extends { id: string }>(items: T[], p: Params, url: string): Stripe.ApiList<T> {
  const limit = p.int("limit", { min: 1, max: 100 }) ?? 10;
  const after = p.str("starting_after");
  const before = p.str("ending_before");
  let start = 0;
  let end = items.length;
  if (after) {
    const i = items.findIndex((x) => x.id === after);
    if (i < 0) throw new StripeApiError(400, "invalid_request_error", `No such object: '${after}'`, "resource_missing", "starting_after");
    start = i + 1;
  } else if (before) {
    const i = items.findIndex((x) => x.id === before);
    if (i < 0) throw new StripeApiError(400, "invalid_request_error", `No such object: '${before}'`, "resource_missing", "ending_before");
    end = i;
    start = Math.max(0, end - limit);
  }
  const page = items.slice(start, Math.min(end, start + limit));
  const hasMore = before ? start > 0 : start + limit < end;
  return list(page, url, hasMore);
}

/** Newest first, ties in reverse insertion order (as Stripe lists). */
function newestFirst<T extends { created: number }>(xs: T[]): T[] {
  return xs
    .map((x, i) => ({ x, i }))
    .sort((a, b) => b.x.created - a.x.created || b.i - a.i)
    .map((e) => e.x);
}

/** Replace ids with objects along `expand` paths (`subscription`, `data.customer`, `line_items`). */
function applyExpand(ctx: RenderCtx, value: unknown, paths: string[]): unknown {
  for (const path of paths) expandPath(ctx, value, path.split("."), path);
  return value;
}

function expandPath(ctx: RenderCtx, node: unknown, parts: string[], full: string): void {
  if (!parts.length || node === null || typeof node !== "object") return;
  const obj = node as Record<string, unknown>;
  const [head, ...rest] = parts;
  if (head === "data" && Array.isArray(obj.data)) {
    for (const item of obj.data) expandPath(ctx, item, rest, full);
    return;
  }
  if (head === "line_items" && obj.object === "checkout.session" && typeof obj.id === "string") {
    const cs = ctx.state.checkoutSessions[obj.id];
    if (cs) obj.line_items = renderLineItems(ctx, cs);
    expandPath(ctx, obj.line_items, rest, full);
    return;
  }
  if (!(head in obj))
    throw new StripeApiError(400, "invalid_request_error", `This property cannot be expanded (${full}).`, "parameter_invalid", "expand");
  let v = obj[head];
  if (typeof v === "string") {
    const expanded = renderById(ctx, v);
    if (expanded === undefined)
      throw new StripeApiError(400, "invalid_request_error", `This property cannot be expanded (${full}).`, "parameter_invalid", "expand");
    v = expanded;
    obj[head] = v;
  }
  expandPath(ctx, v, rest, full);
}

/** Customer search: `email:'a@b'`, `name~'x'`, `metadata['k']:'v'`, joined by AND. */
function customerSearch(query: string): (c: Stripe.Customer) => boolean {
  const clauses = query.split(/\s+AND\s+/i).map((s) => s.trim());
  const tests = clauses.map((clause) => {
    const m = /^(email|name|metadata\[['"]([^'"\]]+)['"]\])\s*(:|~)\s*['"](.*)['"]$/.exec(clause);
    if (!m) throw new StripeApiError(400, "invalid_request_error", `Unsupported search clause: ${clause}`, "parameter_invalid", "query");
    const [, field, metaKey, op, value] = m;
    return (c: Stripe.Customer) => {
      const actual = metaKey ? c.metadata[metaKey] : field === "email" ? c.email : c.name;
      if (actual == null) return false;
      return op === ":" ? actual.toLowerCase() === value.toLowerCase() : actual.toLowerCase().includes(value.toLowerCase());
    };
  });
  return (c) => tests.every((t) => t(c));
}

function controlBody(body: string): Record<string, unknown> {
  if (!body.trim()) return {};
  try {
    const v = JSON.parse(body) as unknown;
    if (v && typeof v === "object" && !Array.isArray(v)) return v as Record<string, unknown>;
  } catch {
    // fall through
  }
  throw new StripeApiError(400, "invalid_request_error", "The control API takes a JSON object body.");
}

export async function startStripeStandin(opts: StandinOptions = {}): Promise<RunningStandin> {
  const log = opts.log ?? ((m: string) => console.log(`[payments stand-in] ${m}`));
  const apiKey = opts.apiKey ?? "sk_test_local_standin";
  const persistence = new Persistence(opts.statePath ?? null);
  let state: StandinState = persistence.load();
  const catalogue = seedCatalogue();
  const save = () => persistence.save(state);

  const delivery = new WebhookDelivery({
    url: opts.webhookUrl ?? null,
    secret: opts.webhookSecret ?? "whsec_local_standin_secret",
    state: () => state,
    save,
    log,
  });
  // The base URL is known once listening; engine.baseUrl is fixed up below.
  const engine = new Engine(state, catalogue, "", {
    onEvent: (ev) => delivery.enqueue(ev),
    hasWebhook: delivery.enabled,
  });

  const idempotency = new Map<string, { fingerprint: string; status: number; body: string }>();
  const inFlight = new Set<string>();

  const ctx = () => engine.ctx();

  // ───────────────────────────── API routes ─────────────────────────────

  const customerListSource = () => newestFirst(Object.values(state.customers)).map(renderCustomer);

  const routes: Route[] = [
    {
      method: "POST",
      pattern: /^\/v1\/customers$/,
      allowed: ["email", "name", "description", "metadata"],
      handler: (p) =>
        renderCustomer(
          engine.createCustomer({
            email: p.str("email"),
            name: p.str("name"),
            description: p.str("description"),
            metadata: p.metadata("metadata"),
          }),
        ),
    },
    {
      method: "GET",
      pattern: /^\/v1\/customers$/,
      allowed: ["email", "limit", "starting_after", "ending_before"],
      handler: (p) => {
        const email = p.str("email");
        const all = customerListSource().filter((c) => !email || c.email === email);
        return paginate(all, p, "/v1/customers");
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/customers\/search$/,
      allowed: ["query", "limit", "page"],
      handler: (p): Stripe.ApiSearchResult<Stripe.Customer> => {
        const match = customerSearch(p.reqStr("query"));
        const limit = p.int("limit", { min: 1, max: 100 }) ?? 10;
        const offset = p.str("page") ? Number(p.str("page")) || 0 : 0;
        const all = customerListSource().filter(match);
        const data = all.slice(offset, offset + limit);
        const more = offset + limit < all.length;
        return {
          object: "search_result",
          data,
          has_more: more,
          next_page: more ? String(offset + limit) : null,
          url: "/v1/customers/search",
          total_count: all.length,
        };
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/customers\/(cus_[A-Za-z0-9]+)$/,
      allowed: [],
      handler: (_p, m) => renderCustomer(engine.customer(m[1])),
    },
    {
      method: "POST",
      pattern: /^\/v1\/customers\/(cus_[A-Za-z0-9]+)$/,
      allowed: ["email", "name", "description", "metadata"],
      handler: (p, m) => {
        const c = engine.customer(m[1]);
        return renderCustomer(
          engine.updateCustomer(c, (x) => {
            if (p.has("email")) x.email = p.str("email") ?? null;
            if (p.has("name")) x.name = p.str("name") ?? null;
            if (p.has("description")) x.description = p.str("description") ?? null;
            x.metadata = p.metadata("metadata", x.metadata);
          }),
        );
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/prices$/,
      allowed: ["lookup_keys", "active", "product", "type", "recurring", "currency", "limit", "starting_after", "ending_before"],
      handler: (p) => {
        const keys = p.strArray("lookup_keys");
        const active = p.bool("active");
        const product = p.str("product");
        const type = p.oneOf("type", ["one_time", "recurring"] as const);
        const currency = p.str("currency");
        const interval = p.obj("recurring", ["interval", "usage_type", "meter"])?.str("interval");
        const all = [...catalogue.prices.values()]
          .filter(
            (x) =>
              (!keys.length || keys.includes(x.lookupKey)) &&
              active !== false &&
              (!product || x.product === product) &&
              type !== "one_time" &&
              (!currency || x.currency === currency) &&
              (!interval || x.interval === interval),
          )
          .map(renderPrice);
        return paginate(all, p, "/v1/prices");
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/prices\/([A-Za-z0-9_]+)$/,
      allowed: [],
      handler: (_p, m) => {
        const price = catalogue.prices.get(m[1]);
        if (!price) throw new StripeApiError(404, "invalid_request_error", `No such price: '${m[1]}'`, "resource_missing", "price");
        return renderPrice(price);
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/products\/([A-Za-z0-9_]+)$/,
      allowed: [],
      handler: (_p, m) => {
        const product = catalogue.products.get(m[1]);
        if (!product) throw new StripeApiError(404, "invalid_request_error", `No such product: '${m[1]}'`, "resource_missing", "id");
        return renderProduct(product);
      },
    },
    {
      method: "POST",
      pattern: /^\/v1\/checkout\/sessions$/,
      allowed: [
        "mode",
        "line_items",
        "customer",
        "customer_email",
        "client_reference_id",
        "metadata",
        "subscription_data",
        "success_url",
        "cancel_url",
        "expires_at",
        "allow_promotion_codes",
        "billing_address_collection",
        "locale",
      ],
      handler: (p) => {
        const mode = p.oneOf("mode", ["payment", "setup", "subscription"] as const);
        if (mode !== "subscription")
          throw new StripeApiError(400, "invalid_request_error", "This stand-in only implements mode=subscription.", "parameter_invalid", "mode");
        const lines = p.objArray("line_items", ["price", "quantity"]).map((li, i) => {
          const priceId = li.reqStr("price");
          if (!catalogue.prices.has(priceId))
            throw new StripeApiError(400, "invalid_request_error", `No such price: '${priceId}'`, "resource_missing", `line_items[${i}][price]`);
          return { price: priceId, quantity: li.int("quantity", { min: 1, max: 10_000 }) ?? 1 };
        });
        if (lines.length !== 1)
          throw new StripeApiError(400, "invalid_request_error", "Give exactly one line item (one recurring price).", "parameter_invalid", "line_items");
        const customer = p.str("customer");
        if (customer) engine.customer(customer);
        const customerEmail = p.str("customer_email");
        if (customer && customerEmail)
          throw new StripeApiError(400, "invalid_request_error", "You may only specify one of these parameters: customer, customer_email.", "parameter_invalid", "customer_email");
        const successUrl = p.reqStr("success_url");
        const subscriptionData = p.obj("subscription_data", ["metadata", "description"]);
        const now = engine.now();
        const cs: CheckoutRec = {
          id: newId("cs_test"),
          created: now,
          expiresAt: p.int("expires_at", { min: now + 1800, max: now + 86_400 }) ?? now + CHECKOUT_LIFETIME_S,
          customer: customer ?? null,
          customerEmail: customerEmail ?? null,
          clientReferenceId: p.str("client_reference_id") ?? null,
          metadata: p.metadata("metadata"),
          subscriptionMetadata: subscriptionData?.metadata("metadata") ?? {},
          lines,
          successUrl,
          cancelUrl: p.str("cancel_url") ?? null,
          status: "open",
          paymentStatus: "unpaid",
          subscription: null,
          invoice: null,
          lastDecline: null,
        };
        state.checkoutSessions[cs.id] = cs;
        return renderCheckoutSession(ctx(), cs);
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/checkout\/sessions\/(cs_test_[A-Za-z0-9]+)$/,
      allowed: [],
      handler: (_p, m) => {
        engine.expireCheckouts();
        return renderCheckoutSession(ctx(), engine.checkout(m[1]));
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/checkout\/sessions\/(cs_test_[A-Za-z0-9]+)\/line_items$/,
      allowed: ["limit", "starting_after", "ending_before"],
      handler: (p, m) => {
        const items = renderLineItems(ctx(), engine.checkout(m[1]));
        return paginate(items.data, p, items.url);
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/subscriptions$/,
      allowed: ["customer", "status", "price", "limit", "starting_after", "ending_before"],
      handler: (p) => {
        const customer = p.str("customer");
        const status = p.oneOf("status", ["active", "past_due", "unpaid", "canceled", "ended", "all", "incomplete", "incomplete_expired", "trialing", "paused"] as const);
        const price = p.str("price");
        const all = newestFirst(Object.values(state.subscriptions))
          .filter(
            (s) =>
              (!customer || s.customer === customer) &&
              (!price || s.price === price) &&
              (status === "all" ||
                (status === undefined && s.status !== "canceled") ||
                (status === "ended" && s.status === "canceled") ||
                s.status === status),
          )
          .map((s) => renderSubscription(ctx(), s));
        return paginate(all, p, "/v1/subscriptions");
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/subscriptions\/(sub_[A-Za-z0-9]+)$/,
      allowed: [],
      handler: (_p, m) => renderSubscription(ctx(), engine.subscription(m[1])),
    },
    {
      method: "POST",
      pattern: /^\/v1\/subscriptions\/(sub_[A-Za-z0-9]+)$/,
      allowed: ["items", "cancel_at_period_end", "metadata", "proration_behavior", "payment_behavior"],
      handler: (p, m) => {
        const sub = engine.subscription(m[1]);
        p.oneOf("proration_behavior", ["always_invoice", "create_prorations", "none"] as const);
        p.oneOf("payment_behavior", ["allow_incomplete", "default_incomplete", "error_if_incomplete", "pending_if_incomplete"] as const);
        const items = p.objArray("items", ["id", "price", "quantity"]);
        if (items.length > 1)
          throw new StripeApiError(400, "invalid_request_error", "Rainprint subscriptions have exactly one item.", "parameter_invalid", "items");
        const item = items[0];
        if (item) {
          const id = item.str("id");
          if (id && id !== sub.itemId)
            throw new StripeApiError(400, "invalid_request_error", `No such subscription item: '${id}'`, "resource_missing", "items[0][id]");
          if (!id)
            throw new StripeApiError(400, "invalid_request_error", "Give items[0][id] to change the existing item.", "parameter_missing", "items[0][id]");
        }
        return renderSubscription(
          ctx(),
          engine.updateSubscription(sub, {
            price: item?.str("price"),
            quantity: item?.int("quantity", { min: 1 }),
            cancelAtPeriodEnd: p.bool("cancel_at_period_end"),
            metadata: p.has("metadata") ? p.metadata("metadata", sub.metadata) : undefined,
          }),
        );
      },
    },
    {
      method: "DELETE",
      pattern: /^\/v1\/subscriptions\/(sub_[A-Za-z0-9]+)$/,
      allowed: ["invoice_now", "prorate", "cancellation_details"],
      handler: (p, m) => {
        p.bool("invoice_now");
        p.bool("prorate");
        p.obj("cancellation_details", ["comment", "feedback"]);
        return renderSubscription(ctx(), engine.cancelSubscription(engine.subscription(m[1])));
      },
    },
    {
      method: "POST",
      pattern: /^\/v1\/billing_portal\/sessions$/,
      allowed: ["customer", "return_url", "locale", "configuration"],
      handler: (p) => {
        const customer = engine.customer(p.reqStr("customer"));
        const ps: PortalRec = { id: newId("bps"), created: engine.now(), customer: customer.id, returnUrl: p.str("return_url") ?? null };
        state.portalSessions[ps.id] = ps;
        return renderPortalSession(ctx(), ps);
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/invoices$/,
      allowed: ["customer", "subscription", "status", "limit", "starting_after", "ending_before"],
      handler: (p) => {
        const customer = p.str("customer");
        const subscription = p.str("subscription");
        const status = p.oneOf("status", ["draft", "open", "paid", "uncollectible", "void"] as const);
        const all = newestFirst(Object.values(state.invoices))
          .filter(
            (i) =>
              (!customer || i.customer === customer) &&
              (!subscription || i.subscription === subscription) &&
              (!status || i.status === status),
          )
          .map((i) => renderInvoice(ctx(), i));
        return paginate(all, p, "/v1/invoices");
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/invoices\/(in_[A-Za-z0-9]+)$/,
      allowed: [],
      handler: (_p, m) => {
        const inv = state.invoices[m[1]];
        if (!inv) throw new StripeApiError(404, "invalid_request_error", `No such invoice: '${m[1]}'`, "resource_missing", "invoice");
        return renderInvoice(ctx(), inv);
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/events$/,
      allowed: ["type", "types", "created", "limit", "starting_after", "ending_before", "delivery_success"],
      handler: (p) => {
        const type = p.str("type");
        const types = p.strArray("types");
        const created = p.obj("created", ["gt", "gte", "lt", "lte"]);
        const exact = created ? undefined : p.int("created");
        const gt = created?.int("gt");
        const gte = created?.int("gte");
        const lt = created?.int("lt");
        const lte = created?.int("lte");
        const delivered = p.bool("delivery_success");
        const matchType = (t: string) =>
          (!type || (type.endsWith(".*") ? t.startsWith(type.slice(0, -1)) : t === type)) && (!types.length || types.includes(t));
        const all = newestFirst(state.events)
          .filter(
            (e) =>
              matchType(e.type) &&
              (exact === undefined || e.created === exact) &&
              (gt === undefined || e.created > gt) &&
              (gte === undefined || e.created >= gte) &&
              (lt === undefined || e.created < lt) &&
              (lte === undefined || e.created <= lte) &&
              (delivered === undefined || e.delivered === delivered),
          )
          .map((e) => JSON.parse(e.payload) as Stripe.Event);
        return paginate(all, p, "/v1/events");
      },
    },
    {
      method: "GET",
      pattern: /^\/v1\/events\/(evt_[A-Za-z0-9]+)$/,
      allowed: [],
      handler: (_p, m) => {
        const ev = state.events.find((e) => e.id === m[1]);
        if (!ev) throw new StripeApiError(404, "invalid_request_error", `No such event: '${m[1]}'`, "resource_missing", "id");
        return JSON.parse(ev.payload) as Stripe.Event;
      },
    },
  ];

  async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL, body: string) {
    const requestId = newId("req");
    const headers = { "Request-Id": requestId, "Stripe-Version": String(req.headers["stripe-version"] ?? "") };
    const auth = req.headers.authorization ?? "";
    const presented = auth.startsWith("Bearer ")
      ? auth.slice(7)
      : auth.startsWith("Basic ")
        ? Buffer.from(auth.slice(6), "base64").toString("utf8").replace(/:$/, "")
        : "";
    if (presented !== apiKey) {
      json(
        res,
        401,
        {
          error: {
            type: "invalid_request_error",
            message: presented ? `Invalid API Key provided: ${presented.slice(0, 8)}***` : "You did not provide an API key.",
          },
        },
        headers,
      );
      return;
    }
    const method = (req.method ?? "GET").toUpperCase();
    const idemKey = method === "POST" ? (req.headers["idempotency-key"] as string | undefined) : undefined;
    const fingerprint = `${method} ${url.pathname} ${body}`;
    if (idemKey) {
      const seen = idempotency.get(idemKey);
      if (seen) {
        if (seen.fingerprint !== fingerprint) {
          json(
            res,
            400,
            {
              error: {
                type: "idempotency_error",
                message: `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${idemKey}' if you meant to execute a different request.`,
              },
            },
            headers,
          );
          return;
        }
        send(res, seen.status, seen.body, "application/json; charset=utf-8", { ...headers, "Idempotent-Replayed": "true" });
        return;
      }
      if (inFlight.has(idemKey)) {
        json(
          res,
          409,
          { error: { type: "idempotency_error", message: "There is currently another in-progress request using this Idempotent Key." } },
          headers,
        );
        return;
      }
      inFlight.add(idemKey);
    }
    try {
      let status = 200;
      let out: string;
      try {
        const raw: FormObject = method === "GET" || method === "DELETE" ? parseForm(url.search.slice(1)) : parseForm(body);
        const path = url.pathname;
        const candidates = routes.filter((r) => r.pattern.test(path));
        const route = candidates.find((r) => r.method === method);
        if (!route) {
          throw new StripeApiError(
            404,
            "invalid_request_error",
            candidates.length
              ? `Unrecognized request URL (${method}: ${path}). This endpoint does not accept ${method}.`
              : `Unrecognized request URL (${method}: ${path}). The payments stand-in implements only the endpoints Rainprint uses; see DEVELOPERS.md.`,
            "resource_missing",
          );
        }
        const m = route.pattern.exec(path)!;
        const params = Params.of(raw, route.allowed);
        engine.currentRequest = { id: requestId, idempotencyKey: idemKey ?? null };
        let result: unknown;
        try {
          result = await route.handler(params, m);
        } finally {
          engine.currentRequest = null;
        }
        out = JSON.stringify(applyExpand(ctx(), result, params.expand()));
        if (method !== "GET") save();
      } catch (e) {
        if (!(e instanceof StripeApiError)) throw e;
        status = e.status;
        out = JSON.stringify(e.body());
      }
      if (idemKey && status < 500 && status !== 400 && status !== 404) {
        idempotency.set(idemKey, { fingerprint, status, body: out });
        if (idempotency.size > IDEMPOTENCY_KEEP) idempotency.delete(idempotency.keys().next().value as string);
      }
      send(res, status, out, "application/json; charset=utf-8", headers);
    } finally {
      if (idemKey) inFlight.delete(idemKey);
    }
  }

  // ───────────────────────────── pages ─────────────────────────────

  async function handlePay(req: IncomingMessage, res: ServerResponse, id: string, body: string) {
    engine.expireCheckouts();
    const cs = state.checkoutSessions[id];
    if (!cs) return html(res, 404, messagePage("Checkout not found", "There is no checkout with this address."));
    if (req.method === "GET") return html(res, 200, payPage(ctx(), cs));
    const form = new URLSearchParams(body);
    if (form.get("action") === "cancel") {
      if (cs.cancelUrl) return redirect(res, cs.cancelUrl);
      return html(res, 200, messagePage("Checkout cancelled", "You can close this page.", "ok"));
    }
    const result = engine.payCheckout(cs, form.get("outcome") === "decline");
    save();
    if (!result.ok) return html(res, 402, payPage(ctx(), cs, result.message));
    // Deliver the resulting events before sending the browser back, so the
    // return page normally finds the plan active (real Stripe gives no such promise).
    await delivery.idle();
    return redirect(res, result.redirect);
  }

  const portalMessages: Record<string, string> = {
    "change-price": "Your plan was changed.",
    "change-seats": "Your seats were changed.",
    cancel: "Your subscription will end at the end of the current period.",
    resume: "Your subscription will continue.",
    "payment-method": "Your test card was replaced.",
  };

  async function handlePortal(req: IncomingMessage, res: ServerResponse, id: string, url: URL, body: string) {
    const ps = state.portalSessions[id];
    if (!ps) return html(res, 404, messagePage("Portal session not found", "This billing link is not valid. Open billing again from Rainprint."));
    if (req.method === "GET") {
      const done = url.searchParams.get("done");
      return html(res, 200, portalPage(ctx(), ps, done && portalMessages[done] ? { ok: portalMessages[done] } : undefined));
    }
    const form = new URLSearchParams(body);
    const action = form.get("action") ?? "";
    try {
      if (action === "payment-method") {
        engine.replacePaymentMethod(engine.customer(ps.customer));
      } else {
        const sub = engine.subscription(form.get("subscription") ?? "");
        if (sub.customer !== ps.customer) throw new StripeApiError(403, "invalid_request_error", "That subscription belongs to another customer.");
        if (action === "change-price") engine.updateSubscription(sub, { price: form.get("price") ?? "" });
        else if (action === "change-seats") {
          const q = Number(form.get("quantity"));
          if (!Number.isInteger(q)) throw new StripeApiError(400, "invalid_request_error", "Seats must be a whole number.");
          engine.updateSubscription(sub, { quantity: q });
        } else if (action === "cancel") engine.updateSubscription(sub, { cancelAtPeriodEnd: true });
        else if (action === "resume") engine.updateSubscription(sub, { cancelAtPeriodEnd: false });
        else throw new StripeApiError(400, "invalid_request_error", `Unknown action: ${action}`);
      }
    } catch (e) {
      if (!(e instanceof StripeApiError)) throw e;
      return html(res, e.status, portalPage(ctx(), ps, { error: e.message }));
    }
    save();
    await delivery.idle();
    return redirect(res, `/portal/${ps.id}?done=${encodeURIComponent(action)}`);
  }

  // ───────────────────────────── control API ─────────────────────────────

  function eventSummary(e: StandinState["events"][number]) {
    return { id: e.id, type: e.type, created: e.created, delivered: e.delivered, held: e.held, deliveries: e.deliveries };
  }

  async function handleControl(req: IncomingMessage, res: ServerResponse, url: URL, body: string) {
    const method = req.method ?? "GET";
    const path = url.pathname.slice("/_standin".length);
    const b = method === "POST" ? controlBody(body) : {};
    const num = (k: string): number | undefined => {
      const v = b[k];
      if (v === undefined) return undefined;
      if (typeof v !== "number" || !Number.isFinite(v))
        throw new StripeApiError(400, "invalid_request_error", `${k} must be a number`, "parameter_invalid", k);
      return v;
    };
    const eventsSince = async (before: number) => {
      await delivery.idle();
      return state.events.slice(before).map(eventSummary);
    };
    const count = () => state.events.length;

    if (method === "POST" && path === "/reset") {
      await delivery.reset();
      state = emptyState();
      engine.state = state;
      idempotency.clear();
      persistence.writeNow(state);
      return json(res, 200, { reset: true });
    }
    if (method === "GET" && path === "/clock") return json(res, 200, { now: engine.now(), offset_seconds: Math.round(state.clockOffsetMs / 1000) });
    if (method === "POST" && path === "/clock") {
      const before = count();
      const to = num("to");
      const advance = (num("advance_seconds") ?? 0) + (num("advance_days") ?? 0) * 86_400;
      if (to === undefined && advance <= 0)
        throw new StripeApiError(400, "invalid_request_error", "Give advance_seconds, advance_days or to (Unix seconds).");
      engine.advanceTo(to ?? engine.now() + advance);
      save();
      return json(res, 200, { now: engine.now(), events: await eventsSince(before) });
    }
    if (method === "POST" && path === "/payments/decline") {
      const customer = b.customer === undefined || b.customer === null ? null : String(b.customer);
      if (customer) engine.customer(customer);
      const attempts = b.attempts === undefined ? 1 : b.attempts;
      if (attempts !== "always" && !(typeof attempts === "number" && Number.isInteger(attempts) && attempts > 0))
        throw new StripeApiError(400, "invalid_request_error", 'attempts must be a positive whole number or "always"', "parameter_invalid", "attempts");
      const rule: DeclineRule = { customer, remaining: attempts };
      state.declines.push(rule);
      save();
      return json(res, 200, { declines: state.declines });
    }
    if (method === "POST" && path === "/settings") {
      const s = state.settings;
      if (b.dunning_retry_days !== undefined) {
        const v = b.dunning_retry_days;
        if (!Array.isArray(v) || v.some((x) => typeof x !== "number" || x <= 0))
          throw new StripeApiError(400, "invalid_request_error", "dunning_retry_days must be a list of positive numbers of days");
        s.dunningRetryDays = v as number[];
      }
      if (b.after_final_failure !== undefined) {
        if (b.after_final_failure !== "cancel" && b.after_final_failure !== "unpaid")
          throw new StripeApiError(400, "invalid_request_error", 'after_final_failure must be "cancel" or "unpaid"');
        s.afterFinalFailure = b.after_final_failure;
      }
      if (b.webhook_retry_delays_ms !== undefined) {
        const v = b.webhook_retry_delays_ms;
        if (!Array.isArray(v) || v.some((x) => typeof x !== "number" || x < 0))
          throw new StripeApiError(400, "invalid_request_error", "webhook_retry_delays_ms must be a list of non-negative numbers");
        s.webhookRetryDelaysMs = v as number[];
      }
      save();
      return json(res, 200, { settings: s });
    }
    if (method === "GET" && path === "/events") {
      await delivery.idle();
      const type = url.searchParams.get("type");
      return json(res, 200, { data: state.events.filter((e) => !type || e.type === type).map(eventSummary) });
    }
    let m = /^\/events\/(evt_[A-Za-z0-9]+)\/deliver$/.exec(path);
    if (method === "POST" && m) {
      const ev = state.events.find((e) => e.id === m![1]);
      if (!ev) throw new StripeApiError(404, "invalid_request_error", `No such event: '${m[1]}'`, "resource_missing");
      const delivered = await delivery.deliverNow(ev);
      return json(res, 200, { event: eventSummary(ev), delivery: delivered });
    }
    if (method === "POST" && path === "/webhooks/hold") {
      state.webhooksHeld = true;
      return json(res, 200, { held: true });
    }
    if (method === "POST" && path === "/webhooks/release") {
      const order = Array.isArray(b.order) ? b.order.map(String) : [];
      const before = state.events.filter((e) => e.held).map((e) => e.id);
      await delivery.release(order);
      return json(res, 200, { delivered: before });
    }
    m = /^\/checkout\/(cs_test_[A-Za-z0-9]+)\/pay$/.exec(path);
    if (method === "POST" && m) {
      const cs = engine.checkout(m[1]);
      const before = count();
      const result = engine.payCheckout(cs);
      save();
      if (!result.ok) throw new StripeApiError(402, "card_error", result.message, "card_declined");
      return json(res, 200, { redirect: result.redirect, subscription: cs.subscription, events: await eventsSince(before) });
    }
    if (method === "GET" && path === "/state") return json(res, 200, state);
    throw new StripeApiError(404, "invalid_request_error", `Unknown control endpoint: ${method} ${url.pathname}`, "resource_missing");
  }

  // ───────────────────────────── server ─────────────────────────────

  const server = createServer((req, res) => {
    void (async () => {
      const url = new URL(req.url ?? "/", "http://127.0.0.1");
      try {
        const body = req.method === "POST" ? await readBody(req) : "";
        const path = url.pathname;
        if (path === "/health") return json(res, 200, { status: "ok" });
        if (path.startsWith("/v1/")) return await handleApi(req, res, url, body);
        if (path.startsWith("/_standin/") && opts.control) return await handleControl(req, res, url, body);
        let m = /^\/pay\/(cs_test_[A-Za-z0-9]+)$/.exec(path);
        if (m && (req.method === "GET" || req.method === "POST")) return await handlePay(req, res, m[1], body);
        m = /^\/portal\/(bps_[A-Za-z0-9]+)$/.exec(path);
        if (m && (req.method === "GET" || req.method === "POST")) return await handlePortal(req, res, m[1], url, body);
        m = /^\/invoice\/(in_[A-Za-z0-9]+)$/.exec(path);
        if (m && req.method === "GET") {
          const inv = state.invoices[m[1]];
          return inv ? html(res, 200, invoicePage(ctx(), inv)) : html(res, 404, messagePage("Invoice not found", "No invoice has this address."));
        }
        if (path === "/" && req.method === "GET") return html(res, 200, indexPage(engine.baseUrl));
        throw new StripeApiError(404, "invalid_request_error", `Unrecognized request URL (${req.method}: ${path}).`, "resource_missing");
      } catch (e) {
        if (e instanceof StripeApiError) return json(res, e.status, e.body());
        log(`internal error on ${req.method} ${url.pathname}: ${(e as Error).stack ?? String(e)}`);
        return json(res, 500, { error: { type: "api_error", message: "The payments stand-in failed; see its log." } });
      }
    })();
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port ?? 0, opts.host ?? "127.0.0.1", () => resolve());
  });
  const port = (server.address() as AddressInfo).port;
  const url = opts.publicUrl ?? `http://127.0.0.1:${port}`;
  engine.baseUrl = url;

  return {
    url,
    port,
    engine,
    delivery,
    async close() {
      delivery.close();
      persistence.writeNow(state);
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
