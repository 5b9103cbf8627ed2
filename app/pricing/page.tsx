import type { Metadata } from "next";
import Link from "next/link";
import { ActionForm } from "@/components/billing/action-form";
import { longDate } from "@/components/billing/format";
import { IntervalToggle } from "@/components/billing/interval-toggle";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { billingOverview, type BillingOverview } from "@/lib/billing/overview";
import { describePlan, formatMoney, PAYMENT_GRACE_DAYS, PLAN_CATALOGUE, PLAN_ORDER, type Plan, type PlanLimits } from "@/lib/billing/plans";
import { DATA_LICENCE } from "@/lib/downloads/licence";
import { checkoutAction } from "./actions";

export const metadata: Metadata = { title: "Plans and prices" };

type Props = { searchParams: Promise<{ interval?: string }> };

const n = (x: number) => x.toLocaleString("en-GB");

/** The comparison table's rows, straight from the catalogue's limits (what the server enforces). */
const ROWS: { label: string; cell: (l: PlanLimits, plan: Plan) => string }[] = [
  { label: "Map of every published edition, station pages, site reports", cell: () => "Yes" },
  { label: "Single-site lookups", cell: (l) => (l.siteLookupsPerDay === null ? "Unlimited" : `${n(l.siteLookupsPerDay)} a day`) },
  { label: "Batch lookups (sites per file or API call)", cell: (l) => (l.batchLookupMaxSites > 0 ? `Up to ${n(l.batchLookupMaxSites)}` : "—") },
  { label: "Edition surfaces as GeoTIFF and CSV", cell: (l) => (l.surfaceDownloads ? "Yes" : "—") },
  { label: "Accepted station data as CSV and GeoJSON", cell: (l) => (l.stationDataDownloads ? "Yes" : "—") },
  { label: "API keys", cell: (l) => (l.apiKeys > 0 ? `Up to ${n(l.apiKeys)}` : "None (keyless requests only)") },
  {
    label: "API requests a day",
    cell: (l, p) => `${n(l.apiRequestsPerDay)}${p === "open" ? " per address" : p === "institution" ? " shared by the organisation" : ""}`,
  },
  {
    label: "Seats",
    cell: (_l, p) => {
      const s = PLAN_CATALOGUE[p].seats;
      return s ? `${n(s.minSeats)}–${n(s.maxSeats)}, priced per seat` : p === "open" ? "—" : "One person";
    },
  },
];

function price(plan: Exclude<Plan, "open">, interval: "month" | "year") {
  const p = PLAN_CATALOGUE[plan].prices![interval];
  return `${formatMoney(p.unitAmountCents, p.currency)}${PLAN_CATALOGUE[plan].seats ? " per seat" : ""} a ${interval}`;
}

