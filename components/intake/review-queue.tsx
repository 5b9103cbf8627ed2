"use client";

import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo, useState } from "react";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import type { StationCheck } from "@/lib/intake/station-checks";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { getJson, QueryProvider } from "./query-provider";
import { SeverityBadge } from "./severity";

// The review desk's queue (server-side sort, filter and paging) and the new stations.

type QueueRow = {
  id: string;
  status: string;
  source: string;
  sampleCount: number;
  pending: number;
  ageDays: number;
  worstSeverity: "fail" | "warn" | "note" | null;
  createdAt: string;
  stationCodes: string[];
  contributorName: string | null;
  isDemo: boolean;
};
type Queue = { rows: QueueRow[]; total: number; page: number; pageSize: number };

const col = createColumnHelper<QueueRow>();
const SORT_IDS: Record<string, string> = { age: "age", stations: "station", contributor: "contributor", worst: "severity", pending: "samples" };

export function ReviewDesk() {
  return (
    <QueryProvider>
      <div className="flex flex-col gap-10">
        <QueueTable />
        <PendingStations />
      </div>
    </QueryProvider>
  );
}

function QueueTable() {
  const [sorting, setSorting] = useState<SortingState>([{ id: "age", desc: true }]);
  const [page, setPage] = useState(1);
  const [station, setStation] = useState("");
  const [contributor, setContributor] = useState("");
  const [severity, setSeverity] = useState("");
  const params = new URLSearchParams({ page: String(page), pageSize: "20" });
  if (sorting[0]) {
    params.set("sort", SORT_IDS[sorting[0].id] ?? "age");
    params.set("dir", sorting[0].desc ? "desc" : "asc");
  }
  if (station) params.set("station", station);
  if (contributor) params.set("contributor", contributor);
  if (severity) params.set("severity", severity);
  const q = useQuery({ queryKey: ["review-queue", params.toString()], queryFn: () => getJson<Queue>(`/api/review/queue?${params}`), placeholderData: keepPreviousData });
  const columns = useMemo(
    () => [
      col.accessor("ageDays", { id: "age", header: "Waiting", cell: (c) => `${c.getValue()} d` }),
      col.accessor((r) => r.stationCodes.join(", "), { id: "stations", header: "Stations" }),
      col.accessor("contributorName", { id: "contributor", header: "Contributor", cell: (c) => <>{c.getValue()}{c.row.original.isDemo ? <span className="ml-1 text-xs text-ink-600">(synthetic demo data)</span> : null}</> }),
      col.accessor("pending", { id: "pending", header: "Pending / samples", cell: (c) => `${c.getValue()} / ${c.row.original.sampleCount}` }),
      col.accessor("worstSeverity", { id: "worst", header: "Worst check", cell: (c) => <SeverityBadge severity={c.getValue()} /> }),
      col.display({ id: "open", header: () => <span className="sr-only">Open</span>, cell: (c) => <Link className="underline" href={`/review/batches/${c.row.original.id}`}>Review</Link> }),
    ],
    [],
  );
  const data = q.data?.rows ?? [];
  // TanStack Table's instance is not memoisable by the React Compiler; this component opts out knowingly.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    onSortingChange: (s) => {
      setSorting(s);
      setPage(1);
    },
    getCoreRowModel: getCoreRowModel(),
  });
  const pages = q.data ? Math.max(1, Math.ceil(q.data.total / q.data.pageSize)) : 1;
  const input = "rounded border border-ink-300 px-2 py-1 text-sm";
  return (
    <section aria-labelledby="queue-heading" className="flex flex-col gap-3">
      <h2 id="queue-heading" className="text-lg font-semibold">Batches waiting for a decision {q.data ? `(${q.data.total})` : ""}</h2>
      <div className="flex flex-wrap items-end gap-3">
        <label className="flex flex-col text-sm">Station code<input className={input} value={station} onChange={(e) => { setStation(e.target.value); setPage(1); }} /></label>
        <label className="flex flex-col text-sm">Contributor<input className={input} value={contributor} onChange={(e) => { setContributor(e.target.value); setPage(1); }} /></label>
        <label className="flex flex-col text-sm">
          Worst check
          <select className={input} value={severity} onChange={(e) => { setSeverity(e.target.value); setPage(1); }}>
            <option value="">any</option>
            <option value="fail">fails a check</option>
            <option value="warn">warning</option>
            <option value="note">note</option>
            <option value="clean">no findings</option>
          </select>
        </label>
      </div>
      {q.error ? <Alert tone="error">{q.error.message}</Alert> : null}
      <div className="overflow-x-auto">
        <table className="w-full min-w-[44rem] text-left text-sm" data-testid="review-queue">
          <thead className="border-b border-ink-300">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>
                {g.headers.map((h) => (
                  <th key={h.id} scope="col" className="py-2 pr-3 font-medium" aria-sort={h.column.getIsSorted() === "asc" ? "ascending" : h.column.getIsSorted() === "desc" ? "descending" : undefined}>
                    {h.column.id in SORT_IDS ? (
                      <button type="button" className="underline decoration-dotted" onClick={h.column.getToggleSortingHandler()}>
                        {flexRender(h.column.columnDef.header, h.getContext())}
                        {h.column.getIsSorted() === "asc" ? " ▲" : h.column.getIsSorted() === "desc" ? " ▼" : ""}
                      </button>
                    ) : (
                      flexRender(h.column.columnDef.header, h.getContext())
                    )}
                  </th>
                ))}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-b border-ink-100" data-batch={r.original.id}>
                {r.getVisibleCells().map((c) => <td key={c.id} className="py-2 pr-3">{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
              </tr>
            ))}
            {!data.length && !q.isLoading ? <tr><td colSpan={6} className="py-3 text-ink-600">Nothing waiting.</td></tr> : null}
          </tbody>
        </table>
      </div>
      <div className="flex items-center gap-2 text-sm">
        <Button kind="secondary" type="button" onClick={() => setPage((p) => Math.max(1, p - 1))} disabled={page <= 1}>Previous</Button>
        <span>Page {page} of {pages}</span>
        <Button kind="secondary" type="button" onClick={() => setPage((p) => Math.min(pages, p + 1))} disabled={page >= pages}>Next</Button>
      </div>
    </section>
  );
}

