import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { isAppError } from "@/lib/errors";
import { getOrganizationForViewer } from "@/lib/organizations";

export const metadata: Metadata = { title: "Organisation" };

type Props = { params: Promise<{ slug: string }> };

export default async function OrganizationPage({ params }: Props) {
  const { slug } = await params;
  const viewer = await requirePageViewer({ path: `/organizations/${encodeURIComponent(slug)}` });
  const org = await getOrganizationForViewer(viewer, slug).catch((e) => {
    if (isAppError(e) && e.status === 404) notFound();
    throw e;
  });
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={org.name} lead={`You are ${org.viewerRole === "admin" ? "viewing as an administrator" : `a ${org.viewerRole} of this organisation`}.`}>
        {org.isDemo ? <DemoLabel what="invented organisation" className="mt-3" /> : null}
      </PageHeader>
      <section aria-labelledby="sub-heading">
        <h2 id="sub-heading" className="text-lg font-semibold">
          Subscription
        </h2>
        <p className="mt-1 text-ink-700">
          {org.subscription
            ? `Institution plan (${org.subscription.status}), ${org.subscription.seats} seats.`
            : "No active Institution subscription. Seats and billing are managed here once the organisation subscribes."}
        </p>
      </section>
      <section aria-labelledby="members-heading">
        <h2 id="members-heading" className="text-lg font-semibold">
          Members
        </h2>
        <div className="mt-2 overflow-x-auto">
          <table className="w-full min-w-[28rem] text-left text-sm">
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-2 pr-4 font-medium">Name</th>
                <th scope="col" className="py-2 pr-4 font-medium">E-mail</th>
                <th scope="col" className="py-2 font-medium">Membership</th>
              </tr>
            </thead>
            <tbody>
              {org.members.map((m) => (
                <tr key={m.id} className="border-b border-ink-100">
                  <td className="py-2 pr-4">{m.name ?? "—"}</td>
                  <td className="py-2 pr-4">{m.email}</td>
                  <td className="py-2">{m.role}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </div>
  );
}
