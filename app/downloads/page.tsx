import type { Metadata } from "next";
import Link from "next/link";
import { longDate } from "@/components/billing/format";
import { Cautions } from "@/components/cautions";
import { DemoLabel } from "@/components/demo-label";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";
import { downloadAccess, type DownloadAccess } from "@/lib/downloads/access";
import { publishedEditionsWithSurfaces, surfaceFile } from "@/lib/downloads/editions";
import { DATA_LICENCE } from "@/lib/downloads/licence";
import { periodText } from "@/lib/downloads/surface";

export const metadata: Metadata = { title: "Downloads" };

const STATION_FILES = [
  { file: "samples.csv", label: "Samples, CSV" },
  { file: "samples.geojson", label: "Samples, GeoJSON" },
  { file: "station-means.csv", label: "Station means, CSV" },
  { file: "station-means.geojson", label: "Station means, GeoJSON" },
] as const;

function Locked({ access }: { access: Extract<DownloadAccess, { allowed: false }> }) {
  const plan = access.requiredPlan ? PLAN_CATALOGUE[access.requiredPlan].name : null;
  return (
    <Alert tone="info" title={access.reason === "sign-in" ? "Sign in to download" : `Included from the ${plan ?? "paid"} plan`}>
      <span data-testid="download-locked">{access.message.replace(" See /pricing for what each plan includes.", "")}</span>{" "}
      {access.reason === "sign-in" ? (
        <Link className="underline" href="/sign-in?callbackUrl=%2Fdownloads">
          Sign in
        </Link>
      ) : (
        <Link className="underline" href="/pricing">
          See the plans
        </Link>
      )}
    </Alert>
  );
}

export default async function DownloadsPage() {
  const viewer = await getViewer();
  const plan = viewer?.plan ?? null;
  const station = downloadAccess(plan, "station-data");
  const surface = downloadAccess(plan, "surface");
  const editions = await publishedEditionsWithSurfaces();
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Downloads"
        lead={`Quality-checked station data and the surfaces of published editions, for your own analysis. Everything here is released under ${DATA_LICENCE.shortName}: credit the contributors and Rainprint.`}
      >
        <DemoLabel what="the stations, samples and editions on this server" className="mt-3" />
      </PageHeader>

      <section aria-labelledby="stations-heading" className="flex flex-col gap-3">
        <h2 id="stations-heading" className="text-lg font-semibold">
          Accepted station data
        </h2>
        <p className="max-w-prose text-ink-700">
          Every accepted sample (collection period, amount, δ18O, δ2H, d-excess, uncertainties, method, laboratory) and each station&apos;s long-term
          amount-weighted monthly and annual means. Each row names whom to credit; the first row carries the licence and units. Narrow the download
          with the fields below, or leave them empty for everything.
        </p>
        {station.allowed ? (
          <form method="get" className="flex flex-col gap-3 rounded-md border border-ink-200 bg-white p-4" data-testid="station-download-form">
            <div className="grid gap-3 sm:grid-cols-3">
              <label className="flex flex-col gap-1 text-sm font-medium">
                Station codes (comma-separated, optional)
                <input name="stations" type="text" placeholder="RP-EUR-001, RP-EUR-002" className="rounded border border-ink-300 px-3 py-2 font-normal" />
              </label>
              <label className="flex flex-col gap-1 text-sm font-medium">
                Samples starting on or after (optional)
                <input name="from" type="date" className="rounded border border-ink-300 px-3 py-2 font-normal" />
              </label>
              <label className="flex flex-col gap-1 text-sm font-medium">
                … and before (optional)
                <input name="to" type="date" className="rounded border border-ink-300 px-3 py-2 font-normal" />
              </label>
            </div>
            <div className="flex flex-wrap gap-2">
              {STATION_FILES.map((f) => (
                <button
                  key={f.file}
                  type="submit"
                  formAction={`/api/downloads/station-data/${f.file}`}
                  className="rounded bg-tarn-700 px-4 py-2 text-sm font-medium text-white hover:bg-tarn-800"
                  data-testid={`download-${f.file}`}
                >
                  {f.label}
                </button>
              ))}
            </div>
            <p className="text-xs text-ink-600">Empty fields are ignored. Dates are collection start dates.</p>
          </form>
        ) : (
          <Locked access={station} />
        )}
      </section>

      <section aria-labelledby="editions-heading" className="flex flex-col gap-3">
        <h2 id="editions-heading" className="text-lg font-semibold">
          Edition surfaces
        </h2>
        <p className="max-w-prose text-ink-700">
          Each surface of a published edition as a georeferenced GeoTIFF (WGS 84, one Float32 band, no-data value −9999, tags naming edition,
          variable, period and units) or as CSV (cell centres and values).
        </p>
        {!surface.allowed ? <Locked access={surface} /> : null}
        {editions.length === 0 ? (
          <p className="text-sm text-ink-700" data-testid="no-editions">
            No edition has been published yet. Surfaces appear here once the first edition is published.
          </p>
        ) : (
          editions.map((e) => (
            <div key={e.id} className="rounded-md border border-ink-200 bg-white p-4" data-testid={`edition-${e.id}`}>
              <h3 className="font-semibold">
                Edition {e.id} <span className="font-normal text-ink-600">— published {longDate(e.publishedAt)}</span>
              </h3>
              {e.isDemo ? <DemoLabel what="built from invented samples" className="mt-2" /> : null}
              {e.surfaces.length === 0 ? (
                <p className="mt-2 text-sm text-ink-700">This edition holds no surfaces.</p>
              ) : (
                <ul className="mt-2 grid gap-1 text-sm sm:grid-cols-2">
                  {e.surfaces.map((s) => (
                    <li key={`${s.variable}-${s.period}`}>
                      {s.variable}, {periodText(s.period)}:{" "}
                      {surface.allowed ? (
                        <>
                          <a className="underline" href={`/api/downloads/editions/${encodeURIComponent(e.id)}/${surfaceFile(s.variable, s.period, "tif")}`}>
                            GeoTIFF
                          </a>{" "}
                          ·{" "}
                          <a className="underline" href={`/api/downloads/editions/${encodeURIComponent(e.id)}/${surfaceFile(s.variable, s.period, "csv")}`}>
                            CSV
                          </a>
                        </>
                      ) : (
                        <span className="text-ink-600">locked</span>
                      )}
                    </li>
                  ))}
                </ul>
              )}
            </div>
          ))
        )}
      </section>

      <Cautions variant="compact" only={["estimates", "provenance", "scale"]} />
    </div>
  );
}
