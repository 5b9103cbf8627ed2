import { formatMoney } from "@/lib/billing/plans";
import { layout, type Block, type RenderedMail } from "./layout";

// The billing notices (lib/billing/notices.ts → lib/billing/mail.ts): one
// template per kind of notice. Dates arrive as ISO strings and are shown in
// UTC, money in cents of the invoice's currency. `organization` is the
// organisation's name when the subscription belongs to one (the mail goes to
// its owners), null for a personal subscription.

type Common = {
  name: string | null;
  organization: string | null;
  planName: string;
  interval: "month" | "year";
  /** Institution seats; null for plans without seats. */
  seats: number | null;
  appUrl: string;
};

type Invoice = {
  number: string | null;
  amountCents: number;
  currency: string;
  periodStart: string;
  periodEnd: string;
  hostedUrl: string | null;
};

export const dateText = (iso: string | null): string =>
  iso
    ? new Date(iso).toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" })
    : "—";

const every = (i: Common["interval"]) => (i === "month" ? "monthly" : "yearly");

function hello(d: Common): Block {
  return { kind: "p", text: d.name ? `Hello ${d.name},` : "Hello," };
}

/** "Your Researcher plan" or "The Institution plan of Lakeshore Basin Water Institute". */
function whose(d: Common, capital = true): string {
  if (d.organization) return `${capital ? "The" : "the"} ${d.planName} plan of ${d.organization}`;
  return `${capital ? "Your" : "your"} ${d.planName} plan`;
}

function planLine(d: Common): string {
  return `${d.planName}, billed ${every(d.interval)}${d.seats ? `, ${d.seats} seats` : ""}`;
}

const billingButton = (d: Common): Block => ({ kind: "button", label: "Open billing", url: `${d.appUrl}/account/billing` });
const ownerNote = (d: Common): Block[] =>
  d.organization ? [{ kind: "small", text: `You receive this because you own ${d.organization} in Rainprint.` }] : [];

export type SubscriptionStartedData = Common & { renewsAt: string | null };

export function billingSubscriptionStarted(d: SubscriptionStartedData): RenderedMail {
  return layout({
    subject: `${d.organization ?? "Your account"} is now on the ${d.planName} plan`,
    heading: `Welcome to the ${d.planName} plan`,
    preheader: `${whose(d)} is active.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `${whose(d)} is active: ${planLine(d)}.` },
      {
        kind: "p",
        text: d.organization
          ? "Invite members from the organisation's page; each member takes one seat. Downloads, batch lookups and API keys are open to every member with a seat."
          : "Downloads of station data and edition surfaces, batch site lookups and API keys are now open to you.",
      },
      ...(d.renewsAt ? [{ kind: "p" as const, text: `It renews on ${dateText(d.renewsAt)}. You can change or cancel it at any time under Billing.` }] : []),
      billingButton(d),
      ...ownerNote(d),
    ],
  });
}

export type PaymentReceivedData = Common & { invoice: Invoice };

export function billingPaymentReceived(d: PaymentReceivedData): RenderedMail {
  const amount = formatMoney(d.invoice.amountCents, d.invoice.currency);
  return layout({
    subject: `Receipt: ${amount} for Rainprint ${d.planName}${d.invoice.number ? ` (${d.invoice.number})` : ""}`,
    heading: "Payment received — thank you",
    preheader: `We received ${amount} for ${whose(d, false)}.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `We received ${amount} for ${whose(d, false)} (${planLine(d)}).` },
      {
        kind: "p",
        text: `Invoice ${d.invoice.number ?? "(no number)"} covers ${dateText(d.invoice.periodStart)} to ${dateText(d.invoice.periodEnd)}.`,
      },
      ...(d.invoice.hostedUrl ? [{ kind: "button" as const, label: "View the invoice", url: d.invoice.hostedUrl }] : [billingButton(d)]),
      { kind: "small", text: "Rainprint never sees your card number: payments are handled by our payment provider." },
      ...ownerNote(d),
    ],
  });
}

export type PlanChangedData = Common & { before: { planName: string; interval: "month" | "year"; seats: number | null } };

