import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { INTERVAL_WORD, longDate } from "@/components/billing/format";
import { ConfirmDelete, InviteForm } from "@/components/billing/organization-controls";
import { DemoLabel } from "@/components/demo-label";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { isAppError } from "@/lib/errors";
import { getOrganizationForViewer, type OrganizationView } from "@/lib/organizations";

export const metadata: Metadata = { title: "Organisation" };

type Props = { params: Promise<{ slug: string }> };

function subscriptionText(org: OrganizationView): string {
  const s = org.subscription;
  if (!s) return "No Institution subscription applies now. Members get Institution features once the organisation subscribes.";
  const base = `Institution plan, billed ${INTERVAL_WORD[s.interval as "month" | "year"] ?? s.interval}, ${s.seats} seats.`;
  if (s.standing === "ending") return `${base} Cancelled: it keeps working until ${longDate(s.endsAt)}.`;
  if (s.standing === "grace") return `${base} A payment failed: it keeps working until ${longDate(s.endsAt)} while the payment is retried.`;
  return `${base} Renews on ${longDate(s.renewsAt)}.`;
}

export default async function OrganizationPage({ params }: Props) {
  const { slug } = await params;
  const viewer = await requirePageViewer({ path: `/organizations/${encodeURIComponent(slug)}` });
  const org = await getOrganizationForViewer(viewer, slug).catch((e) => {
    if (isAppError(e) && e.status === 404) notFound();
    throw e;
  });
  const isOwner = org.viewerRole === "owner";
  const seats = org.seats;
  const withoutSeat = org.members.filter((m) => !m.hasSeat);
  const me = org.members.find((m) => m.id === viewer.id);
  return (
    <div className="flex flex-col gap-8">
      <PageHeader title={org.name} lead={`You are ${org.viewerRole === "admin" ? "viewing as an administrator" : `${org.viewerRole === "owner" ? "an owner" : "a member"} of this organisation`}.`}>
        {org.isDemo ? <DemoLabel what="invented organisation" className="mt-3" /> : null}
      </PageHeader>

      <section aria-labelledby="sub-heading" className="flex flex-col gap-2">
        <h2 id="sub-heading" className="text-lg font-semibold">
          Subscription and seats
        </h2>
        <p className="text-ink-800" data-testid="org-subscription">
          {subscriptionText(org)}
        </p>
        {seats ? (
          <dl className="grid max-w-2xl grid-cols-2 gap-3 sm:grid-cols-4" data-testid="org-seats" data-seats={seats.seats} data-free={seats.free} data-over={seats.over}>
            <div className="rounded border border-ink-200 bg-white p-3">
              <dt className="text-sm text-ink-600">Seats paid for</dt>
              <dd className="text-xl font-semibold">{seats.seats}</dd>
            </div>
            <div className="rounded border border-ink-200 bg-white p-3">
              <dt className="text-sm text-ink-600">Taken by members</dt>
              <dd className="text-xl font-semibold">{seats.members}</dd>
            </div>
            <div className="rounded border border-ink-200 bg-white p-3">
              <dt className="text-sm text-ink-600">Reserved by invitations</dt>
              <dd className="text-xl font-semibold">{seats.pendingInvitations}</dd>
            </div>
            <div className="rounded border border-ink-200 bg-white p-3">
              <dt className="text-sm text-ink-600">Free</dt>
              <dd className="text-xl font-semibold">{seats.free}</dd>
            </div>
          </dl>
        ) : null}
        {seats && seats.over > 0 ? (
          <Alert tone="warn" title="More members than seats">
            The organisation has {seats.members} members and pays for {seats.seats} seats. The {seats.over} member{seats.over === 1 ? " who" : "s who"} joined
            last ({withoutSeat.map((m) => m.name ?? m.email).join(", ")}) keep their membership but have no Institution features until seats are added
            or other members are removed. New invitations are refused meanwhile.
          </Alert>
        ) : null}
        {me && !me.hasSeat && org.subscription ? (
          <p className="text-sm text-severity-fail">You hold no seat at the moment, so the organisation&apos;s plan does not apply to you.</p>
        ) : null}
        {isOwner ? (
          <p className="text-sm">
            <Link className="underline" href="/account/billing">
              Billing
            </Link>{" "}
            — change seats, interval or card, cancel, invoices.{" "}
            {!org.subscription ? (
              <Link className="underline" href="/pricing">
                Subscribe to Institution
              </Link>
            ) : null}
          </p>
        ) : (
          <p className="text-sm text-ink-700">The organisation&apos;s owners manage its seats and billing.</p>
        )}
      </section>

      <section aria-labelledby="members-heading">
        <h2 id="members-heading" className="text-lg font-semibold">
          Members
        </h2>
        <div className="mt-2 overflow-x-auto">
          <table className="w-full min-w-[36rem] text-left text-sm" data-testid="members">
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-2 pr-4 font-medium">Name</th>
                <th scope="col" className="py-2 pr-4 font-medium">E-mail</th>
                <th scope="col" className="py-2 pr-4 font-medium">Membership</th>
                <th scope="col" className="py-2 pr-4 font-medium">Seat</th>
                {isOwner ? <th scope="col" className="py-2 font-medium"><span className="sr-only">Actions</span></th> : null}
              </tr>
            </thead>
            <tbody>
              {org.members.map((m) => (
                <tr key={m.id} className="border-b border-ink-100" data-testid={`member-${m.email}`}>
                  <td className="py-2 pr-4">{m.name ?? "—"}</td>
                  <td className="py-2 pr-4">{m.email}</td>
                  <td className="py-2 pr-4">{m.role}, since {longDate(m.joinedAt)}</td>
                  <td className="py-2 pr-4">{org.subscription ? (m.hasSeat ? "Yes" : "No — over the seat count") : "—"}</td>
                  {isOwner ? (
                    <td className="py-2">
                      {m.id !== viewer.id ? (
                        <ConfirmDelete
                          url={`/api/organizations/${encodeURIComponent(org.slug)}/members/${encodeURIComponent(m.id)}`}
                          label="Remove"
                          confirmLabel={`Remove ${m.name ?? m.email} now`}
                          testId={`remove-${m.email}`}
                        />
                      ) : null}
                    </td>
                  ) : null}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {isOwner ? <p className="mt-2 text-sm text-ink-700">A removed member loses the organisation&apos;s plan at once, on their next page or request.</p> : null}
      </section>

      {isOwner || viewer.role === "admin" ? (
        <section aria-labelledby="invite-heading" className="flex flex-col gap-3">
          <h2 id="invite-heading" className="text-lg font-semibold">
            Invitations
          </h2>
          {org.invitations.length ? (
            <ul className="flex flex-col gap-2" data-testid="pending-invitations">
              {org.invitations.map((i) => (
                <li key={i.id} className="flex flex-wrap items-center gap-3 text-sm">
                  <span>
                    {i.email} — sent {longDate(i.createdAt)}
                    {i.invitedBy ? ` by ${i.invitedBy}` : ""}, valid until {longDate(i.expiresAt)}
                  </span>
                  {isOwner ? (
                    <ConfirmDelete
                      url={`/api/organizations/${encodeURIComponent(org.slug)}/invitations/${encodeURIComponent(i.id)}`}
                      label="Withdraw"
                      confirmLabel="Withdraw the invitation"
                    />
                  ) : null}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-sm text-ink-700">No pending invitations.</p>
          )}
          {isOwner ? <InviteForm slug={org.slug} refusal={org.inviteRefusal} /> : null}
        </section>
      ) : null}
    </div>
  );
}
