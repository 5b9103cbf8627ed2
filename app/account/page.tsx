import type { Metadata } from "next";
import Link from "next/link";
import { ChangePasswordForm, ProfileForm } from "@/components/account/account-forms";
import { PageHeader } from "@/components/ui/page-header";
import { getProfile } from "@/lib/auth/accounts";
import { requirePageViewer } from "@/lib/auth/guard";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password";

export const metadata: Metadata = { title: "Your account" };

const PLAN_TEXT = {
  open: { name: "Open", text: "Browse the map, public station pages and a few site lookups a day." },
  researcher: { name: "Researcher", text: "Bulk downloads and batch site lookups." },
  institution: { name: "Institution", text: "Everything in Researcher for your organisation's members, plus API keys." },
} as const;

const SOURCE_TEXT = {
  organization: "through your organisation's subscription",
  subscription: "through your own subscription",
  "contributor-perk": "because samples you contributed were accepted within the last 12 months",
  none: "the free plan",
} as const;

export default async function AccountPage() {
  const viewer = await requirePageViewer({ path: "/account" });
  const profile = await getProfile(viewer.id);
  const plan = PLAN_TEXT[viewer.plan];
  return (
    <div className="flex flex-col gap-10">
      <PageHeader title="Your account" lead={`Signed in as ${viewer.email}.`} />
      <section aria-labelledby="plan-heading" className="rounded-md border border-ink-200 bg-white p-5">
        <h2 id="plan-heading" className="text-lg font-semibold">
          Role and plan
        </h2>
        <dl className="mt-3 grid gap-3 sm:grid-cols-2">
          <div>
            <dt className="text-sm text-ink-600">Role</dt>
            <dd className="font-medium capitalize" data-testid="account-role">
              {viewer.role}
            </dd>
          </div>
          <div>
            <dt className="text-sm text-ink-600">Plan</dt>
            <dd className="font-medium" data-testid="account-plan">
              {plan.name} <span className="font-normal text-ink-700">— {SOURCE_TEXT[viewer.planSource]}</span>
            </dd>
            <dd className="text-sm text-ink-700">{plan.text}</dd>
            <dd className="mt-1 text-sm">
              <Link href="/account/billing" className="underline">
                Billing — plan, renewal, seats and invoices
              </Link>
            </dd>
          </div>
        </dl>
        {viewer.organizations.length ? (
          <div className="mt-4">
            <h3 className="text-sm font-semibold">Organisations</h3>
            <ul className="mt-1 list-disc pl-5">
              {viewer.organizations.map((o) => (
                <li key={o.id}>
                  <Link href={`/organizations/${o.slug}`} className="underline">
                    {o.name}
                  </Link>{" "}
                  <span className="text-sm text-ink-600">({o.role})</span>
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </section>
      <section aria-labelledby="profile-heading">
        <h2 id="profile-heading" className="mb-3 text-lg font-semibold">
          Profile
        </h2>
        <ProfileForm name={viewer.name ?? ""} affiliation={profile?.affiliation ?? ""} />
      </section>
      <section aria-labelledby="password-heading">
        <h2 id="password-heading" className="mb-3 text-lg font-semibold">
          Password
        </h2>
        <ChangePasswordForm minLength={PASSWORD_MIN_LENGTH} />
      </section>
    </div>
  );
}
