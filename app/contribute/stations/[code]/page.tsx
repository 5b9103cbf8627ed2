import type { Metadata } from "next";
import Link from "next/link";
import { eq } from "drizzle-orm";
import { AuditTrail } from "@/components/intake/audit-trail";
import { SeverityBadge } from "@/components/intake/severity";
import { StationForm } from "@/components/intake/station-form";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db";
import { samples } from "@/db/schema";
import { requirePageViewer } from "@/lib/auth/guard";
import { auditFor, stationForViewer } from "@/lib/intake/stations";
import type { StationCheck } from "@/lib/intake/station-checks";
import type { StationFormValues } from "@/lib/intake/schemas";
import { AppError } from "@/lib/errors";
import { notFound } from "next/navigation";

export const metadata: Metadata = { title: "Station" };

export default async function MyStationPage({ params }: { params: Promise<{ code: string }> }) {
  const { code } = await params;
  const viewer = await requirePageViewer({ path: `/contribute/stations/${code}` });
  const station = await stationForViewer(viewer, decodeURIComponent(code)).catch((e) => {
    if (e instanceof AppError && e.status === 404) notFound();
    throw e;
  });
  // The station's whole trail: the station itself, the batches with its samples, and those samples.
  const rows = await getDb().select({ id: samples.id, batchId: samples.batchId }).from(samples).where(eq(samples.stationId, station.id)).limit(5000).all();
  const batchIds = [...new Set(rows.map((r) => r.batchId))];
  const audit = await auditFor([
    { type: "station", ids: [station.id] },
    { type: "batch", ids: batchIds },
    { type: "sample", ids: rows.map((r) => r.id) },
  ], 2000);
  const checks = (station.entryChecks ?? []) as StationCheck[];
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={`${station.code} — ${station.name}`} lead={`Status: ${station.status}${station.decisionReason ? `. Moderator's reason: ${station.decisionReason}` : ""}`} />
      {station.isDemo ? <DemoLabel /> : null}
      <dl className="grid max-w-2xl grid-cols-2 gap-x-4 gap-y-1 text-sm">
        <dt className="text-ink-600">Position</dt><dd>{station.lat}°, {station.lon}°</dd>
        <dt className="text-ink-600">Elevation</dt><dd>{station.elevationM} m</dd>
        <dt className="text-ink-600">Collector</dt><dd>{station.collectorType}, {station.samplingInterval}</dd>
        <dt className="text-ink-600">Organisation</dt><dd>{station.operatingOrg ?? "—"}</dd>
        <dt className="text-ink-600">Status</dt><dd data-testid="station-status">{station.status}</dd>
      </dl>
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Entry checks</h2>
        {checks.length ? <ul className="flex flex-col gap-1 text-sm">{checks.map((c, i) => <li key={i}><SeverityBadge severity={c.severity} /> {c.message}</li>)}</ul> : <p className="text-sm text-ink-600">Nothing found.</p>}
      </section>
      {station.status === "returned" && station.ownerId === viewer.id ? (
        <section className="flex flex-col gap-2">
          <h2 className="text-lg font-semibold">Correct and send again</h2>
          <StationForm
            edit={{
              code: station.code,
              rowVersion: station.rowVersion,
              values: {
                code: station.code,
                name: station.name,
                lat: String(station.lat),
                lon: String(station.lon),
                elevationM: String(station.elevationM),
                collectorType: station.collectorType,
                samplingInterval: station.samplingInterval,
                operatingOrg: station.operatingOrg ?? "",
                startDate: station.startDate ?? "",
                notes: station.notes ?? "",
              } as unknown as StationFormValues,
            }}
          />
        </section>
      ) : null}
      {station.status === "approved" ? <p><Link className="underline" href="/contribute/batches/new">Submit samples for this station</Link> · <Link className="underline" href={`/stations/${station.code}`}>Public page</Link></p> : null}
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">History of this station and its data</h2>
        <AuditTrail entries={audit} labels={{ [station.id]: station.code }} />
      </section>
    </div>
  );
}
