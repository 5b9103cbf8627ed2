import type { Metadata } from "next";
import Link from "next/link";
import { BuildForm } from "@/components/editions/build-form";
import { BuildStatus } from "@/components/editions/build-status";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { buildJobOf } from "@/lib/editions/lifecycle";
import { getCurrentEdition, listUnpublishedEditions } from "@/lib/editions/queries";

export const metadata: Metadata = { title: "Edition builds" };
export const dynamic = "force-dynamic";

export default async function EditionBuildsPage() {
  await requirePageViewer({ roles: ["moderator", "admin"], path: "/editions/builds" });
  const [current, pending] = await Promise.all([getCurrentEdition(), listUnpublishedEditions(20)]);
  const rows = await Promise.all(pending.map(async (e) => ({ e, job: await buildJobOf(e.jobId) })));
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Edition builds"
        lead="Build a new edition from the accepted samples as they are now, watch it, and publish it. The current edition stays what visitors see until the new one is published."
      >
        <p className="mt-2 text-sm text-ink-700">
          Current edition:{" "}
          {current ? (
            <Link className="underline" href={`/editions/${current.id}`}>
              {current.id}
            </Link>
          ) : (
            "none published yet"
          )}
        </p>
      </PageHeader>
      <section aria-labelledby="new-build">
        <h2 id="new-build" className="mb-3 text-lg font-semibold">
          New build
        </h2>
        <BuildForm />
      </section>
      <section aria-labelledby="builds">
        <h2 id="builds" className="mb-3 text-lg font-semibold">
          Builds not published
        </h2>
        {rows.length === 0 ? <p className="text-ink-700">None.</p> : null}
        <ul className="flex flex-col gap-6">
          {rows.map(({ e, job }) => (
            <li key={e.id} className="rounded border border-ink-200 p-4">
              <h3 className="mb-2 font-semibold">
                <Link className="underline" href={`/editions/${e.id}`}>
                  Edition {e.id}
                </Link>{" "}
                <span className="text-sm font-normal text-ink-600">started {e.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC</span>
              </h3>
              <BuildStatus initial={{ id: e.id, status: e.status, job }} />
            </li>
          ))}
        </ul>
      </section>
    </div>
  );
}