export default async function PricingPage({ searchParams }: Props) {
  const interval = (await searchParams).interval === "year" ? "year" : "month";
  const viewer = await getViewer();
  const overview = viewer ? await billingOverview(viewer) : null;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Plans and prices"
        lead="Everyone can browse the map and look up a few sites a day. Paid plans add downloads, batch site lookups and API access. Prices in euros; cancel at any time, the plan then runs to the end of the period you paid for."
      >
        <div className="mt-4">
          <IntervalToggle interval={interval} basePath="/pricing" />
        </div>
      </PageHeader>

      <ul className="grid gap-4 lg:grid-cols-3" aria-label="Plans">
        {PLAN_ORDER.map((plan) => (
          <li key={plan} className="flex flex-col rounded-md border border-ink-200 bg-white p-5" data-testid={`plan-${plan}`}>
            <h2 className="text-xl font-semibold">{PLAN_CATALOGUE[plan].name}</h2>
            <p className="mt-1 text-sm text-ink-700">{PLAN_CATALOGUE[plan].tagline}</p>
            <p className="mt-3 text-2xl font-semibold" data-testid={`price-${plan}`}>
              {plan === "open" ? "Free" : price(plan, interval)}
            </p>
            {plan !== "open" && interval === "year" ? (
              <p className="text-sm text-ink-600">Billed once a year; the same as ten months.</p>
            ) : null}
            <ul className="mt-4 flex-1 list-disc space-y-1 pl-5 text-sm text-ink-800">
              {describePlan(plan).map((line) => (
                <li key={line}>{line}</li>
              ))}
            </ul>
            <div className="mt-5">
              <PlanAction plan={plan} interval={interval} signedIn={Boolean(viewer)} viewerPlan={viewer?.plan ?? null} overview={overview} />
            </div>
          </li>
        ))}
      </ul>

      <section aria-labelledby="compare-heading">
        <h2 id="compare-heading" className="text-lg font-semibold">
          What each plan unlocks
        </h2>
        <div className="mt-3 overflow-x-auto">
          <table className="w-full min-w-[40rem] text-left text-sm">
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-2 pr-4 font-medium">
                  &nbsp;
                </th>
                {PLAN_ORDER.map((p) => (
                  <th key={p} scope="col" className="py-2 pr-4 font-semibold text-ink-900">
                    {PLAN_CATALOGUE[p].name}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {ROWS.map((r) => (
                <tr key={r.label} className="border-b border-ink-100">
                  <th scope="row" className="py-2 pr-4 font-normal text-ink-800">
                    {r.label}
                  </th>
                  {PLAN_ORDER.map((p) => (
                    <td key={p} className="py-2 pr-4">
                      {r.cell(PLAN_CATALOGUE[p].limits, p)}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      <section aria-labelledby="notes-heading" className="grid gap-4 text-sm text-ink-800 md:grid-cols-2">
        <h2 id="notes-heading" className="sr-only">
          How plans work
        </h2>
        <div className="rounded-md border border-ink-200 bg-white p-4">
          <h3 className="font-semibold text-ink-900">Contributors get Researcher features</h3>
          <p className="mt-1">
            If samples you contributed were accepted in the last 12 months, your account has the Researcher plan&apos;s features without
            paying. They stay while your data keeps arriving and lapse 12 months after the last accepted sample.
          </p>
        </div>
        <div className="rounded-md border border-ink-200 bg-white p-4">
          <h3 className="font-semibold text-ink-900">Payments and changes</h3>
          <p className="mt-1">
            Paying, changing interval or seats, replacing the card and cancelling all happen on our payment provider&apos;s pages; Rainprint
            never sees card numbers. If a payment fails, the plan keeps working for {PAYMENT_GRACE_DAYS} days while it is retried, and we
            tell you by e-mail.
          </p>
        </div>
        <div className="rounded-md border border-ink-200 bg-white p-4">
          <h3 className="font-semibold text-ink-900">Seats</h3>
          <p className="mt-1">
            Institution seats belong to an organisation. Its owners invite members by e-mail; each member takes one seat, owners included.
            With fewer seats than members, the members who joined last lose Institution features until seats are added.
          </p>
        </div>
        <div className="rounded-md border border-ink-200 bg-white p-4">
          <h3 className="font-semibold text-ink-900">Licence of the data</h3>
          <p className="mt-1">
            Downloaded station data and edition surfaces are released under{" "}
            <a className="underline" href={DATA_LICENCE.url}>
              {DATA_LICENCE.name}
            </a>
            : reuse them freely, crediting the contributors and Rainprint. The plans pay for the service — checks, review, editions,
            downloads and the API — not for the data.
          </p>
        </div>
      </section>
    </div>
  );
}

function PlanAction({
  plan,
  interval,
  signedIn,
  viewerPlan,
  overview,
}: {
  plan: Plan;
  interval: "month" | "year";
  signedIn: boolean;
  viewerPlan: Plan | null;
  overview: BillingOverview | null;
}) {
  const callback = `/sign-in?callbackUrl=${encodeURIComponent(`/pricing${interval === "year" ? "?interval=year" : ""}`)}`;
  if (plan === "open")
    return signedIn ? (
      <p className="text-sm text-ink-700">{viewerPlan === "open" ? "This is your plan now." : "Included in every account."}</p>
    ) : (
      <Link href="/sign-up" className="inline-block rounded border border-ink-300 bg-white px-4 py-2 text-sm font-medium hover:bg-ink-50">
        Create a free account
      </Link>
    );
  if (!signedIn || !overview)
    return (
      <Link href={callback} className="inline-block rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800">
        Sign in to subscribe
      </Link>
    );
  if (plan === "researcher") {
    if (overview.personal.hasLiveSubscription)
      return (
        <p className="text-sm">
          You have a Researcher subscription.{" "}
          <Link className="underline" href="/account/billing">
            Manage it under Billing
          </Link>
          .
        </p>
      );
    return (
      <div className="flex flex-col gap-2">
        {overview.perkUntil ? (
          <p className="text-sm text-ink-700">
            You have Researcher features as a contributor until {longDate(overview.perkUntil)}.
            Subscribe to keep them whatever happens to your data.
          </p>
        ) : null}
        {viewerPlan === "institution" ? (
          <p className="text-sm text-ink-700">You already have Institution features through your organisation.</p>
        ) : null}
        <ActionForm action={checkoutAction} submitLabel={`Subscribe — ${price("researcher", interval)}`} testId="checkout-researcher">
          <input type="hidden" name="plan" value="researcher" />
          <input type="hidden" name="interval" value={interval} />
        </ActionForm>
      </div>
    );
  }
  const seats = PLAN_CATALOGUE.institution.seats!;
  const owned = overview.organizations.filter((o) => o.role === "owner");
  const free = owned.filter((o) => !o.hasLiveSubscription);
  const subscribed = owned.filter((o) => o.hasLiveSubscription);
  return (
    <div className="flex flex-col gap-3">
      {subscribed.map((o) => (
        <p key={o.id} className="text-sm">
          {o.name} already subscribes.{" "}
          <Link className="underline" href="/account/billing">
            Change its seats under Billing
          </Link>
          .
        </p>
      ))}
      <ActionForm action={checkoutAction} submitLabel={`Subscribe — ${price("institution", interval)}`} testId="checkout-institution">
        <input type="hidden" name="plan" value="institution" />
        <input type="hidden" name="interval" value={interval} />
        <label className="flex flex-col gap-1 text-sm font-medium">
          Seats ({seats.minSeats}–{seats.maxSeats})
          <input
            name="seats"
            type="number"
            min={seats.minSeats}
            max={seats.maxSeats}
            defaultValue={seats.minSeats}
            required
            className="w-28 rounded border border-ink-300 px-3 py-2 text-base font-normal"
          />
        </label>
        {free.length ? (
          <label className="flex flex-col gap-1 text-sm font-medium">
            Organisation
            <select name="organizationId" className="rounded border border-ink-300 bg-white px-3 py-2 text-base font-normal" defaultValue={free[0].id}>
              {free.map((o) => (
                <option key={o.id} value={o.id}>
                  {o.name}
                </option>
              ))}
              <option value="">A new organisation (name it below)</option>
            </select>
          </label>
        ) : null}
        <label className="flex flex-col gap-1 text-sm font-medium">
          {free.length ? "Name of a new organisation (only if you chose a new one)" : "Name of your organisation"}
          <input name="organizationName" type="text" maxLength={120} autoComplete="organization" className="rounded border border-ink-300 px-3 py-2 text-base font-normal" />
          <span className="text-xs font-normal text-ink-600">
            {free.length ? "" : "You have no organisation yet: we create it with you as its owner. "}Institution seats belong to an organisation; its
            owners manage members and billing.
          </span>
        </label>
      </ActionForm>
    </div>
  );
}
