import Link from "next/link";

// The site-wide billing notice under the header: a failed payment in its grace
// period, or a plan paused after the grace ended. Plain data in, no fetching.

export type BannerData =
  | {
      kind: "payment-failed" | "lapsed";
      planName: string;
      /** Grace end (payment-failed) or when the plan paused (lapsed), already formatted. */
      date: string;
      organization: { name: string; isOwner: boolean } | null;
    }
  | null;

export function BillingBanner({ banner }: { banner: BannerData }) {
  if (!banner) return null;
  const whose = banner.organization ? `The ${banner.planName} plan of ${banner.organization.name}` : `Your ${banner.planName} plan`;
  const canFix = !banner.organization || banner.organization.isOwner;
  const who = banner.organization ? "its members move" : "your account moves";
  return (
    <div role="status" data-testid="billing-banner" data-kind={banner.kind} className="border-b border-severity-warn/40 bg-amber-50 no-print">
      <div className="mx-auto max-w-6xl px-4 py-3 text-sm text-ink-900">
        {banner.kind === "payment-failed" ? (
          <p>
            <strong className="font-semibold">A payment failed.</strong> {whose} keeps working until <strong>{banner.date}</strong>; after that {who}{" "}
            to the free Open plan (no downloads, batch lookups or API keys) until a payment goes through.{" "}
            {canFix ? (
              <Link href="/account/billing" className="font-medium underline">
                Update the payment method under Billing
              </Link>
            ) : (
              <span>The organisation&apos;s owner has been told by e-mail.</span>
            )}
          </p>
        ) : (
          <p>
            <strong className="font-semibold">{whose} is paused.</strong> A payment failed and the grace period ended on {banner.date}, so{" "}
            {banner.organization ? "its members are" : "your account is"} on the free Open plan until the payment goes through.{" "}
            {canFix ? (
              <Link href="/account/billing" className="font-medium underline">
                Fix it under Billing
              </Link>
            ) : null}
          </p>
        )}
      </div>
    </div>
  );
}
