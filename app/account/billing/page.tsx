import type { Metadata } from "next";
import Link from "next/link";
import { ActionForm } from "@/components/billing/action-form";
import { INTERVAL_WORD, longDate } from "@/components/billing/format";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { listInvoices, type InvoiceListItem } from "@/lib/billing/checkout";
import type { BillingOwner } from "@/lib/billing/owner";
import { billingOverview, organizationName, type HolderBilling } from "@/lib/billing/overview";
import { formatMoney, PAYMENT_GRACE_DAYS, PLAN_CATALOGUE } from "@/lib/billing/plans";
import type { PaidPlanState } from "@/lib/billing/state";
import { checkoutAction, portalAction } from "../../pricing/actions";

export const metadata: Metadata = { title: "Billing" };

const SOURCE_TEXT = {
  organization: "through your organisation's subscription",
  subscription: "through your own subscription",
  "contributor-perk": "because samples you contributed were accepted within the last 12 months",
  none: "the free plan",
} as const;

async function invoicesOf(owner: BillingOwner): Promise<InvoiceListItem[] | null> {
  try {
    return await listInvoices(owner, 12);
  } catch (e) {
    console.error("[rainprint] listing invoices failed", e);
    return null;
  }
}

/** One line on how a paid plan stands: renews, ends, grace. */
function standingText(paid: PaidPlanState): string {
  const sub = paid.subscription;
  if (!sub) return "No subscription applies now.";
  const what = `${PLAN_CATALOGUE[paid.plan].name}, billed ${INTERVAL_WORD[sub.interval]}${PLAN_CATALOGUE[paid.plan].seats ? `, ${sub.seats} seats` : ""}.`;
  switch (paid.standing) {
    case "active":
      return `${what} Renews on ${longDate(paid.renewsAt)}.`;
    case "ending":
      return `${what} Cancelled: it keeps working until ${longDate(paid.endsAt)} and is not renewed.`;
    case "grace":
      return `${what} A payment failed: it keeps working until ${longDate(paid.endsAt)} while the payment is retried.`;
    default:
      return what;
  }
}

