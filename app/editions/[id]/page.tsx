import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { Cautions } from "@/components/cautions";
import { CrossValidationChart } from "@/components/charts/cv-chart";
import { VariogramChart } from "@/components/charts/variogram-chart";
import { DemoLabel } from "@/components/demo-label";
import { BuildStatus } from "@/components/editions/build-status";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import type { BuildParameters } from "@/lib/editions/build/compute";
import { fmt, fmtSci, periodLabel, VARIABLE_LABEL } from "@/lib/editions/format";
import { buildJobOf } from "@/lib/editions/lifecycle";
import { getEdition, isPublicEdition, listSurfaces, type SurfaceRow } from "@/lib/editions/queries";
import { EDITION_VARIABLES, PERIODS, type EditionDiff, type SurfaceVariable } from "@/lib/editions/types";
import { STATION_MEAN_RULES, defaultStationMeanRules } from "@/lib/isotopes";

export const dynamic = "force-dynamic";

type Props = { params: Promise<{ id: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  return { title: `Edition ${decodeURIComponent((await params).id)}` };
}

const TERM_LABEL = { intercept: "intercept (‰)", absLat: "|latitude| (‰ per °)", lat2: "latitude² (‰ per °²)", elevation: "elevation (‰ per m)" } as const;

export default async function EditionPage({ params, searchParams }: Props) {
  const id = decodeURIComponent((await params).id);
  const sp = await searchParams;
  const viewer = await getViewer();
  const moderator = viewer?.role === "moderator" || viewer?.role === "admin";
  const e = await getEdition(id, { includeUnpublished: moderator });
  if (!e) notFound();
  const surfaces = await listSurfaces(e.id);
  const variable = (EDITION_VARIABLES as readonly string[]).includes(String(sp.variable)) ? (sp.variable as SurfaceVariable) : "d18O";
  const p = Number(sp.period);
  const period = Number.isInteger(p) && (PERIODS as readonly number[]).includes(p) ? p : 0;
  const selected = surfaces.find((s) => s.variable === variable && s.period === period) ?? null;
  const params_ = (e.parameters ?? null) as BuildParameters | null;
  const summary = e.summary;
  const diff = e.diff as EditionDiff | null;
  const job = !isPublicEdition(e) && moderator ? await buildJobOf(e.jobId) : null;

  return (
    <div className="flex flex-col gap-8">
      <PageHeader title={`Edition ${e.id}`} lead={statusLine(e.status, e.publishedAt)}>
        <div className="mt-3 flex flex-wrap items-center gap-3">
          {e.isDemo ? <DemoLabel what="built from invented stations and samples" /> : null}
          <Link className="text-sm underline" href="/editions">
            All editions
          </Link>
        </div>
      </PageHeader>
      {e.status === "withdrawn" ? (
        <p className="rounded border border-severity-fail/50 bg-red-50 p-3 text-sm">Withdrawn{e.withdrawnReason ? `: ${e.withdrawnReason}` : ""}. It stays here so that citations of it can be checked.</p>
      ) : null}
      {!isPublicEdition(e) && moderator ? (
        <section aria-labelledby="build" className="rounded border border-ink-200 p-4">
          <h2 id="build" className="mb-2 text-lg font-semibold">
            Build
          </h2>
          <BuildStatus initial={{ id: e.id, status: e.status, job }} />
        </section>
      ) : null}
      <Cautions variant="compact" only={["estimates"]} />

      <section aria-labelledby="record" className="grid gap-6 lg:grid-cols-2">
        <div>
          <h2 id="record" className="mb-2 text-lg font-semibold">
            Record
          </h2>
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm" data-testid="edition-record">
            <dt className="text-ink-600">Stations with data</dt>
            <dd className="tabular">{summary?.stations.total ?? "—"}</dd>
            <dt className="text-ink-600">… with an annual mean</dt>
            <dd className="tabular">{summary?.stations.withAnnualMean ?? "—"}</dd>
            <dt className="text-ink-600">Accepted samples</dt>
            <dd className="tabular">{summary?.stations.samples?.toLocaleString("en-GB") ?? "—"}</dd>
            <dt className="text-ink-600">Inputs hash (SHA-256)</dt>
            <dd className="break-all font-mono text-xs" data-testid="inputs-hash">
              {e.inputsHash ?? "—"}
            </dd>
            <dt className="text-ink-600">Grid cells with values</dt>
            <dd className="tabular">{summary?.landCells?.toLocaleString("en-GB") ?? "—"}</dd>
            <dt className="text-ink-600">Elevation</dt>
            <dd>
              {summary?.seaLevelEquivalent === false
                ? "from the elevation model in each cell"
                : "sea-level-equivalent surfaces: the trend's elevation term at 0 m (site lookups apply the fitted gradient at the site's elevation)"}
            </dd>
            {summary?.excludedByPeriod ? (
              <>
                <dt className="text-ink-600">Stations left out for coverage</dt>
                <dd className="tabular">
                  annual {summary.excludedByPeriod[0]}; by month {summary.excludedByPeriod.slice(1).join(", ")}
                </dd>
              </>
            ) : null}
          </dl>
        </div>
        {params_ ? (
          <div>
            <h2 className="mb-2 text-lg font-semibold">Parameters</h2>
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm" data-testid="edition-parameters">
              <dt className="text-ink-600">Cell size</dt>
              <dd>{params_.grid.resolutionDeg}°</dd>
              <dt className="text-ink-600">Extent (W, S, E, N)</dt>
              <dd>
                {params_.grid.extent.west}°, {params_.grid.extent.south}°, {params_.grid.extent.east}°, {params_.grid.extent.north}°{params_.grid.landOnly ? ", land cells only" : ""}
              </dd>
              <dt className="text-ink-600">Neighbouring stations</dt>
              <dd>{params_.maxNeighbors}</dd>
              <dt className="text-ink-600">Extrapolation beyond</dt>
              <dd>{params_.extrapolationKm.toLocaleString("en-GB")} km from the nearest station</dd>
              <dt className="text-ink-600">Variogram candidates</dt>
              <dd>
                {params_.variogramModels.join(", ")}; weights gstat fit.method {params_.fitMethod}; chosen by leave-one-out RMSE
              </dd>
              <dt className="text-ink-600">Elevation model</dt>
              <dd>{params_.elevationModelId ? `uploaded model ${params_.elevationModelId}` : "none (sea-level-equivalent)"}</dd>
              <dt className="text-ink-600">δ2H variance</dt>
              <dd>{params_.d2HCovariance === "independent" ? "errors of δ18O and d-excess taken as independent" : "with the correlation of the δ18O and d-excess leave-one-out residuals"}</dd>
              {Object.entries({ ...defaultStationMeanRules(), ...params_.stationMeanRules }).map(([k, v]) => (
                <RuleRow key={k} name={k} value={v} />
              ))}
            </dl>
          </div>
        ) : null}
      </section>

      <section aria-labelledby="surfaces">
        <h2 id="surfaces" className="mb-2 text-lg font-semibold">
          Surfaces
        </h2>
        <p className="mb-2 max-w-prose text-sm text-ink-700">
          δ18O and d-excess: trend on |latitude|, latitude² and elevation plus ordinary kriging of its residuals. δ2H = d-excess + 8·δ18O. Precipitation:
          kriging of √P for each month; the annual surface is the sum of the months. Choose a surface for its trend, variogram and cross-validation.
        </p>
        <SurfaceTable editionId={e.id} surfaces={surfaces} selected={selected} />
      </section>

      {selected ? <SurfaceDetail s={selected} /> : null}

      <section aria-labelledby="diff">
        <h2 id="diff" className="mb-2 text-lg font-semibold">
          Changes since the previous edition
        </h2>
        <DiffView diff={diff} />
      </section>
    </div>
  );
}

function statusLine(status: string, publishedAt: Date | null): string {
  if (status === "published") return `Published ${publishedAt?.toISOString().slice(0, 16).replace("T", " ")} UTC.`;
  if (status === "withdrawn") return "Withdrawn.";
  return `Not published (${status}); only moderators see it.`;
}

function RuleRow({ name, value }: { name: string; value: number }) {
  const r = STATION_MEAN_RULES[name as keyof typeof STATION_MEAN_RULES];
  return (
    <>
      <dt className="text-ink-600">Coverage rule</dt>
      <dd>
        {value} {r?.unit ?? ""} — {r?.rule ?? name}
      </dd>
    </>
  );
}

function SurfaceTable({ editionId, surfaces, selected }: { editionId: string; surfaces: SurfaceRow[]; selected: SurfaceRow | null }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[48rem] text-left text-sm" data-testid="surfaces-table">
        <thead className="border-b border-ink-300 text-ink-700">
          <tr>
            <th scope="col" className="py-1 pr-3 font-medium">Surface</th>
            <th scope="col" className="py-1 pr-3 font-medium">Period</th>
            <th scope="col" className="py-1 pr-3 font-medium">Stations</th>
            <th scope="col" className="py-1 pr-3 font-medium">Variogram</th>
            <th scope="col" className="py-1 pr-3 font-medium">CV RMSE</th>
            <th scope="col" className="py-1 pr-3 font-medium">CV mean error</th>
            <th scope="col" className="py-1 pr-3 font-medium">CV mean z²</th>
            <th scope="col" className="py-1 pr-3 font-medium">Extrapolated cells</th>
          </tr>
        </thead>
        <tbody>
          {surfaces.map((s) => {
            const here = s === selected;
            return (
              <tr key={`${s.variable}-${s.period}`} className={`border-b border-ink-100 ${here ? "bg-tarn-50" : ""}`}>
                <td className="py-1 pr-3">
                  <Link className="underline" aria-current={here ? "true" : undefined} href={`/editions/${encodeURIComponent(editionId)}?variable=${s.variable}&period=${s.period}#surface`}>
                    {VARIABLE_LABEL[s.variable]}
                  </Link>
                </td>
                <td className="py-1 pr-3">{periodLabel(s.period)}</td>
                <td className="py-1 pr-3 tabular">{s.stats?.stations.used ?? "—"}</td>
                <td className="py-1 pr-3">{s.variogram?.chosen ?? (s.stats?.method === "derived-d2H" ? "derived" : "sum of months")}</td>
                <td className="py-1 pr-3 tabular">
                  {s.crossValidation ? `${fmt(s.crossValidation.rmse)} ${s.stats?.units ?? ""}` : "—"}
                </td>
                <td className="py-1 pr-3 tabular">{s.crossValidation ? fmt(s.crossValidation.meanError) : "—"}</td>
                <td className="py-1 pr-3 tabular">{s.crossValidation ? fmt(s.crossValidation.meanZ2) : "—"}</td>
                <td className="py-1 pr-3 tabular">{s.stats ? `${Math.round(s.stats.extrapolation.fraction * 100)} %` : "—"}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

function SurfaceDetail({ s }: { s: SurfaceRow }) {
  const name = `${VARIABLE_LABEL[s.variable]}, ${periodLabel(s.period)}`;
  const units = s.stats?.units ?? "‰";
  const vgUnits = s.variogram?.of === "square root of precipitation" ? "mm" : `${units}²`;
  return (
    <section id="surface" aria-labelledby="surface-title" className="flex flex-col gap-6 rounded border border-ink-200 p-4" data-testid="surface-detail">
      <h2 id="surface-title" className="text-lg font-semibold">
        {name}
      </h2>
      {s.stats?.note ? <p className="max-w-prose text-sm text-ink-700">{s.stats.note}</p> : null}
      {s.stats ? (
        <p className="text-sm">
          Values {fmt(s.stats.value.min)} to {fmt(s.stats.value.max)} {units} (2–98 %: {fmt(s.stats.value.p02)} to {fmt(s.stats.value.p98)}); standard deviation{" "}
          {fmt(s.stats.sd.min)} to {fmt(s.stats.sd.max)} {units}; {s.stats.stations.used} stations used, {s.stats.stations.excludedCoverage} left out for coverage;{" "}
          {s.stats.extrapolation.cells.toLocaleString("en-GB")} cells ({Math.round(s.stats.extrapolation.fraction * 100)} %) farther than{" "}
          {s.stats.extrapolation.distanceKm.toLocaleString("en-GB")} km from a station.
        </p>
      ) : null}
      {s.trend ? (
        <div>
          <h3 className="mb-1 font-semibold">Trend</h3>
          <p className="mb-2 text-sm text-ink-700">
            {s.trend.formula}. R² = {fmt(s.trend.rSquared, 3)}, residual standard error {fmt(s.trend.residualSE)} ‰, n = {s.trend.n}.
          </p>
          <table className="text-left text-sm" data-testid="trend-table">
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-1 pr-4 font-medium">Term</th>
                <th scope="col" className="py-1 pr-4 font-medium">Coefficient</th>
                <th scope="col" className="py-1 pr-4 font-medium">Standard error</th>
              </tr>
            </thead>
            <tbody>
              {s.trend.terms.map((t) => (
                <tr key={t.name} className="border-b border-ink-100">
                  <td className="py-1 pr-4">{TERM_LABEL[t.name]}</td>
                  <td className="py-1 pr-4 tabular">{fmtSci(t.estimate)}</td>
                  <td className="py-1 pr-4 tabular">{fmtSci(t.standardError)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      <div className="grid gap-6 lg:grid-cols-2">
        {s.variogram ? (
          <div>
            <h3 className="mb-1 font-semibold">Variogram of the {s.variogram.of}</h3>
            <VariogramChart variogram={s.variogram} units={vgUnits} title={`Empirical and fitted variograms, ${name}`} />
            <p className="mt-1 text-xs text-ink-700">{s.variogram.rule}</p>
            <table className="mt-2 text-left text-xs" data-testid="variogram-table">
              <thead className="border-b border-ink-300 text-ink-700">
                <tr>
                  <th scope="col" className="py-1 pr-3 font-medium">Model</th>
                  <th scope="col" className="py-1 pr-3 font-medium">Nugget</th>
                  <th scope="col" className="py-1 pr-3 font-medium">Partial sill</th>
                  <th scope="col" className="py-1 pr-3 font-medium">Range (km)</th>
                  <th scope="col" className="py-1 pr-3 font-medium">CV RMSE</th>
                  <th scope="col" className="py-1 pr-3 font-medium">CV mean z²</th>
                </tr>
              </thead>
              <tbody>
                {s.variogram.fitted.map((f) => (
                  <tr key={f.model} className="border-b border-ink-100">
                    <td className="py-1 pr-3">
                      {f.model}
                      {f.model === s.variogram!.chosen ? " (used)" : ""}
                    </td>
                    <td className="py-1 pr-3 tabular">{fmtSci(f.nugget)}</td>
                    <td className="py-1 pr-3 tabular">{fmtSci(f.psill)}</td>
                    <td className="py-1 pr-3 tabular">{Math.round(f.rangeKm).toLocaleString("en-GB")}</td>
                    <td className="py-1 pr-3 tabular">{fmt(f.crossValidation.rmse, 3)}</td>
                    <td className="py-1 pr-3 tabular">{fmt(f.crossValidation.meanZ2, 3)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        ) : null}
        {s.crossValidation ? (
          <div>
            <h3 className="mb-1 font-semibold">Leave-one-out cross-validation</h3>
            <CrossValidationChart cv={s.crossValidation} units={units} title={`Observed against predicted station means, ${name}`} />
            <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 text-sm" data-testid="cv-stats">
              <dt className="text-ink-600">Stations</dt>
              <dd className="tabular">{s.crossValidation.n}</dd>
              <dt className="text-ink-600">Mean error (ideal 0)</dt>
              <dd className="tabular">{fmt(s.crossValidation.meanError, 3)} {units}</dd>
              <dt className="text-ink-600">RMSE</dt>
              <dd className="tabular">{fmt(s.crossValidation.rmse, 3)} {units}</dd>
              <dt className="text-ink-600">Mean z (ideal 0)</dt>
              <dd className="tabular">{fmt(s.crossValidation.meanZ, 3)}</dd>
              <dt className="text-ink-600">Mean z² (ideal ≈ 1)</dt>
              <dd className="tabular">{fmt(s.crossValidation.meanZ2, 3)}</dd>
            </dl>
            {s.trend ? <p className="mt-1 text-xs text-ink-700">The trend is held at its fit to all stations; z uses the residual kriging variance.</p> : null}
          </div>
        ) : null}
      </div>
    </section>
  );
}

const DIFF_VAR: Record<string, string> = { d18O: "δ18O (‰)", dExcess: "d-excess (‰)", precipMm: "precipitation (mm/year)" };

function DiffView({ diff }: { diff: EditionDiff | null }) {
  if (!diff) return <p className="text-sm text-ink-700">Not computed yet.</p>;
  if (!diff.previous) return <p className="text-sm text-ink-700" data-testid="diff">The first edition: nothing to compare with.</p>;
  const table = (rows: EditionDiff["meanChanges"], caption: string, testid: string) => (
    <table className="text-left text-sm" data-testid={testid}>
      <caption className="mb-1 text-left font-medium">{caption}</caption>
      <thead className="border-b border-ink-300 text-ink-700">
        <tr>
          <th scope="col" className="py-1 pr-3 font-medium">Station</th>
          <th scope="col" className="py-1 pr-3 font-medium">Quantity</th>
          <th scope="col" className="py-1 pr-3 font-medium">{diff.previous}</th>
          <th scope="col" className="py-1 pr-3 font-medium">This edition</th>
          <th scope="col" className="py-1 pr-3 font-medium">Change</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((c) => (
          <tr key={`${c.stationCode}-${c.variable}`} className="border-b border-ink-100">
            <td className="py-1 pr-3 font-mono text-xs">{c.stationCode}</td>
            <td className="py-1 pr-3">{DIFF_VAR[c.variable]}</td>
            <td className="py-1 pr-3 tabular">{fmt(c.previous)}</td>
            <td className="py-1 pr-3 tabular">{fmt(c.current)}</td>
            <td className="py-1 pr-3 tabular">{c.change > 0 ? "+" : ""}{fmt(c.change)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
  return (
    <div className="flex flex-col gap-4" data-testid="diff">
      <p className="text-sm">
        Compared with <Link className="underline" href={`/editions/${diff.previous}`}>{diff.previous}</Link>: {diff.stationsAdded.length} stations added
        {diff.stationsAdded.length ? ` (${diff.stationsAdded.join(", ")})` : ""}, {diff.stationsRemoved.length} removed
        {diff.stationsRemoved.length ? ` (${diff.stationsRemoved.join(", ")})` : ""}.
      </p>
      <div className="grid gap-6 lg:grid-cols-2">
        {table(diff.meanChanges, "Largest changes of annual station means", "diff-means")}
        {table(diff.predictedChanges, "Largest changes of predicted annual values at the stations", "diff-predicted")}
      </div>
    </div>
  );
}
