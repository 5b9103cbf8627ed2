import type { Metadata } from "next";
import Link from "next/link";
import { SeverityBadge } from "@/components/intake/severity";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { batchSummaries, returnedSamplesOf } from "@/lib/intake/batches";
import { contributorUsage } from "@/lib/intake/usage";
import { listStationsOf } from "@/lib/intake/stations";

export const metadata: Metadata = { title: "Your contributions" };

const STATUS_WORDS: Record<string, string> = { pending: "waiting for approval", approved: "approved", returned: "returned for changes", rejected: "rejected", retired: "retired" };

export default async function ContributePage() {
  const viewer = await requirePageViewer({ path: "/contribute" });
  const [stations, batches, returned, usage] = await Promise.all([listStationsOf(viewer.id), batchSummaries({ contributorId: viewer.id }), returnedSamplesOf(viewer.id), contributorUsage(viewer.id)]);
  return (
    <div className="flex flex-col gap-8">
      <PageHeader title="Your contributions" lead="Your stations, the batches you submitted, samples to correct, and how your data is used.">
        <p className="mt-3 flex flex-wrap gap-4">
          <Link className="underline" href="/contribute/stations/new">Register a station</Link>
          <Link className="underline" href="/contribute/batches/new">Submit samples</Link>
        </p>
      </PageHeader>

      {returned.length ? (
        <section aria-labelledby="fix-heading" className="flex flex-col gap-2">
          <h2 id="fix-heading" className="text-lg font-semibold">Samples to correct ({returned.length})</h2>
          <ul className="flex flex-col gap-1" data-testid="returned-samples">
            {returned.map((r) => (
              <li key={r.id}>
                <Link className="underline" href={`/contribute/batches/${r.batchId}#sample-${r.id}`}>{r.code}, {r.startDate} → {r.endDate}</Link>: {r.reason}
              </li>
            ))}
          </ul>
        </section>
      ) : null}

      <section aria-labelledby="stations-heading" className="flex flex-col gap-2">
        <h2 id="stations-heading" className="text-lg font-semibold">Stations</h2>
        {!stations.length ? <p className="text-ink-700">No stations yet. <Link className="underline" href="/contribute/stations/new">Register your first collector</Link>.</p> : null}
        <ul className="flex flex-col gap-1" data-testid="my-stations">
          {stations.map((s) => (
            <li key={s.id}>
              <Link className="underline" href={`/contribute/stations/${encodeURIComponent(s.code)}`}>{s.code}</Link> — {s.name}: <span data-status={s.status}>{STATUS_WORDS[s.status] ?? s.status}</span>
              {s.isDemo ? <span className="ml-1 text-xs text-ink-600">(synthetic demo data)</span> : null}
            </li>
          ))}
        </ul>
      </section>

      <section aria-labelledby="batches-heading" className="flex flex-col gap-2">
        <h2 id="batches-heading" className="text-lg font-semibold">Batches</h2>
        {!batches.length ? <p className="text-ink-700">No batches yet.</p> : null}
        <div className="overflow-x-auto">
          <table className="w-full min-w-[40rem] text-left text-sm" data-testid="my-batches">
            <thead className="border-b border-ink-300">
              <tr><th className="py-1 pr-3 font-medium">Submitted</th><th className="py-1 pr-3 font-medium">Stations</th><th className="py-1 pr-3 font-medium">Status</th><th className="py-1 pr-3 font-medium">Samples</th><th className="py-1 pr-3 font-medium">Worst check</th></tr>
            </thead>
            <tbody>
              {batches.map((b) => (
                <tr key={b.id} className="border-b border-ink-100">
                  <td className="py-1 pr-3"><Link className="underline" href={`/contribute/batches/${b.id}`}>{b.createdAt.slice(0, 10)}</Link></td>
                  <td className="py-1 pr-3">{b.stationCodes.join(", ")}</td>
                  <td className="py-1 pr-3">{b.status}{b.source === "resubmission" ? " (correction)" : ""}</td>
                  <td className="py-1 pr-3">{Object.entries(b.counts).map(([k, v]) => `${v} ${k}`).join(", ")}</td>
                  <td className="py-1 pr-3"><SeverityBadge severity={b.worstSeverity} /></td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      <section aria-labelledby="usage-heading" className="flex flex-col gap-2">
        <h2 id="usage-heading" className="text-lg font-semibold">How your data is used</h2>
        <p data-testid="usage-accepted">{usage.acceptedSamples.toLocaleString("en-GB")} of your samples are accepted and appear in station summaries, downloads and the next edition.</p>
        {usage.edition ? (
          <p data-testid="usage-edition">
            Edition {usage.edition.id}: {usage.stationsInEdition.length} of your stations contributed to its annual surfaces{usage.stationsInEdition.length ? ` (${usage.stationsInEdition.join(", ")})` : ""}.
          </p>
        ) : (
          <Alert tone="info">No edition has been published yet; your accepted samples will go into the first one.</Alert>
        )}
      </section>
    </div>
  );
}
