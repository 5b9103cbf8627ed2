// The stand-in's own HTML pages: the test pay page, the billing portal page and
// a hosted invoice page. They say plainly that they are local test pages; no
// page ever asks for card data.
import { formatMoney } from "../../../lib/billing/plans";
import { checkoutAmount, invoiceTotal, priceOf, subscriptionPeriod, type RenderCtx } from "./render";
import type { CheckoutRec, InvoiceRec, PortalRec, SubscriptionRec } from "./store";

export function esc(s: string | number | null | undefined): string {
  return String(s ?? "")
    .replaceAll("&", "&amp;")
    .replaceAll("<", "&lt;")
    .replaceAll(">", "&gt;")
    .replaceAll('"', "&quot;")
    .replaceAll("'", "&#39;");
}

const date = (unix: number | null) =>
  unix === null ? "—" : new Date(unix * 1000).toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" });

const CSS = `
  :root { color-scheme: light; font-family: system-ui, sans-serif; }
  body { margin: 0; background: #f4f5f2; color: #1d2321; }
  .notice { background: #4a3b00; color: #fff8dc; padding: .6rem 1rem; font-size: .95rem; }
  main { max-width: 40rem; margin: 1.5rem auto; padding: 0 1rem; }
  .card { background: #fff; border: 1px solid #c9cec7; border-radius: .5rem; padding: 1.25rem; margin-bottom: 1rem; }
  h1 { font-size: 1.4rem; margin: 0 0 .75rem; } h2 { font-size: 1.1rem; margin: 0 0 .5rem; }
  table { width: 100%; border-collapse: collapse; } th, td { text-align: left; padding: .3rem .2rem; border-bottom: 1px solid #e3e6e1; }
  label { display: block; margin: .6rem 0 .2rem; font-weight: 600; }
  input, select { font: inherit; padding: .4rem; border: 1px solid #8a918a; border-radius: .3rem; }
  button { font: inherit; padding: .5rem 1rem; border-radius: .3rem; border: 1px solid #1f4d3d; background: #1f4d3d; color: #fff; cursor: pointer; margin: .4rem .4rem 0 0; }
  button.secondary { background: #fff; color: #1f4d3d; }
  button:focus-visible, a:focus-visible, input:focus-visible, select:focus-visible { outline: 3px solid #d08a00; outline-offset: 2px; }
  .error { background: #fde8e6; border: 1px solid #b3261e; color: #6b1510; padding: .6rem; border-radius: .3rem; }
  .ok { background: #e5f3ea; border: 1px solid #2e7d4f; padding: .6rem; border-radius: .3rem; }
  .muted { color: #555e58; font-size: .9rem; }
  fieldset { border: 1px solid #c9cec7; border-radius: .3rem; } form.inline { display: inline; }
`;

