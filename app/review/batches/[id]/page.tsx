import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CHART_COLOURS, IsotopeChart } from "@/components/charts/isotope-chart";
import { AuditTrail } from "@/components/intake/audit-trail";
import { BatchReview } from "@/components/intake/batch-review";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { batchForViewer } from "@/lib/intake/batches";
import { loadStationContexts } from "@/lib/intake/context";
import { auditFor } from "@/lib/intake/stations";
import { GMWL } from "@/lib/isotopes";

export const metadata: Metadata = { title: "Review a batch" };

export default async function ReviewBatchPage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  const viewer = await requirePageViewer({ roles: ["moderator", "admin"], path: `/review/batches/${id}` });
  const b = await batchForViewer(viewer, id).catch((e) => {
    if (e instanceof AppError && e.status === 404) notFound();
    throw e;
  });
  const stationIds = [...new Set(b.samples.map((s) => s.stationId))];
  const contexts = await loadStationContexts(stationIds.slice(0, 6));
  const audit = await auditFor([
    { type: "batch", ids: [b.batch.id] },
    { type: "sample", ids: b.samples.map((s) => s.id) },
  ]);
  const labels = Object.fromEntries(b.samples.map((s) => [s.id, `${s.stationCode} ${s.startDate}`]));
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={`Batch from ${b.batch.contributorName}`}
        lead={`Submitted ${b.batch.createdAt.slice(0, 16).replace("T", " ")} UTC · ${b.batch.sampleCount} samples · ${b.batch.stationCodes.join(", ")} · status ${b.batch.status}`}
      >
        <p className="mt-2"><Link className="underline" href="/review">Back to the review desk</Link></p>
      </PageHeader>
      {b.batch.isDemo ? <DemoLabel /> : null}
      {b.note ? <p className="text-sm">Contributor&apos;s note: {b.note}</p> : null}
      {b.upload ? <p className="text-sm text-ink-700">File {b.upload.fileName}, {b.upload.sizeBytes.toLocaleString("en-GB")} bytes, SHA-256 <span className="font-mono">{b.upload.sha256}</span></p> : null}
      <section className="flex flex-col gap-4">
        <h2 className="text-lg font-semibold">The batch against each station&apos;s accepted history</h2>
        <div className="grid grid-cols-1 gap-6 lg:grid-cols-2">
          {stationIds.slice(0, 6).map((sid) => {
            const c = contexts.get(sid)!;
            const mine = b.samples.filter((s) => s.stationId === sid);
            const code = mine[0].stationCode;
            const flagged = mine.filter((s) => s.worstSeverity === "warn" || s.worstSeverity === "fail");
            const ok = mine.filter((s) => !(s.worstSeverity === "warn" || s.worstSeverity === "fail"));
            return (
              <div key={sid}>
                <h3 className="font-medium">{code}</h3>
                <IsotopeChart
                  title={`δ2H against δ18O for ${code}: this batch and the station's accepted samples`}
                  groups={[
                    { id: "h", label: "Accepted history", points: c.history.map((h) => ({ x: h.d18O as number, y: h.d2H as number, label: h.startDate })), colour: CHART_COLOURS.history, shape: "circle", size: 2.5 },
                    { id: "b", label: "This batch", points: ok.map((s) => ({ x: s.d18O, y: s.d2H, label: `${s.startDate} ${s.status}` })), colour: CHART_COLOURS.batch, shape: "square", size: 4 },
                    { id: "f", label: "This batch, flagged by the checks", points: flagged.map((s) => ({ x: s.d18O, y: s.d2H, label: `${s.startDate} ${s.status}` })), colour: CHART_COLOURS.flagged, shape: "diamond", size: 5 },
                  ]}
                  lines={[
                    { id: "g", label: "GMWL δ2H = 8·δ18O + 10 (Craig 1961)", slope: GMWL.slope, intercept: GMWL.intercept, colour: CHART_COLOURS.gmwl, dash: "5 4" },
                    ...(c.line ? [{ id: "s", label: `Station line (least squares, n = ${c.line.n}): δ2H = ${c.line.slope.toFixed(2)}·δ18O + ${c.line.intercept.toFixed(1)}`, slope: c.line.slope, intercept: c.line.intercept, colour: CHART_COLOURS.station }] : []),
                  ]}
                />
              </div>
            );
          })}
        </div>
      </section>
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Decide</h2>
        <BatchReview batchId={b.batch.id} initial={{ samples: b.samples }} />
      </section>
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Audit trail</h2>
        <AuditTrail entries={audit} labels={labels} />
      </section>
    </div>
  );
}
