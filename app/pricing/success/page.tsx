import type { Metadata } from "next";
import Link from "next/link";
import { AutoRefresh } from "@/components/billing/auto-refresh";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { checkoutStatusFor } from "@/lib/billing/overview";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";

export const metadata: Metadata = { title: "Thank you" };

type Props = { searchParams: Promise<{ session?: string }> };

const SESSION = /^cs_[A-Za-z0-9_]{1,200}$/;

/**
 * Where Checkout sends the browser back. The plan becomes active when Stripe's
 * webhook arrives, which can be a moment after the browser: until then the
 * page says so and refreshes itself.
 */
export default async function CheckoutSuccessPage({ searchParams }: Props) {
  const session = (await searchParams).session ?? "";
  const viewer = await requirePageViewer({ path: `/pricing/success?session=${encodeURIComponent(session)}` });
  const state = SESSION.test(session) ? await checkoutStatusFor(viewer, session) : ({ status: "unknown" } as const);
  if (state.status === "unknown")
    return (
      <div className="max-w-prose" data-testid="checkout-status" data-status="unknown">
        <PageHeader title="We could not find this checkout" lead="The link does not belong to a checkout of your account." />
        <p>
          If you just paid, open{" "}
          <Link className="underline" href="/account/billing">
            Billing
          </Link>{" "}
          to see your plan.
        </p>
      </div>
    );
  const planName = PLAN_CATALOGUE[state.plan].name;
  if (state.status === "waiting")
    return (
      <div className="max-w-prose" data-testid="checkout-status" data-status="waiting">
        <PageHeader title="Thank you — confirming your payment" lead={`We are waiting for our payment provider to confirm the ${planName} plan. This usually takes a few seconds.`} />
        <Alert tone="info">This page updates by itself. You can also leave it: the plan appears as soon as the confirmation arrives, and we send a receipt by e-mail.</Alert>
        <AutoRefresh />
      </div>
    );
  return (
    <div className="max-w-prose" data-testid="checkout-status" data-status="active">
      <PageHeader
        title={`The ${planName} plan is active`}
        lead={state.organization ? `${state.organization.name} is on the ${planName} plan. A receipt is on its way by e-mail.` : `Your account is on the ${planName} plan. A receipt is on its way by e-mail.`}
      />
      <ul className="list-disc space-y-1 pl-5">
        {state.organization ? (
          <li>
            <Link className="underline" href={`/organizations/${state.organization.slug}`}>
              Invite members to {state.organization.name}
            </Link>{" "}
            — each takes one seat.
          </li>
        ) : null}
        <li>
          <Link className="underline" href="/downloads">
            Download station data and edition surfaces
          </Link>
        </li>
        <li>
          <Link className="underline" href="/account/billing">
            See billing, invoices and renewal
          </Link>
        </li>
      </ul>
    </div>
  );
}
