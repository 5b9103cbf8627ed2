import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { Cautions } from "@/components/cautions";
import { DemoLabel } from "@/components/demo-label";
import { StationWaterLine } from "@/components/intake/station-water-line";
import { PageHeader } from "@/components/ui/page-header";
import { AppError } from "@/lib/errors";
import { publicStationData } from "@/lib/intake/public-station";
import { COLLECTOR_TYPE_LABELS, SAMPLING_INTERVAL_LABELS } from "@/lib/intake/schemas";

export const metadata: Metadata = { title: "Station" };

const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
const f = (x: number | null, d: number) => (x === null ? "—" : x.toFixed(d));

export default async function StationPage({ params }: { params: Promise<{ code: string }> }) {
  const { code } = await params;
  const data = await publicStationData(decodeURIComponent(code), "ols").catch((e) => {
    if (e instanceof AppError && e.status === 404) notFound();
    throw e;
  });
  const s = data.station;
  const rows = data.means ? [data.means.annual, ...data.means.monthly] : [];
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={`${s.code} — ${s.name}`} lead={`${s.lat.toFixed(4)}°, ${s.lon.toFixed(4)}° · ${s.elevationM} m · ${COLLECTOR_TYPE_LABELS[s.collectorType as keyof typeof COLLECTOR_TYPE_LABELS] ?? s.collectorType} · ${SAMPLING_INTERVAL_LABELS[s.samplingInterval as keyof typeof SAMPLING_INTERVAL_LABELS] ?? s.samplingInterval} samples`} />
      {s.isDemo ? <DemoLabel what="this station and its samples" /> : null}
      <dl className="grid max-w-2xl grid-cols-2 gap-x-4 gap-y-1 text-sm">
        <dt className="text-ink-600">Operated by</dt><dd>{s.operatingOrg ?? "—"}</dd>
        <dt className="text-ink-600">Accepted samples</dt><dd data-testid="station-sample-count">{data.sampleCount}</dd>
        <dt className="text-ink-600">Period covered</dt><dd>{data.firstDate ? `${data.firstDate} to ${data.lastDate}` : "—"}</dd>
      </dl>
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">Amount-weighted means</h2>
        <p className="text-sm text-ink-700">Mean δ = ΣP·δ / ΣP over the accepted samples, by calendar month and for the year, with how much of the record they rest on. A mean marked “not used” does not meet the coverage rules and is left out of editions.</p>
        {rows.length ? (
          <div className="overflow-x-auto">
            <table className="w-full min-w-[44rem] text-left text-sm" data-testid="station-means">
              <thead className="border-b border-ink-300">
                <tr><th className="pr-3">Period</th><th className="pr-3">δ18O ‰</th><th className="pr-3">δ2H ‰</th><th className="pr-3">d-excess ‰</th><th className="pr-3">Rain mm</th><th className="pr-3">Years</th><th className="pr-3">Rain sampled</th><th>Used in editions</th></tr>
              </thead>
              <tbody>
                {rows.map((m) => (
                  <tr key={m.period} className="border-b border-ink-100">
                    <td className="pr-3">{m.period === 0 ? "Year" : MONTHS[m.period - 1]}</td>
                    <td className="pr-3">{f(m.d18O, 2)}</td>
                    <td className="pr-3">{f(m.d2H, 1)}</td>
                    <td className="pr-3">{f(m.dExcess, 1)}</td>
                    <td className="pr-3">{f(m.precipMm, 0)}</td>
                    <td className="pr-3">{m.coverage.yearsCounted} of {m.coverage.yearsWithData}</td>
                    <td className="pr-3">{m.coverage.sampledPrecipFraction === null ? "—" : `${Math.round(m.coverage.sampledPrecipFraction * 100)}%`}</td>
                    <td>{m.included ? "yes" : "not used"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : (
          <p className="text-ink-700">No accepted samples yet.</p>
        )}
      </section>
      <section className="flex flex-col gap-2">
        <h2 className="text-lg font-semibold">δ2H against δ18O</h2>
        <StationWaterLine code={s.code} />
      </section>
      <Cautions variant="compact" only={["scale"]} />
    </div>
  );
}
