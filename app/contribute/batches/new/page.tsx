import type { Metadata } from "next";
import Link from "next/link";
import { BatchEntry } from "@/components/intake/batch-entry";
import { Alert } from "@/components/ui/alert";
import { PageHeader } from "@/components/ui/page-header";
import { requirePageViewer } from "@/lib/auth/guard";
import { INTAKE_LIMITS, SAMPLE_COLUMNS } from "@/lib/intake/columns";
import { listStationsOf } from "@/lib/intake/stations";

export const metadata: Metadata = { title: "Submit samples" };

export default async function NewBatchPage() {
  const viewer = await requirePageViewer({ path: "/contribute/batches/new" });
  const codes = (await listStationsOf(viewer.id)).filter((s) => s.status === "approved").map((s) => s.code);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Submit samples"
        lead={`Type samples into the grid or load a CSV file, check them, fix what is flagged, then submit the batch for review. Limits: ${INTAKE_LIMITS.maxFileBytes / (1024 * 1024)} MB and ${INTAKE_LIMITS.maxRows.toLocaleString("en-GB")} rows per file, ${INTAKE_LIMITS.maxFormRows} rows in the grid.`}
      />
      {!codes.length ? (
        <Alert tone="info">
          You have no approved station yet. <Link className="underline" href="/contribute/stations/new">Register one</Link>; once a moderator approves it you can submit samples here.
        </Alert>
      ) : null}
      <BatchEntry stationCodes={codes} />
      <details className="text-sm">
        <summary className="cursor-pointer font-medium">The columns</summary>
        <table className="mt-2 text-left">
          <thead><tr><th className="pr-3">Column</th><th className="pr-3">Needed</th><th>What goes in it</th></tr></thead>
          <tbody>
            {SAMPLE_COLUMNS.map((c) => (
              <tr key={c.name} className="align-top"><td className="pr-3 font-mono">{c.name}</td><td className="pr-3">{c.required ? "required" : "optional"}</td><td>{c.help}</td></tr>
            ))}
          </tbody>
        </table>
        <p className="mt-2">Column names may be in any letter case; the delimiter may be a comma, semicolon or tab; a byte-order mark and blank lines are fine. Unknown columns are refused so nothing is silently dropped.</p>
      </details>
    </div>
  );
}
