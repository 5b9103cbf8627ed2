import type { Metadata } from "next";
import Link from "next/link";
import { Cautions } from "@/components/cautions";
import { MonthlySeriesChart } from "@/components/charts/lookup-charts";
import { LookupForm } from "@/components/lookup/lookup-form";
import { PredictionTable, StationsTable, WaterLineSummary } from "@/components/lookup/prediction-tables";
import { PrintButton } from "@/components/lookup/print-button";
import { SampleAnalysisPanel } from "@/components/lookup/sample-analysis";
import { CitationBlock, SiteSummary } from "@/components/lookup/site-result";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { editionChoices } from "@/lib/lookup/editions";
import { lineCentre } from "@/lib/lookup/samples";
import { browserLookup, lookupHref, lookupValues } from "@/lib/lookup/service";

export const metadata: Metadata = { title: "Site report" };

export default async function SiteReportPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const viewer = await getViewer();
  const values = lookupValues(await searchParams);
  const outcome = await browserLookup(viewer, values);
  if (outcome.kind !== "ok") {
    return (
      <div className="flex flex-col gap-6">
        <PageHeader title="Site report" lead="A printable report for one site: predicted values with intervals, charts, and your own water samples placed against the predicted local line." />
        {outcome.kind === "refused" ? (
          <Alert tone="warn" title="Daily site lookups used up">
            <span data-testid="lookup-refused">{outcome.message}</span>
          </Alert>
        ) : null}
        <LookupForm action="/lookup/report" values={values} errors={outcome.kind === "invalid" ? outcome.fields : undefined} editions={await editionChoices()} />
        <Cautions />
      </div>
    );
  }
  const p = outcome.prediction;
  const w = p.waterLine;
  const line = Number.isFinite(w.slope) ? { slope: w.slope, intercept: w.intercept, slopeSE: w.slopeSE, interceptSE: w.interceptSE, meanD18O: lineCentre(p.monthly) } : null;
  const printed = new Date().toISOString().slice(0, 16).replace("T", " ");
  return (
    <article className="flex flex-col gap-8" data-testid="site-report">
      <PageHeader title="Site report" lead="Predicted isotopic composition of precipitation at one site, with 95% intervals, the predicted local meteoric water line and the stations behind it.">
        <div className="no-print mt-3 flex flex-wrap gap-3 text-sm">
          <PrintButton />
          <Link href={lookupHref("/lookup", outcome.input, outcome.predictor.editionId)} className="rounded border border-ink-300 bg-white px-4 py-2 hover:bg-ink-50">
            Back to the lookup
          </Link>
        </div>
        <p className="print-only mt-2 text-xs text-ink-600">Printed {printed} UTC from Rainprint.</p>
      </PageHeader>

      <section className="print-keep">
        <SiteSummary p={p} edition={outcome.predictor.edition} />
      </section>

      <section aria-labelledby="series-heading" className="print-keep flex flex-col gap-3">
        <h2 id="series-heading" className="text-lg font-semibold">
          Monthly series
        </h2>
        <p className="text-sm text-ink-700">Predicted monthly values (line and dots) with their 95% interval (band); the dotted line is the annual prediction.</p>
        <MonthlySeriesChart p={p} variable="d18O" />
        <MonthlySeriesChart p={p} variable="d2H" />
        <MonthlySeriesChart p={p} variable="dExcess" />
      </section>

      <section aria-labelledby="dual-heading" className="print-keep flex flex-col gap-3">
        <h2 id="dual-heading" className="text-lg font-semibold">
          Water line and your samples
        </h2>
        <WaterLineSummary p={p} />
        <SampleAnalysisPanel p={p} line={line} />
      </section>

      <section aria-labelledby="values-heading" className="flex flex-col gap-2">
        <h2 id="values-heading" className="text-lg font-semibold">
          Predicted values
        </h2>
        <PredictionTable p={p} />
      </section>

      <section aria-labelledby="stations-heading" className="print-keep flex flex-col gap-2">
        <h2 id="stations-heading" className="text-lg font-semibold">
          Stations that informed the prediction
        </h2>
        <StationsTable p={p} />
      </section>

      <div className="print-keep">
        <CitationBlock p={p} edition={outcome.predictor.edition} />
      </div>
      <div className="print-keep">
        <Cautions />
      </div>
    </article>
  );
}
