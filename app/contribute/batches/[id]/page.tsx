import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { AuditTrail } from "@/components/intake/audit-trail";
import { ResubmitForm } from "@/components/intake/resubmit-form";
import { CheckList, SeverityBadge } from "@/components/intake/severity";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { batchForViewer, cellsOf } from "@/lib/intake/batches";
import { auditFor } from "@/lib/intake/stations";
import { CHECK_CATALOGUE, type CheckCode } from "@/lib/qc";

export const metadata: Metadata = { title: "Batch" };

export default async function MyBatchPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const viewer = await requirePageViewer({ path: `/contribute/batches/${id}` });
  const b = await batchForViewer(viewer, id).catch((e) => {
    if (e instanceof AppError && e.status === 404) notFound();
    throw e;
  });
  const audit = await auditFor([
    { type: "batch", ids: [b.batch.id] },
    { type: "sample", ids: b.samples.map((s) => s.id) },
  ]);
  const codes = [...new Set(b.samples.flatMap((s) => s.checks.map((c) => c.code)))] as CheckCode[];
  const labels = Object.fromEntries(b.samples.map((s) => [s.id, `${s.stationCode} ${s.startDate}`]));
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={`Batch of ${b.batch.createdAt.slice(0, 10)}`} lead={`${b.batch.sampleCount} samples for ${b.batch.stationCodes.join(", ")} · status: ${b.batch.status}`} />
      {b.batch.isDemo ? <DemoLabel /> : null}
      {b.upload ? (
        <p className="text-sm text-ink-700" data-testid="batch-upload">
          Uploaded file {b.upload.fileName}: {b.upload.sizeBytes.toLocaleString("en-GB")} bytes, SHA-256 <span className="font-mono">{b.upload.sha256}</span>
        </p>
      ) : null}
      <section className="flex flex-col gap-3">
        <h2 className="text-lg font-semibold">Samples</h2>
        <ul className="flex flex-col gap-4" data-testid="batch-samples">
          {b.samples.map((s) => (
            <li key={s.id} id={`sample-${s.id}`} className="rounded border border-ink-200 p-3" data-status={s.status}>
              <p className="font-medium">
                {s.stationCode}, {s.startDate} → {s.endDate}: δ18O {s.d18O} ‰, δ2H {s.d2H} ‰{s.amountMm !== null ? `, ${s.amountMm} mm` : ""} — <span>{s.status}</span>
                {s.version > 1 ? ` (version ${s.version})` : ""} <SeverityBadge severity={s.worstSeverity} />
              </p>
              {s.decisionReason ? <p className="text-sm">Moderator&apos;s reason: {s.decisionReason}</p> : null}
              <CheckList checks={s.checks} />
              {s.status === "returned" && b.batch.contributorId === viewer.id ? (
                <div className="mt-2">
                  <ResubmitForm sampleId={s.id} rowVersion={s.rowVersion} cells={cellsOf(s)} label={`${s.stationCode} ${s.startDate}`} />
                </div>
              ) : null}
              {s.status === "superseded" ? <p className="text-sm text-ink-700">Corrected; the new version is in another batch.</p> : null}
            </li>
          ))}
        </ul>
      </section>
      {codes.length ? (
        <section className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">What the checks mean</h2>
          <dl className="flex flex-col gap-2 text-sm">
            {codes.map((c) => (
              <div key={c}>
                <dt className="font-medium">{CHECK_CATALOGUE[c]?.title ?? c} <span className="font-mono text-xs text-ink-600">{c}</span></dt>
                <dd>{CHECK_CATALOGUE[c]?.explanation}</dd>
              </div>
            ))}
          </dl>
        </section>
      ) : null}
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">History</h2>
        <AuditTrail entries={audit} labels={labels} />
      </section>
    </div>
  );
}
