import type { Metadata } from "next";
import Link from "next/link";
import { Cautions } from "@/components/cautions";
import { BatchUploader } from "@/components/lookup/batch-uploader";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { lowestPlanAllowing, PLAN_CATALOGUE, PLAN_ORDER, planLimits } from "@/lib/billing/plans";
import { editionChoices } from "@/lib/lookup/editions";

export const metadata: Metadata = { title: "Batch lookup" };

export default async function BatchLookupPage() {
  const viewer = await getViewer();
  const plan = viewer?.plan ?? "open";
  const max = planLimits(plan).batchLookupMaxSites;
  const editions = await editionChoices();
  const lowest = lowestPlanAllowing((l) => l.batchLookupMaxSites > 0);
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="Batch lookup"
        lead="Upload a CSV of sites and get back a CSV with the predicted monthly and annual δ18O, δ2H, d-excess and precipitation at each, every value with its standard deviation and 95% interval, and each site's predicted local water line."
      />
      <section aria-labelledby="format-heading" className="flex flex-col gap-2">
        <h2 id="format-heading" className="text-lg font-semibold">
          The sites file
        </h2>
        <p className="max-w-prose text-ink-700">
          A header row, then one site per row. Columns: <code>id</code> (your name for the site; optional), <code>latitude</code> and <code>longitude</code>{" "}
          (decimal degrees such as 46.5042, or degrees-minutes-seconds such as 46 30 15 N), and optionally <code>elevation_m</code> (metres above sea level; empty
          gives the sea-level equivalent). A file with a bad row is refused whole, with every problem listed by line, so a results file never silently misses a
          site.
        </p>
        <pre className="w-fit rounded border border-ink-200 bg-white p-3 text-xs">{`id,latitude,longitude,elevation_m\nspring-1,46.5042,7.2083,1200\nwell-7,47 22 10 N,8 33 05 E,\n`}</pre>
      </section>
      <section aria-labelledby="limits-heading" className="flex flex-col gap-2">
        <h2 id="limits-heading" className="text-lg font-semibold">
          Limits per plan
        </h2>
        <table className="w-fit border-collapse text-sm" data-testid="batch-limits">
          <thead>
            <tr className="border-b border-ink-300 text-left">
              <th className="px-2 py-1">Plan</th>
              <th className="px-2 py-1 text-right">Sites per file</th>
            </tr>
          </thead>
          <tbody>
            {PLAN_ORDER.map((p) => (
              <tr key={p} className={`border-b border-ink-100 ${p === plan ? "font-semibold" : ""}`}>
                <td className="px-2 py-1">
                  {PLAN_CATALOGUE[p].name}
                  {p === plan && viewer ? " (yours)" : ""}
                </td>
                <td className="px-2 py-1 text-right">{planLimits(p).batchLookupMaxSites ? planLimits(p).batchLookupMaxSites.toLocaleString("en") : "not included"}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="text-sm text-ink-700">Files here do not count against the API&apos;s daily quota; over the API (POST /api/v1/predict) each site counts one unit.</p>
      </section>
      {max > 0 ? (
        editions.length ? (
          <BatchUploader maxSites={max} editions={editions} />
        ) : (
          <Alert tone="info" title="No edition published yet">
            Batch lookups predict from a published edition; none has been published on this server yet.
          </Alert>
        )
      ) : (
        <Alert tone="info" title={viewer ? `Included from the ${lowest ? PLAN_CATALOGUE[lowest].name : "paid"} plan` : "Sign in to look up many sites"}>
          <span data-testid="batch-locked">
            Batch lookups are part of the paid plans; your {viewer ? `account is on the ${PLAN_CATALOGUE[plan].name} plan` : "visit is not signed in"}.{" "}
            {viewer ? (
              <Link href="/pricing" className="underline">
                See the plans
              </Link>
            ) : (
              <Link href="/sign-in?callbackUrl=%2Flookup%2Fbatch" className="underline">
                Sign in
              </Link>
            )}{" "}
            — single sites can be looked up on the{" "}
            <Link href="/lookup" className="underline">
              site lookup
            </Link>{" "}
            page.
          </span>
        </Alert>
      )}
      <Cautions variant="compact" />
    </div>
  );
}
