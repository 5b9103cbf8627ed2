import type { Metadata } from "next";
import Link from "next/link";
import { Cautions } from "@/components/cautions";
import { LookupForm } from "@/components/lookup/lookup-form";
import { PredictionTable, StationsTable, WaterLineSummary } from "@/components/lookup/prediction-tables";
import { CitationBlock, SiteSummary } from "@/components/lookup/site-result";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { planLimits } from "@/lib/billing/plans";
import { editionChoices } from "@/lib/lookup/editions";
import { browserLookup, lookupHref, lookupsLeft, lookupValues } from "@/lib/lookup/service";

export const metadata: Metadata = { title: "Site lookup" };

export default async function LookupPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const viewer = await getViewer();
  const values = lookupValues(await searchParams);
  const [outcome, editions] = await Promise.all([browserLookup(viewer, values), editionChoices()]);
  const allowance = outcome.kind === "ok" ? (outcome.cap === null ? null : { left: outcome.left ?? 0, cap: outcome.cap }) : await lookupsLeft(viewer);
  const batchMax = planLimits(viewer?.plan ?? "open").batchLookupMaxSites;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Site lookup"
        lead="The predicted isotopic composition of precipitation at any place on land: monthly and annual δ18O, δ2H and d-excess with 95% intervals, the local meteoric water line they imply, and the stations behind the numbers."
      >
        <p className="mt-2 text-sm text-ink-700 no-print">
          {allowance ? (
            <span data-testid="lookups-left">
              {`${allowance.left} of ${allowance.cap} site lookups left today on your plan.`}{" "}
              <Link href="/pricing" className="underline">
                Paid plans
              </Link>{" "}
              have no daily cap.
            </span>
          ) : (
            <span>Your plan has no daily cap on site lookups.</span>
          )}{" "}
          {batchMax > 0 ? (
            <Link href="/lookup/batch" className="underline">
              Look up many sites from a file
            </Link>
          ) : null}
        </p>
      </PageHeader>

      {editions.length === 0 ? (
        <Alert tone="info" title="No edition published yet">
          Site lookups predict from a published edition. None has been published on this server yet.
        </Alert>
      ) : null}

      <LookupForm values={values} errors={outcome.kind === "invalid" ? outcome.fields : undefined} editions={editions} />

      {outcome.kind === "refused" ? (
        <Alert tone="warn" title="Daily site lookups used up">
          <span data-testid="lookup-refused">{outcome.message}</span>
        </Alert>
      ) : null}

      {outcome.kind === "ok" ? (
        <div className="flex flex-col gap-8" data-testid="lookup-result">
          <SiteSummary p={outcome.prediction} edition={outcome.predictor.edition} />
          <div className="no-print flex flex-wrap gap-3 text-sm">
            <Link href={lookupHref("/lookup/report", outcome.input, outcome.predictor.editionId)} className="rounded bg-tarn-700 px-4 py-2 font-medium text-white hover:bg-tarn-800" data-testid="open-report">
              Open the site report (charts, your own samples, print)
            </Link>
            <a href={lookupHref("/api/v1/predict", outcome.input, outcome.predictor.editionId)} className="rounded border border-ink-300 bg-white px-4 py-2 hover:bg-ink-50">
              The same answer as JSON (API)
            </a>
          </div>
          <section aria-labelledby="values-heading" className="flex flex-col gap-2">
            <h2 id="values-heading" className="text-lg font-semibold">
              Predicted values
            </h2>
            <PredictionTable p={outcome.prediction} />
          </section>
          <section aria-labelledby="line-heading" className="flex flex-col gap-2">
            <h2 id="line-heading" className="text-lg font-semibold">
              Predicted local meteoric water line
            </h2>
            <WaterLineSummary p={outcome.prediction} />
          </section>
          <section aria-labelledby="stations-heading" className="flex flex-col gap-2">
            <h2 id="stations-heading" className="text-lg font-semibold">
              Stations that informed the prediction
            </h2>
            <StationsTable p={outcome.prediction} />
          </section>
          <CitationBlock p={outcome.prediction} edition={outcome.predictor.edition} />
          <p className="max-w-prose text-sm text-ink-700">
            How these numbers are made: the edition&apos;s trend in latitude and elevation plus the kriged station residuals, computed at this exact point (not
            read from the map grid). δ2H is derived as d-excess + 8·δ18O
            {outcome.predictor.edition.d2HNote ? ` — ${outcome.predictor.edition.d2HNote}` : ", with the two kriging errors treated as independent"}.
          </p>
        </div>
      ) : null}

      <Cautions variant={outcome.kind === "ok" ? "compact" : "full"} />
    </div>
  );
}