export function billingPlanChanged(d: PlanChangedData): RenderedMail {
  const before = `${d.before.planName}, billed ${every(d.before.interval)}${d.before.seats ? `, ${d.before.seats} seats` : ""}`;
  const fewerSeats = d.seats !== null && d.before.seats !== null && d.seats < d.before.seats;
  return layout({
    subject: `${whose(d)} has changed`,
    heading: "Your plan has changed",
    preheader: `Now: ${planLine(d)}.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `${whose(d)} has changed from ${before} to ${planLine(d)}.` },
      ...(fewerSeats
        ? [
            {
              kind: "p" as const,
              text: "With fewer seats than members, the members who joined last keep their membership but lose Institution features until you add seats or remove other members. The organisation's page shows who is affected.",
            },
          ]
        : []),
      { kind: "p", text: "Changes made in the billing portal apply at once; the next invoice reflects them." },
      billingButton(d),
      ...ownerNote(d),
    ],
  });
}

export type CancellationScheduledData = Common & { endsAt: string | null };

export function billingCancellationScheduled(d: CancellationScheduledData): RenderedMail {
  return layout({
    subject: `${whose(d)} will end on ${dateText(d.endsAt)}`,
    heading: "Your plan is set to end",
    preheader: `It keeps working until ${dateText(d.endsAt)}.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `${whose(d)} was cancelled. It keeps working until ${dateText(d.endsAt)} and is not renewed; nothing more will be charged.` },
      {
        kind: "p",
        text: `After that ${d.organization ? "the organisation's members move" : "your account moves"} to the free Open plan: downloads, batch lookups and API keys stop working. Data you contributed stays yours and stays in Rainprint.`,
      },
      { kind: "p", text: "Changed your mind? Keep the subscription under Billing before that date." },
      billingButton(d),
      ...ownerNote(d),
    ],
  });
}

export type CancellationWithdrawnData = Common & { renewsAt: string | null };

export function billingCancellationWithdrawn(d: CancellationWithdrawnData): RenderedMail {
  return layout({
    subject: `${whose(d)} will continue`,
    heading: "Your plan will continue",
    preheader: "The cancellation was withdrawn.",
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      {
        kind: "p",
        text: `The cancellation of ${whose(d, false)} was withdrawn. It continues as before (${planLine(d)})${d.renewsAt ? ` and renews on ${dateText(d.renewsAt)}` : ""}.`,
      },
      billingButton(d),
      ...ownerNote(d),
    ],
  });
}

export type PaymentFailedData = Common & { invoice: Invoice; graceUntil: string; nextAttemptAt: string | null };

export function billingPaymentFailed(d: PaymentFailedData): RenderedMail {
  const amount = formatMoney(d.invoice.amountCents, d.invoice.currency);
  return layout({
    subject: `Action needed: a payment of ${amount} for Rainprint ${d.planName} failed`,
    heading: "A payment did not go through",
    preheader: `${whose(d)} keeps working until ${dateText(d.graceUntil)}.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `We could not collect ${amount} for ${whose(d, false)}${d.invoice.number ? ` (invoice ${d.invoice.number})` : ""}.` },
      {
        kind: "p",
        text: `Nothing changes yet: the plan keeps working until ${dateText(d.graceUntil)}. If no payment has gone through by then, ${
          d.organization ? "the organisation's members move" : "your account moves"
        } to the free Open plan: downloads, batch lookups and API keys stop working until the payment is made.`,
      },
      ...(d.nextAttemptAt ? [{ kind: "p" as const, text: `We will try the card again on ${dateText(d.nextAttemptAt)}.` }] : []),
      { kind: "p", text: "To fix it, open Billing, choose Manage billing and update the payment method; the open invoice is retried at once." },
      billingButton(d),
      ...ownerNote(d),
    ],
  });
}

export type SubscriptionEndedData = Common & { reason: "cancelled" | "payment-failed" | "other" };

export function billingSubscriptionEnded(d: SubscriptionEndedData): RenderedMail {
  const why =
    d.reason === "cancelled"
      ? "It was cancelled and the paid period is over."
      : d.reason === "payment-failed"
        ? "The last payment could not be collected after several attempts."
        : "It was ended by the payment provider.";
  return layout({
    subject: `${whose(d)} has ended`,
    heading: "Your plan has ended",
    preheader: `${d.organization ? "The organisation is" : "You are"} on the free Open plan now.`,
    appUrl: d.appUrl,
    blocks: [
      hello(d),
      { kind: "p", text: `${whose(d)} has ended. ${why}` },
      {
        kind: "p",
        text: `${d.organization ? "Its members are" : "You are"} on the free Open plan now: the map, station pages and a few site lookups a day. Downloads, batch lookups and API keys need a paid plan again.`,
      },
      { kind: "button", label: "See the plans", url: `${d.appUrl}/pricing` },
      ...ownerNote(d),
    ],
  });
}
