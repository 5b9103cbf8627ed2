import type { Metadata } from "next";
import Link from "next/link";
import { DemoLabel } from "@/components/demo-label";
import { PageHeader } from "@/components/ui/page-header";
import { getViewer } from "@/lib/auth/guard";
import { listPublishedEditions } from "@/lib/editions/queries";
import { fmt } from "@/lib/editions/format";

export const metadata: Metadata = { title: "Editions" };
export const dynamic = "force-dynamic";

export default async function EditionsPage() {
  const [list, viewer] = await Promise.all([listPublishedEditions(), getViewer()]);
  const moderator = viewer?.role === "moderator" || viewer?.role === "admin";
  const currentId = list.find((e) => e.status === "published")?.id;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Editions"
        lead="Each edition is a frozen set of surfaces built from the accepted samples at one moment, with its method, parameters and cross-validation on record. Cite the edition id with any value you use."
      >
        {moderator ? (
          <p className="mt-2 text-sm">
            <Link className="underline" href="/editions/builds">
              Build a new edition
            </Link>
          </p>
        ) : null}
      </PageHeader>
      {list.some((e) => e.isDemo) ? <DemoLabel what="the editions below are built from invented stations and samples" /> : null}
      {list.length === 0 ? <p className="text-ink-700">No edition has been published yet.</p> : null}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[40rem] text-left text-sm" data-testid="editions-table">
          <thead className="border-b border-ink-300 text-ink-700">
            <tr>
              <th scope="col" className="py-2 pr-4 font-medium">Edition</th>
              <th scope="col" className="py-2 pr-4 font-medium">Published (UTC)</th>
              <th scope="col" className="py-2 pr-4 font-medium">Stations</th>
              <th scope="col" className="py-2 pr-4 font-medium">Samples</th>
              <th scope="col" className="py-2 pr-4 font-medium">Cell size</th>
              <th scope="col" className="py-2 pr-4 font-medium">δ18O annual: cross-validation RMSE (‰)</th>
            </tr>
          </thead>
          <tbody>
            {list.map((e) => {
              const s = e.summary;
              const cv = s?.surfaces.find((x) => x.variable === "d18O" && x.period === 0)?.crossValidation;
              const grid = (e.parameters as { grid?: { resolutionDeg?: number } } | null)?.grid;
              return (
                <tr key={e.id} className="border-b border-ink-100">
                  <td className="py-2 pr-4">
                    <Link className="font-medium underline" href={`/editions/${e.id}`}>
                      {e.id}
                    </Link>
                    {e.id === currentId ? <span className="ml-2 rounded bg-tarn-100 px-1.5 py-0.5 text-xs">current</span> : null}
                    {e.status === "withdrawn" ? <span className="ml-2 rounded bg-red-50 px-1.5 py-0.5 text-xs">withdrawn</span> : null}
                  </td>
                  <td className="py-2 pr-4 tabular">{e.publishedAt?.toISOString().slice(0, 16).replace("T", " ") ?? "—"}</td>
                  <td className="py-2 pr-4 tabular">{s?.stations.total ?? "—"}</td>
                  <td className="py-2 pr-4 tabular">{s?.stations.samples?.toLocaleString("en-GB") ?? "—"}</td>
                  <td className="py-2 pr-4 tabular">{grid?.resolutionDeg ? `${grid.resolutionDeg}°` : "—"}</td>
                  <td className="py-2 pr-4 tabular">{fmt(cv?.rmse)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