function layout(title: string, body: string): string {
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${esc(title)} — local payments stand-in</title><style>${CSS}</style></head>
<body>
<div class="notice" role="note"><strong>Local test page.</strong> This is Rainprint's local payments stand-in, not a real payment provider. No card details are asked for and no money moves.</div>
<main>${body}</main>
</body></html>`;
}

export function payPage(ctx: RenderCtx, cs: CheckoutRec, message?: string): string {
  const total = checkoutAmount(ctx, cs);
  const currency = cs.lines[0] ? priceOf(ctx, cs.lines[0].price).currency : "eur";
  const rows = cs.lines
    .map((l) => {
      const p = priceOf(ctx, l.price);
      const product = ctx.catalogue.products.get(p.product);
      return `<tr><td>${esc(product?.name ?? p.nickname)}<br><span class="muted">${esc(p.nickname)}</span></td><td>${l.quantity}</td><td>${esc(
        formatMoney(p.unitAmount * l.quantity, p.currency),
      )} per ${p.interval}</td></tr>`;
    })
    .join("");
  const customer = cs.customer ? ctx.state.customers[cs.customer] : undefined;
  const who = customer?.email ?? cs.customerEmail;
  if (cs.status !== "open")
    return layout(
      "Checkout closed",
      `<div class="card"><h1>This checkout is ${esc(cs.status)}</h1><p>Nothing more to do here.</p>${
        cs.cancelUrl ? `<p><a href="${esc(cs.cancelUrl)}">Go back</a></p>` : ""
      }</div>`,
    );
  return layout(
    "Test payment",
    `<div class="card">
  <h1>Test payment</h1>
  ${who ? `<p class="muted">For ${esc(who)}</p>` : ""}
  <table><thead><tr><th scope="col">Item</th><th scope="col">Quantity</th><th scope="col">Amount</th></tr></thead><tbody>${rows}</tbody></table>
  <p><strong>Total due today: ${esc(formatMoney(total, currency))}</strong>, then again every period until cancelled.</p>
  ${message ? `<p class="error" role="alert">${esc(message)}</p>` : ""}
  <form method="post" action="/pay/${esc(cs.id)}">
    <fieldset>
      <legend>Test card</legend>
      <p class="muted">A pretend card is on file for this test. There is nothing to type in: never enter real card details here.</p>
      <label for="outcome">What should this test payment do?</label>
      <select id="outcome" name="outcome">
        <option value="succeed">Succeed</option>
        <option value="decline">Be declined</option>
      </select>
    </fieldset>
    <button type="submit" name="action" value="pay">Pay ${esc(formatMoney(total, currency))}</button>
    <button type="submit" name="action" value="cancel" class="secondary">Cancel</button>
  </form>
</div>`,
  );
}

function subscriptionCard(ctx: RenderCtx, ps: PortalRec, sub: SubscriptionRec): string {
  const price = priceOf(ctx, sub.price);
  const product = ctx.catalogue.products.get(price.product);
  const period = subscriptionPeriod(ctx, sub);
  const active = sub.status !== "canceled";
  const status =
    sub.status === "canceled"
      ? `Ended on ${date(sub.endedAt)}`
      : sub.cancelAtPeriodEnd
        ? `Ends on ${date(period.end)}`
        : sub.status === "active"
          ? `Renews on ${date(period.end)}`
          : sub.status === "past_due"
            ? "Payment failed — update the payment method"
            : "Unpaid — update the payment method";
  const options = [...ctx.catalogue.prices.values()]
    .filter((p) => p.product === price.product)
    .map((p) => `<option value="${esc(p.id)}"${p.id === sub.price ? " selected" : ""}>${esc(p.nickname)} — ${esc(formatMoney(p.unitAmount, p.currency))} per ${p.interval}</option>`)
    .join("");
  const action = (name: string, label: string, extra = "", cls = "") =>
    `<form method="post" action="/portal/${esc(ps.id)}" class="inline"><input type="hidden" name="subscription" value="${esc(sub.id)}">${extra}<button type="submit" name="action" value="${name}"${cls ? ` class="${cls}"` : ""}>${label}</button></form>`;
  return `<section class="card" aria-label="${esc(product?.name ?? "Subscription")}">
  <h2>${esc(product?.name ?? price.nickname)}</h2>
  <p>${esc(price.nickname)}${product?.seats ? ` · ${sub.quantity} seats` : ""} · ${esc(formatMoney(price.unitAmount * sub.quantity, price.currency))} per ${price.interval}</p>
  <p><strong>${esc(status)}</strong></p>
  ${
    active
      ? `<form method="post" action="/portal/${esc(ps.id)}">
    <input type="hidden" name="subscription" value="${esc(sub.id)}">
    <label for="price-${esc(sub.id)}">Plan and billing interval</label>
    <select id="price-${esc(sub.id)}" name="price">${options}</select>
    <button type="submit" name="action" value="change-price">Change plan</button>
  </form>
  ${
    product?.seats
      ? `<form method="post" action="/portal/${esc(ps.id)}">
    <input type="hidden" name="subscription" value="${esc(sub.id)}">
    <label for="seats-${esc(sub.id)}">Seats (${product.seats.min}–${product.seats.max})</label>
    <input id="seats-${esc(sub.id)}" name="quantity" type="number" min="${product.seats.min}" max="${product.seats.max}" value="${sub.quantity}" required>
    <button type="submit" name="action" value="change-seats">Change seats</button>
  </form>`
      : ""
  }
  <p>${
    sub.cancelAtPeriodEnd
      ? action("resume", "Keep my subscription")
      : action("cancel", "Cancel at the end of the period", "", "secondary")
  }</p>`
      : ""
  }
</section>`;
}

export function portalPage(ctx: RenderCtx, ps: PortalRec, flash?: { ok?: string; error?: string }): string {
  const customer = ctx.state.customers[ps.customer];
  const subs = Object.values(ctx.state.subscriptions)
    .filter((s) => s.customer === ps.customer)
    .sort((a, b) => b.created - a.created);
  const invoices = Object.values(ctx.state.invoices)
    .filter((i) => i.customer === ps.customer)
    .sort((a, b) => b.created - a.created);
  const invoiceRows = invoices
    .map(
      (i) =>
        `<tr><td><a href="/invoice/${esc(i.id)}">${esc(i.number)}</a></td><td>${date(i.created)}</td><td>${esc(
          formatMoney(invoiceTotal(i), i.currency),
        )}</td><td>${i.status === "paid" ? "Paid" : i.status === "open" ? "Not paid" : "Void"}</td></tr>`,
    )
    .join("");
  return layout(
    "Manage billing",
    `<h1>Manage billing</h1>
<p class="muted">${esc(customer?.email ?? ps.customer)}</p>
${flash?.ok ? `<p class="ok" role="status">${esc(flash.ok)}</p>` : ""}
${flash?.error ? `<p class="error" role="alert">${esc(flash.error)}</p>` : ""}
${subs.length ? subs.map((s) => subscriptionCard(ctx, ps, s)).join("") : `<div class="card"><p>No subscriptions.</p></div>`}
<section class="card" aria-label="Payment method">
  <h2>Payment method</h2>
  <p>${customer?.paymentMethod ? `Test card ending ${esc(customer.paymentMethod.last4)} (not a real card)` : "No card on file"}</p>
  <form method="post" action="/portal/${esc(ps.id)}"><button type="submit" name="action" value="payment-method">Replace with a new test card</button></form>
  <p class="muted">Replacing the card retries any unpaid invoice at once.</p>
</section>
<section class="card" aria-label="Invoices">
  <h2>Invoices</h2>
  ${invoices.length ? `<table><thead><tr><th scope="col">Number</th><th scope="col">Date</th><th scope="col">Amount</th><th scope="col">Status</th></tr></thead><tbody>${invoiceRows}</tbody></table>` : "<p>No invoices yet.</p>"}
</section>
${ps.returnUrl ? `<p><a href="${esc(ps.returnUrl)}">Return to Rainprint</a></p>` : ""}`,
  );
}

export function invoicePage(ctx: RenderCtx, inv: InvoiceRec): string {
  const customer = ctx.state.customers[inv.customer];
  const rows = inv.lines
    .map(
      (l) =>
        `<tr><td>${esc(l.description)}<br><span class="muted">${date(l.periodStart)} – ${date(l.periodEnd)}</span></td><td>${esc(
          formatMoney(l.amount, inv.currency),
        )}</td></tr>`,
    )
    .join("");
  return layout(
    `Invoice ${inv.number}`,
    `<div class="card"><h1>Invoice ${esc(inv.number)}</h1>
<p>Billed to ${esc(customer?.email ?? inv.customer)} on ${date(inv.created)}</p>
<table><thead><tr><th scope="col">Description</th><th scope="col">Amount</th></tr></thead><tbody>${rows}</tbody></table>
<p><strong>Total ${esc(formatMoney(invoiceTotal(inv), inv.currency))}</strong> — ${
      inv.status === "paid" ? `paid on ${date(inv.paidAt)}` : inv.status === "open" ? "not paid" : "void"
    }</p></div>`,
  );
}

export function indexPage(baseUrl: string): string {
  return layout(
    "Payments stand-in",
    `<div class="card"><h1>Payments stand-in</h1>
<p>Answers the Stripe SDK at <code>${esc(baseUrl)}/v1/…</code> for local development and tests, serves the test pay page and the billing portal page, and sends signed webhook events to the app. See DEVELOPERS.md, "Billing and the payments stand-in".</p></div>`,
  );
}

export function messagePage(title: string, message: string, status = "error"): string {
  return layout(title, `<div class="card"><h1>${esc(title)}</h1><p class="${status}">${esc(message)}</p></div>`);
}
