"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { createColumnHelper, flexRender, getCoreRowModel, useReactTable, type RowSelectionState } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { problemMessage, sendJson } from "@/lib/client-fetch";
import type { SampleView } from "@/lib/intake/batches";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { getJson, QueryProvider } from "./query-provider";
import { CheckList, SeverityBadge } from "./severity";

// The batch page of the review desk: every sample with its checks; decide one or many
// with a reason; accept every clean sample at once. A decision that lost a race to another
// moderator comes back as 409 and is shown as such; the table then reloads.

type BatchData = { samples: SampleView[] };
const col = createColumnHelper<SampleView>();

export function BatchReview({ batchId, initial }: { batchId: string; initial: BatchData }) {
  return (
    <QueryProvider>
      <BatchReviewInner batchId={batchId} initial={initial} />
    </QueryProvider>
  );
}

function BatchReviewInner({ batchId, initial }: { batchId: string; initial: BatchData }) {
  const client = useQueryClient();
  const q = useQuery({ queryKey: ["batch", batchId], queryFn: () => getJson<BatchData>(`/api/batches/${batchId}`), initialData: initial });
  const samples = q.data.samples;
  const [selection, setSelection] = useState<RowSelectionState>({});
  const [reason, setReason] = useState("");
  const [message, setMessage] = useState<{ tone: "success" | "error"; text: string } | null>(null);
  const decide = useMutation({
    mutationFn: async (v: { url: string; body: unknown }) => {
      const r = await sendJson<{ message: string }>(v.url, v.body);
      if (!r.ok) throw new Error(problemMessage(r.problem));
      return r.data;
    },
    onSuccess: (d) => {
      setMessage({ tone: "success", text: d.message });
      setSelection({});
      setReason("");
    },
    onError: (e) => setMessage({ tone: "error", text: e.message }),
    onSettled: () => client.invalidateQueries({ queryKey: ["batch", batchId] }),
  });
  const columns = useMemo(
    () => [
      col.display({
        id: "select",
        header: () => <span className="sr-only">Select</span>,
        cell: ({ row }) =>
          row.getCanSelect() ? (
            <input type="checkbox" aria-label={`Select ${row.original.stationCode} ${row.original.startDate}`} checked={row.getIsSelected()} onChange={row.getToggleSelectedHandler()} />
          ) : null,
      }),
      col.accessor("stationCode", { header: "Station" }),
      col.accessor((s) => `${s.startDate} → ${s.endDate}`, { id: "period", header: "Period" }),
      col.accessor("d18O", { header: "δ18O ‰" }),
      col.accessor("d2H", { header: "δ2H ‰" }),
      col.accessor("dExcess", { header: "d ‰", cell: (c) => c.getValue().toFixed(1) }),
      col.accessor("lcExcess", { header: "lc-excess ‰", cell: (c) => (c.getValue() === null ? "—" : (c.getValue() as number).toFixed(1)) }),
      col.accessor("amountMm", { header: "mm", cell: (c) => c.getValue() ?? "—" }),
      col.accessor("status", {
        header: "Decision",
        cell: (c) => (
          <span data-status={c.getValue()}>
            {c.getValue()}
            {c.row.original.version > 1 ? ` (version ${c.row.original.version})` : ""}
            {c.row.original.decisionReason ? <span className="block text-xs text-ink-600">“{c.row.original.decisionReason}”</span> : null}
          </span>
        ),
      }),
      col.display({
        id: "checks",
        header: "Checks",
        cell: ({ row }) => (
          <details>
            <summary className="cursor-pointer"><SeverityBadge severity={row.original.worstSeverity} /></summary>
            <CheckList checks={row.original.checks} />
          </details>
        ),
      }),
    ],
    [],
  );
  // TanStack Table's instance is not memoisable by the React Compiler; this component opts out knowingly.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: samples,
    columns,
    state: { rowSelection: selection },
    getRowId: (s) => s.id,
    enableRowSelection: (r) => r.original.status === "pending",
    onRowSelectionChange: setSelection,
    getCoreRowModel: getCoreRowModel(),
  });
  const chosen = samples.filter((s) => selection[s.id]);
  const clean = samples.filter((s) => s.status === "pending" && (s.worstSeverity === null || s.worstSeverity === "note"));
  const send = (decision: "accept" | "reject" | "return") =>
    decide.mutate({ url: "/api/review/decisions", body: { decision, reason, samples: chosen.map((s) => ({ id: s.id, rowVersion: s.rowVersion })) } });
  return (
    <div className="flex flex-col gap-3">
      {message ? <div data-testid="decision-message"><Alert tone={message.tone}>{message.text}</Alert></div> : null}
      <div className="flex flex-wrap items-end gap-2 rounded border border-ink-200 p-3">
        <p className="w-full text-sm">{chosen.length} selected.</p>
        <label className="flex flex-col text-sm">
          Reason (needed to reject or return; the contributor sees it)
          <textarea rows={2} className="w-96 rounded border border-ink-300 px-2 py-1" value={reason} onChange={(e) => setReason(e.target.value)} />
        </label>
        <Button type="button" disabled={!chosen.length || decide.isPending} onClick={() => send("accept")}>Accept selected</Button>
        <Button type="button" kind="secondary" disabled={!chosen.length || decide.isPending} onClick={() => send("return")}>Return selected for correction</Button>
        <Button type="button" kind="danger" disabled={!chosen.length || decide.isPending} onClick={() => send("reject")}>Reject selected</Button>
        <Button
          type="button"
          kind="secondary"
          disabled={!clean.length || decide.isPending}
          onClick={() => decide.mutate({ url: `/api/review/batches/${batchId}/accept-clean`, body: { samples: clean.map((s) => ({ id: s.id, rowVersion: s.rowVersion })) } })}
        >
          Accept all {clean.length} clean samples
        </Button>
      </div>
      <div className="overflow-x-auto">
        <table className="w-full min-w-[56rem] text-left text-sm" data-testid="review-samples">
          <thead className="border-b border-ink-300">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>{g.headers.map((h) => <th key={h.id} scope="col" className="py-1 pr-3 font-medium">{flexRender(h.column.columnDef.header, h.getContext())}</th>)}</tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} className="border-b border-ink-100 align-top" data-sample={r.original.id}>
                {r.getVisibleCells().map((c) => <td key={c.id} className="py-1 pr-3">{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
