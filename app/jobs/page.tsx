import type { Metadata } from "next";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { listRecentJobs } from "@/lib/jobs";

export const metadata: Metadata = { title: "Jobs" };

export default async function JobsPage() {
  await requirePageViewer({ roles: ["moderator", "admin"], path: "/jobs" });
  const rows = await listRecentJobs(100);
  return (
    <div>
      <PageHeader title="Jobs" lead="Background work — e-mail delivery, edition builds — with its progress. The 100 most recent." />
      <div className="overflow-x-auto">
        <table className="w-full min-w-[44rem] text-left text-sm" data-testid="jobs-table">
          <thead className="border-b border-ink-300 text-ink-700">
            <tr>
              <th scope="col" className="py-2 pr-4 font-medium">Kind</th>
              <th scope="col" className="py-2 pr-4 font-medium">State</th>
              <th scope="col" className="py-2 pr-4 font-medium">Progress</th>
              <th scope="col" className="py-2 pr-4 font-medium">Attempts</th>
              <th scope="col" className="py-2 pr-4 font-medium">Queued (UTC)</th>
              <th scope="col" className="py-2 font-medium">Last error</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((j) => (
              <tr key={j.id} className="border-b border-ink-100 align-top">
                <td className="py-2 pr-4 font-mono text-xs">{j.kind}</td>
                <td className="py-2 pr-4">{j.status}</td>
                <td className="py-2 pr-4 tabular">
                  {Math.round(j.progress * 100)} %{j.stage ? <span className="block text-xs text-ink-600">{j.stage}</span> : null}
                </td>
                <td className="py-2 pr-4 tabular">
                  {j.attempts}/{j.maxAttempts}
                </td>
                <td className="py-2 pr-4 tabular">{j.createdAt.toISOString().slice(0, 19).replace("T", " ")}</td>
                <td className="py-2 text-xs text-ink-700">{j.error ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {rows.length === 0 ? <p className="mt-4 text-ink-700">No jobs yet.</p> : null}
      </div>
    </div>
  );
}
