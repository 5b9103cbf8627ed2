import type { Metadata } from "next";
import Link from "next/link";
import { longDate } from "@/components/billing/format";
import { AcceptInvitation } from "@/components/billing/organization-controls";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer, signInUrl } from "@/lib/auth/guard";
import { peekInvitation } from "@/lib/organizations";

export const metadata: Metadata = { title: "Invitation" };

type Props = { searchParams: Promise<{ token?: string }> };

const STATUS_TEXT = {
  used: "This invitation has already been accepted. Each invitation works once.",
  expired: "This invitation has expired. Ask the organisation's owner to send a new one.",
  revoked: "The organisation's owner withdrew this invitation. Ask them for a new one if you still need it.",
  invalid: "This invitation link is not valid. Check that you opened the whole link from the e-mail.",
} as const;

/**
 * Where an invitation e-mail leads. Looking at the page never uses the
 * invitation; joining needs an account signed in with the invited address.
 */
export default async function AcceptInvitationPage({ searchParams }: Props) {
  const token = ((await searchParams).token ?? "").trim();
  const peek = token.length >= 16 && token.length <= 200 ? await peekInvitation(token) : ({ status: "invalid" } as const);
  if (peek.status !== "ok")
    return (
      <div className="max-w-prose" data-testid="invitation" data-status={peek.status}>
        <PageHeader title="This invitation cannot be used" />
        <Alert tone="error">{STATUS_TEXT[peek.status]}</Alert>
      </div>
    );
  const viewer = await getViewer();
  const here = `/invitations/accept?token=${encodeURIComponent(token)}`;
  const org = peek.organization.name;
  return (
    <div className="flex max-w-prose flex-col gap-4" data-testid="invitation" data-status="ok">
      <PageHeader
        title={`Join ${org}`}
        lead={`You are invited to take one of ${org}'s Institution seats on Rainprint: downloads, batch site lookups and the organisation's API access. The invitation is for ${peek.email} and is valid until ${longDate(peek.expiresAt)}.`}
      />
      {!viewer ? (
        <>
          <p>Sign in with {peek.email} to accept. No account yet? Create one with that address, confirm it from the e-mail we send, then open this invitation again.</p>
          <div className="flex flex-wrap gap-3">
            <Link href={signInUrl(here)} className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800" data-testid="invitation-sign-in">
              Sign in to accept
            </Link>
            <Link href="/sign-up" className="rounded border border-ink-300 bg-white px-4 py-2 text-sm font-medium hover:bg-ink-50">
              Create an account
            </Link>
          </div>
        </>
      ) : viewer.email.toLowerCase() !== peek.email ? (
        <Alert tone="warn" title="Signed in with another address">
          You are signed in as {viewer.email}, but the invitation is for {peek.email}. Sign out and sign in with the invited address, or ask the owner to
          invite {viewer.email}.
        </Alert>
      ) : viewer.organizations.some((o) => o.slug === peek.organization.slug) ? (
        <Alert tone="info">
          You are already a member of {org}.{" "}
          <Link className="underline" href={`/organizations/${peek.organization.slug}`}>
            Open the organisation
          </Link>
        </Alert>
      ) : (
        <AcceptInvitation token={token} organization={org} />
      )}
    </div>
  );
}