type PendingStation = {
  code: string;
  name: string;
  lat: number;
  lon: number;
  elevationM: number;
  collectorType: string;
  ownerName: string | null;
  rowVersion: number;
  status: string;
  entryChecks: StationCheck[] | null;
  createdAt: string;
};

function PendingStations() {
  const client = useQueryClient();
  const q = useQuery({ queryKey: ["pending-stations"], queryFn: () => getJson<{ stations: PendingStation[] }>("/api/stations?status=pending") });
  const [reasons, setReasons] = useState<Record<string, string>>({});
  const [message, setMessage] = useState<{ tone: "success" | "error"; text: string } | null>(null);
  const decide = useMutation({
    mutationFn: async (v: { code: string; decision: "approve" | "return" | "reject"; rowVersion: number }) => {
      const r = await sendJson<{ message: string }>(`/api/stations/${encodeURIComponent(v.code)}/decision`, { decision: v.decision, reason: reasons[v.code] ?? "", rowVersion: v.rowVersion });
      if (!r.ok) throw new Error(problemMessage(r.problem));
      return r.data;
    },
    onSuccess: (d) => setMessage({ tone: "success", text: d.message }),
    onError: (e) => setMessage({ tone: "error", text: e.message }),
    onSettled: () => client.invalidateQueries({ queryKey: ["pending-stations"] }),
  });
  const list = q.data?.stations ?? [];
  return (
    <section aria-labelledby="stations-heading" className="flex flex-col gap-3">
      <h2 id="stations-heading" className="text-lg font-semibold">New stations waiting for approval ({list.length})</h2>
      {message ? <Alert tone={message.tone}>{message.text}</Alert> : null}
      {!list.length && !q.isLoading ? <p className="text-ink-600">No stations waiting.</p> : null}
      <ul className="flex flex-col gap-4">
        {list.map((s) => (
          <li key={s.code} className="rounded border border-ink-200 p-3" data-station={s.code}>
            <p className="font-medium">
              {s.code} — {s.name} <span className="text-sm font-normal text-ink-700">by {s.ownerName ?? "unknown"}</span>
            </p>
            <p className="text-sm text-ink-700">
              {s.lat.toFixed(4)}°, {s.lon.toFixed(4)}°, {s.elevationM} m, {s.collectorType}
            </p>
            {s.entryChecks?.length ? (
              <ul className="mt-1 list-disc pl-5 text-sm">{s.entryChecks.map((c, i) => <li key={i}><SeverityBadge severity={c.severity} /> {c.message}</li>)}</ul>
            ) : (
              <p className="text-sm text-ink-600">The entry checks found nothing.</p>
            )}
            <div className="mt-2 flex flex-wrap items-end gap-2">
              <label className="flex flex-col text-sm">
                Reason (needed to return or reject)
                <input className="w-80 rounded border border-ink-300 px-2 py-1" value={reasons[s.code] ?? ""} onChange={(e) => setReasons({ ...reasons, [s.code]: e.target.value })} />
              </label>
              <Button type="button" onClick={() => decide.mutate({ code: s.code, decision: "approve", rowVersion: s.rowVersion })} disabled={decide.isPending}>Approve {s.code}</Button>
              <Button type="button" kind="secondary" onClick={() => decide.mutate({ code: s.code, decision: "return", rowVersion: s.rowVersion })} disabled={decide.isPending}>Return for changes</Button>
              <Button type="button" kind="danger" onClick={() => decide.mutate({ code: s.code, decision: "reject", rowVersion: s.rowVersion })} disabled={decide.isPending}>Reject</Button>
            </div>
          </li>
        ))}
      </ul>
    </section>
  );
}
