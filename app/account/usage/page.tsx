import type { Metadata } from "next";
import Link from "next/link";
import { UsageChart } from "@/components/charts/usage-chart";
import { PageHeader } from "@/components/ui/page-header";
import { usageReportFor } from "@/lib/api/usage-report";
import { requirePageViewer } from "@/lib/auth/guard";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";

export const metadata: Metadata = { title: "API usage" };

const n = (x: number) => x.toLocaleString("en-GB");

export default async function UsagePage() {
  const viewer = await requirePageViewer({ path: "/account/usage" });
  const report = await usageReportFor(viewer, { days: 30 });
  const rows = report.days.map((d, i) => ({ day: d, total: report.totals[i], parts: report.series.map((s) => s.values[i]) })).reverse();
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title="API usage"
        lead={`Requests to the Rainprint API counted against ${report.scopeName}'s daily quota (${PLAN_CATALOGUE[viewer.plan].name} plan), per UTC day and per key, over the last 30 days.`}
      />
      <section aria-labelledby="today-heading" className="rounded-md border border-ink-200 bg-white p-5">
        <h2 id="today-heading" className="text-lg font-semibold">
          Today (UTC)
        </h2>
        <p className="mt-1 text-ink-800" data-testid="usage-today">
          {n(report.usedToday)} of {n(report.dailyLimit)} quota units used; {n(Math.max(0, report.dailyLimit - report.usedToday))} left. The quota renews at 00:00 UTC.
        </p>
        <p className="mt-1 text-sm text-ink-600">
          Requests refused as malformed are not counted. Counts reach this page within about a second. <Link href="/api#quotas" className="underline">How quotas work</Link>
          {" · "}
          <Link href="/account/api-keys" className="underline">API keys</Link>
        </p>
      </section>
      <section aria-labelledby="chart-heading" className="flex flex-col gap-3">
        <h2 id="chart-heading" className="text-lg font-semibold">
          Last 30 days
        </h2>
        <UsageChart days={report.days} series={report.series} dailyLimit={report.dailyLimit} title={`Quota units per day for ${report.scopeName}, by key`} />
        <div className="overflow-x-auto">
          <table className="w-full min-w-[32rem] text-left text-sm" data-testid="usage-table">
            <caption className="sr-only">Quota units per day and key</caption>
            <thead className="border-b border-ink-300 text-ink-700">
              <tr>
                <th scope="col" className="py-2 pr-3 font-medium">Day (UTC)</th>
                {report.series.map((s) => (
                  <th key={s.id} scope="col" className="py-2 pr-3 font-medium">
                    {s.label}
                    {s.revoked ? " — revoked" : ""}
                  </th>
                ))}
                <th scope="col" className="py-2 font-medium">Total</th>
              </tr>
            </thead>
            <tbody>
              {rows
                .filter((r, i) => r.total > 0 || i === 0)
                .map((r) => (
                  <tr key={r.day} className="border-b border-ink-100">
                    <th scope="row" className="py-1 pr-3 font-normal">{r.day}</th>
                    {r.parts.map((v, k) => (
                      <td key={report.series[k].id} className="py-1 pr-3 tabular-nums">{n(v)}</td>
                    ))}
                    <td className="py-1 tabular-nums">{n(r.total)}</td>
                  </tr>
                ))}
            </tbody>
          </table>
        </div>
      </section>
    </div>
  );
}