function Invoices({ invoices }: { invoices: InvoiceListItem[] | null }) {
  if (invoices === null) return <p className="text-sm text-ink-700">The invoices could not be loaded just now. Try again in a moment, or open Manage billing.</p>;
  if (!invoices.length) return <p className="text-sm text-ink-700">No invoices yet.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[32rem] text-left text-sm" data-testid="invoices">
        <thead className="border-b border-ink-300 text-ink-700">
          <tr>
            <th scope="col" className="py-2 pr-4 font-medium">Invoice</th>
            <th scope="col" className="py-2 pr-4 font-medium">Date</th>
            <th scope="col" className="py-2 pr-4 font-medium">Period</th>
            <th scope="col" className="py-2 pr-4 font-medium">Amount</th>
            <th scope="col" className="py-2 font-medium">Status</th>
          </tr>
        </thead>
        <tbody>
          {invoices.map((i) => (
            <tr key={i.id} className="border-b border-ink-100">
              <td className="py-2 pr-4">
                {i.hostedUrl ? (
                  <a className="underline" href={i.hostedUrl}>
                    {i.number ?? i.id}
                  </a>
                ) : (
                  (i.number ?? i.id)
                )}
              </td>
              <td className="py-2 pr-4">{longDate(i.created)}</td>
              <td className="py-2 pr-4">
                {longDate(i.periodStart)} – {longDate(i.periodEnd)}
              </td>
              <td className="py-2 pr-4">{formatMoney(i.amountCents, i.currency)}</td>
              <td className="py-2">{i.status === "paid" ? "Paid" : i.status === "open" ? "Not paid yet" : i.status === "void" ? "Void" : i.status}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

function ManageButton({ organizationId, label }: { organizationId?: string; label: string }) {
  return (
    <ActionForm action={portalAction} submitLabel={label} kind="secondary" testId={organizationId ? `portal-${organizationId}` : "portal-personal"}>
      {organizationId ? <input type="hidden" name="organizationId" value={organizationId} /> : null}
    </ActionForm>
  );
}

function HolderStatus({ holder, testId }: { holder: HolderBilling; testId: string }) {
  return (
    <p className="text-ink-800" data-testid={testId} data-standing={holder.paid.standing}>
      {standingText(holder.paid)}
    </p>
  );
}

export default async function BillingPage() {
  const viewer = await requirePageViewer({ path: "/account/billing" });
  const overview = await billingOverview(viewer);
  const personal = overview.personal;
  const personalInvoices = personal.hasBillingAccount ? await invoicesOf(personal.owner) : [];
  const owned = overview.organizations.filter((o) => o.role === "owner");
  const memberOf = overview.organizations.filter((o) => o.role === "member");
  const ownedInvoices = await Promise.all(owned.map((o) => (o.hasBillingAccount ? invoicesOf(o.owner) : Promise.resolve([]))));
  const banner = overview.banner;
  const bannerOrg = banner ? organizationName(viewer, banner.organizationId) : null;

  return (
    <div className="flex flex-col gap-8">
      <PageHeader title="Billing" lead="Your plan, what it comes from, renewals, seats and invoices. Payments and changes happen on our payment provider's pages.">
        <p className="mt-2 text-sm">
          <Link className="underline" href="/account">
            Back to your account
          </Link>
        </p>
      </PageHeader>

      {banner?.kind === "payment-failed" ? (
        <Alert tone="warn" title="A payment failed">
          {bannerOrg ? `The ${PLAN_CATALOGUE[banner.plan].name} plan of ${bannerOrg}` : `Your ${PLAN_CATALOGUE[banner.plan].name} plan`} keeps working until{" "}
          <strong>{longDate(banner.graceUntil)}</strong> (a grace period of {PAYMENT_GRACE_DAYS} days from the failed payment). If no payment has gone
          through by then, {bannerOrg ? "its members move" : "your account moves"} to the free Open plan: downloads, batch lookups and API keys stop
          working. Open Manage billing and replace the card; the open invoice is retried at once.
        </Alert>
      ) : banner?.kind === "lapsed" ? (
        <Alert tone="error" title="Plan paused after a failed payment">
          The grace period ended on {longDate(banner.since)}. {bannerOrg ? "Its members are" : "Your account is"} on the free Open plan until the
          payment goes through: open Manage billing and replace the card.
        </Alert>
      ) : banner?.kind === "ending" ? (
        <Alert tone="info" title="Your plan is set to end">
          It keeps working until {longDate(banner.endsAt)}. To keep it, open Manage billing and choose to keep the subscription.
        </Alert>
      ) : null}

      <section aria-labelledby="now-heading" className="rounded-md border border-ink-200 bg-white p-5">
        <h2 id="now-heading" className="text-lg font-semibold">
          Your plan now
        </h2>
        <p className="mt-2 text-xl font-semibold" data-testid="billing-plan">
          {PLAN_CATALOGUE[viewer.plan].name}
        </p>
        <p className="text-ink-700" data-testid="billing-plan-source">
          {SOURCE_TEXT[viewer.planSource]}
          {viewer.planSource === "contributor-perk" && overview.perkUntil ? `, until ${longDate(overview.perkUntil)} unless more of your data is accepted` : ""}.
        </p>
        <p className="mt-2 text-sm">
          <Link className="underline" href="/pricing">
            Compare plans
          </Link>
        </p>
      </section>

      <section aria-labelledby="own-heading" className="flex flex-col gap-3">
        <h2 id="own-heading" className="text-lg font-semibold">
          Your own subscription
        </h2>
        {personal.paid.subscription ? (
          <HolderStatus holder={personal} testId="personal-standing" />
        ) : (
          <p className="text-ink-700">You have no subscription of your own{personal.hasLiveSubscription ? " that applies now" : ""}.</p>
        )}
        <div className="flex flex-wrap gap-3">
          {personal.hasBillingAccount ? <ManageButton label="Manage billing — change, cancel, card, invoices" /> : null}
          {!personal.hasLiveSubscription && viewer.planSource === "organization" ? (
            <p className="text-sm text-ink-700">Your organisation&apos;s Institution plan already covers everything Researcher offers.</p>
          ) : null}
          {!personal.hasLiveSubscription && viewer.planSource !== "organization" ? (
            <>
              <ActionForm action={checkoutAction} submitLabel="Subscribe to Researcher, monthly" testId="billing-checkout-month">
                <input type="hidden" name="plan" value="researcher" />
                <input type="hidden" name="interval" value="month" />
              </ActionForm>
              <ActionForm action={checkoutAction} submitLabel="Subscribe to Researcher, yearly" kind="secondary" testId="billing-checkout-year">
                <input type="hidden" name="plan" value="researcher" />
                <input type="hidden" name="interval" value="year" />
              </ActionForm>
            </>
          ) : null}
        </div>
        {personal.hasBillingAccount ? (
          <>
            <h3 className="mt-2 font-semibold">Invoices</h3>
            <Invoices invoices={personalInvoices} />
          </>
        ) : null}
      </section>

      {owned.map((o, i) => (
        <section key={o.id} aria-labelledby={`org-${o.id}`} className="flex flex-col gap-3" data-testid={`org-billing-${o.slug}`}>
          <h2 id={`org-${o.id}`} className="text-lg font-semibold">
            {o.name} <span className="text-sm font-normal text-ink-600">(you own it)</span>
          </h2>
          {o.paid.subscription ? <HolderStatus holder={o} testId={`org-standing-${o.slug}`} /> : <p className="text-ink-700">No Institution subscription applies now.</p>}
          {o.seats ? (
            <p data-testid={`org-seats-${o.slug}`}>
              Seats: {o.seats.seats} paid, {o.seats.members} taken by members, {o.seats.pendingInvitations} reserved by pending invitations,{" "}
              {o.seats.free} free.
              {o.seats.over > 0 ? (
                <strong className="text-severity-fail">
                  {" "}
                  {o.seats.over} member{o.seats.over === 1 ? " has" : "s have"} no seat: add seats or remove members.
                </strong>
              ) : null}
            </p>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <Link href={`/organizations/${o.slug}`} className="rounded border border-ink-300 bg-white px-4 py-2 text-sm font-medium hover:bg-ink-50">
              Members and invitations
            </Link>
            {o.hasBillingAccount ? <ManageButton organizationId={o.id} label="Manage billing — seats, cancel, card" /> : null}
            {!o.hasLiveSubscription ? (
              <Link href="/pricing" className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800">
                Subscribe to Institution
              </Link>
            ) : null}
          </div>
          {o.hasBillingAccount ? (
            <>
              <h3 className="mt-2 font-semibold">Invoices</h3>
              <Invoices invoices={ownedInvoices[i]} />
            </>
          ) : null}
        </section>
      ))}

      {memberOf.length ? (
        <section aria-labelledby="member-heading" className="flex flex-col gap-2">
          <h2 id="member-heading" className="text-lg font-semibold">
            Organisations you belong to
          </h2>
          <ul className="list-disc pl-5">
            {memberOf.map((o) => (
              <li key={o.id}>
                <Link className="underline" href={`/organizations/${o.slug}`}>
                  {o.name}
                </Link>{" "}
                — {o.paid.subscription ? standingText(o.paid) : "no Institution subscription applies now."} Its owners manage its billing.
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}
