"use client";

import { useMutation } from "@tanstack/react-query";
import { createColumnHelper, flexRender, getCoreRowModel, getPaginationRowModel, useReactTable } from "@tanstack/react-table";
import Link from "next/link";
import { useMemo, useRef, useState } from "react";
import { useFieldArray, useForm } from "react-hook-form";
import { problemMessage, sendJson, type ClientProblem } from "@/lib/client-fetch";
import { INTAKE_LIMITS, SAMPLE_COLUMNS, columnLabel, type SampleColumnName, type SampleRowInput } from "@/lib/intake/columns";
import type { CheckResult } from "@/lib/qc";
import { problemsCsv } from "@/lib/intake/report";
import { Alert } from "../ui/alert";
import { Button } from "../ui/button";
import { QueryProvider } from "./query-provider";
import { CheckList, SeverityBadge } from "./severity";

// Enter a batch: type rows into the grid or load a file; "Check rows" shows every row with
// its errors and the check results; "Submit batch" queues it. Nothing is saved before submit.

type CellError = { column: string; message: string };
type PreviewRow = { line: number; cells: SampleRowInput; errors: CellError[]; checks: CheckResult[]; worst: "fail" | "warn" | "note" | null; dExcess: number | null };
type Preview = { rows: PreviewRow[]; rowsWithErrors: number; counts: { fail: number; warn: number; note: number; clean: number }; stationCodes: string[]; sizeBytes?: number; sha256?: string; delimiter?: string };
type FormValues = { rows: Record<SampleColumnName, string>[] };

const emptyRow = (code = ""): Record<SampleColumnName, string> =>
  Object.fromEntries(SAMPLE_COLUMNS.map((c) => [c.name, c.name === "station_code" ? code : c.name === "scale" ? "VSMOW-SLAP" : ""])) as Record<SampleColumnName, string>;
const toFull = (cells: SampleRowInput) => Object.fromEntries(SAMPLE_COLUMNS.map((c) => [c.name, cells[c.name] ?? ""])) as Record<SampleColumnName, string>;

export function BatchEntry({ stationCodes }: { stationCodes: string[] }) {
  return (
    <QueryProvider>
      <BatchEntryInner stationCodes={stationCodes} />
    </QueryProvider>
  );
}

async function post<T>(url: string, body: unknown, raw?: ArrayBuffer): Promise<T> {
  let res: Response;
  if (raw) res = await fetch(url, { method: "POST", headers: { "Content-Type": "text/csv", Accept: "application/json" }, body: raw });
  else {
    const r = await sendJson<T>(url, body);
    if (!r.ok) throw new ProblemError(r.problem);
    return r.data;
  }
  const json = await res.json().catch(() => null);
  if (!res.ok) throw new ProblemError(json ?? { title: "Something went wrong", code: "unknown", status: res.status });
  return json as T;
}

class ProblemError extends Error {
  constructor(readonly problem: ClientProblem & { rows?: { line: number; errors: CellError[] }[] }) {
    super(problemMessage(problem));
  }
}

function toBase64(buf: ArrayBuffer): string {
  const bytes = new Uint8Array(buf);
  let s = "";
  for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000));
  return btoa(s);
}

function BatchEntryInner({ stationCodes }: { stationCodes: string[] }) {
  const form = useForm<FormValues>({ defaultValues: { rows: [emptyRow(stationCodes[0] ?? "")] } });
  const rows = useFieldArray({ control: form.control, name: "rows" });
  const [file, setFile] = useState<{ name: string; bytes: ArrayBuffer } | null>(null);
  const [preview, setPreview] = useState<Preview | null>(null);
  const [fileOnly, setFileOnly] = useState(false);
  const [note, setNote] = useState("");
  const fileInput = useRef<HTMLInputElement>(null);

  const checkFile = useMutation({
    mutationFn: async (f: File) => {
      const bytes = await f.arrayBuffer();
      const p = await post<Preview>("/api/batches/preview-csv", null, bytes);
      return { p, name: f.name, bytes };
    },
    onSuccess: ({ p, name, bytes }) => {
      setFile({ name, bytes });
      setPreview(p);
      const fits = p.rows.length <= INTAKE_LIMITS.maxFormRows;
      setFileOnly(!fits);
      if (fits) form.reset({ rows: p.rows.map((r) => toFull(r.cells)) });
    },
    onError: () => {
      setFile(null);
      setPreview(null);
    },
  });
  const checkRows = useMutation({
    mutationFn: (values: FormValues) => post<Preview>("/api/batches/preview", { rows: values.rows }),
    onSuccess: (p) => setPreview(p),
  });
  const submit = useMutation({
    mutationFn: async () => {
      const values = fileOnly ? preview!.rows.map((r) => toFull(r.cells)) : form.getValues().rows;
      return post<{ batchId: string; sampleCount: number; message: string }>("/api/batches", {
        rows: values,
        note: note || undefined,
        file: file ? { name: file.name, contentBase64: toBase64(file.bytes) } : undefined,
      });
    },
    onError: (e) => {
      if (e instanceof ProblemError && e.problem.rows && preview) {
        const byLine = new Map(e.problem.rows.map((r) => [r.line, r.errors]));
        setPreview({ ...preview, rows: preview.rows.map((r, i) => ({ ...r, errors: byLine.get(i + 1) ?? r.errors })) });
      }
    },
  });

  // Grid row i ↔ preview row i (a file's rows load into the grid in order).
  const errorsByLine = useMemo(() => new Map((preview?.rows ?? []).map((r, i) => [i + 1, r.errors])), [preview]);
  const ready = preview && preview.rowsWithErrors === 0 && preview.rows.length > 0;

  if (submit.data)
    return (
      <div className="flex flex-col gap-3" data-testid="batch-submitted">
        <Alert tone="success" title={submit.data.message}>
          <p>You will get an e-mail now and another when a moderator has decided every sample.</p>
        </Alert>
        <p>
          <Link className="underline" href={`/contribute/batches/${submit.data.batchId}`}>Open the batch</Link> · <Link className="underline" href="/contribute">Dashboard</Link>
        </p>
      </div>
    );

  return (
    <div className="flex flex-col gap-6">
      <section aria-labelledby="file-heading" className="flex flex-col gap-2">
        <h2 id="file-heading" className="text-lg font-semibold">Load a file</h2>
        <p className="text-sm text-ink-700">
          CSV with Rainprint&apos;s column names (comma, semicolon or tab; UTF-8). At most {INTAKE_LIMITS.maxFileBytes / (1024 * 1024)} MB and{" "}
          {INTAKE_LIMITS.maxRows.toLocaleString("en-GB")} rows per file; files up to {INTAKE_LIMITS.maxFormRows} rows open in the grid below for fixing.{" "}
          <a className="underline" href="/api/intake/template" download>Download the template</a>.
        </p>
        <label htmlFor="batch-file" className="text-sm font-medium">Sample file</label>
        <input
          id="batch-file"
          ref={fileInput}
          type="file"
          accept=".csv,.tsv,.txt,text/csv"
          onChange={(e) => {
            const f = e.currentTarget.files?.[0];
            if (f) checkFile.mutate(f);
          }}
        />
        {checkFile.isPending ? <p className="text-sm">Reading the file…</p> : null}
        {checkFile.error ? <div data-testid="file-error"><Alert tone="error">{checkFile.error.message}</Alert></div> : null}
        {file && preview?.sha256 ? (
          <p className="text-xs text-ink-600" data-testid="file-facts">
            {file.name}: {preview.sizeBytes?.toLocaleString("en-GB")} bytes, SHA-256 <span className="font-mono">{preview.sha256.slice(0, 16)}…</span>, {preview.rows.length} rows. The file is kept with the batch when you submit.
          </p>
        ) : null}
      </section>

      {!fileOnly ? (
        <section aria-labelledby="grid-heading" className="flex flex-col gap-2">
          <h2 id="grid-heading" className="text-lg font-semibold">Samples</h2>
          <p className="text-sm text-ink-700">One row per sample. Dates YYYY-MM-DD; the period runs up to, not including, the “until” day. δ values in ‰ vs VSMOW, numbers only.</p>
          <datalist id="my-station-codes">{stationCodes.map((c) => <option key={c} value={c} />)}</datalist>
          <div className="overflow-x-auto">
            <table className="text-left text-xs" data-testid="sample-grid">
              <thead>
                <tr>
                  <th className="px-1">Row</th>
                  {SAMPLE_COLUMNS.map((c) => <th key={c.name} scope="col" className="px-1 font-medium" title={c.help}>{c.label}{c.required ? " *" : ""}</th>)}
                  <th><span className="sr-only">Remove</span></th>
                </tr>
              </thead>
              <tbody>
                {rows.fields.map((f, i) => {
                  const errs = errorsByLine.get(i + 1) ?? [];
                  return (
                    <tr key={f.id} data-line={i + 1} className={errs.length ? "bg-red-50" : undefined}>
                      <td className="px-1 text-ink-600">{i + 1}</td>
                      {SAMPLE_COLUMNS.map((c) => {
                        const e = errs.filter((x) => x.column === c.name);
                        return (
                          <td key={c.name} className="px-0.5 py-0.5">
                            <input
                              aria-label={`${c.label}, row ${i + 1}`}
                              aria-invalid={e.length ? true : undefined}
                              title={e.map((x) => x.message).join(" ") || undefined}
                              list={c.name === "station_code" ? "my-station-codes" : undefined}
                              className={`rounded border border-ink-300 px-1 py-1 font-mono aria-[invalid=true]:border-severity-fail ${c.kind === "text" ? "w-32" : c.kind === "date" ? "w-28" : "w-20"}`}
                              {...form.register(`rows.${i}.${c.name}`)}
                            />
                          </td>
                        );
                      })}
                      <td>
                        <button type="button" className="px-1 text-ink-600 underline" onClick={() => rows.remove(i)} aria-label={`Remove row ${i + 1}`}>×</button>
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap gap-2">
            <Button type="button" kind="secondary" onClick={() => rows.append(emptyRow(form.getValues().rows.at(-1)?.station_code ?? stationCodes[0] ?? ""))} disabled={rows.fields.length >= INTAKE_LIMITS.maxFormRows}>Add a row</Button>
            <Button type="button" onClick={form.handleSubmit((v) => checkRows.mutate(v))} disabled={checkRows.isPending}>Check rows</Button>
          </div>
          {checkRows.error ? <Alert tone="error">{checkRows.error.message}</Alert> : null}
        </section>
      ) : (
        <Alert tone="info">This file has more rows than the grid shows; fix problems in the file and load it again.</Alert>
      )}

      {preview ? (
        <section aria-labelledby="preview-heading" className="flex flex-col gap-3">
          <h2 id="preview-heading" className="text-lg font-semibold">What the checks found</h2>
          <p data-testid="preview-summary" className="text-sm">
            {preview.rows.length} rows: {preview.rowsWithErrors} with problems to fix; of the others {preview.counts.fail} fail a check, {preview.counts.warn} have warnings,{" "}
            {preview.counts.note} have notes, {preview.counts.clean} are clean.
          </p>
          {preview.rowsWithErrors ? (
            <p>
              <button
                type="button"
                className="text-sm underline"
                onClick={() => {
                  const blob = new Blob([problemsCsv(preview.rows.filter((r) => r.errors.length))], { type: "text/csv;charset=utf-8" });
                  const a = document.createElement("a");
                  a.href = URL.createObjectURL(blob);
                  a.download = `${file?.name.replace(/\.[^.]+$/, "") ?? "samples"}-problems.csv`;
                  a.click();
                  URL.revokeObjectURL(a.href);
                }}
              >
                Download the problems as a CSV list
              </button>
            </p>
          ) : null}
          <PreviewTable rows={preview.rows} />
          <div className="flex flex-col gap-2">
            <label htmlFor="batch-note" className="text-sm font-medium">Note for the reviewer (optional)</label>
            <textarea id="batch-note" rows={2} maxLength={1000} className="max-w-2xl rounded border border-ink-300 px-2 py-1" value={note} onChange={(e) => setNote(e.target.value)} />
          </div>
          {submit.error ? <div data-testid="submit-error"><Alert tone="error">{submit.error.message}</Alert></div> : null}
          {!ready ? <p className="text-sm text-ink-700">Fix the rows with problems and check again before submitting.</p> : null}
          <div>
            <Button type="button" disabled={!ready || submit.isPending} onClick={() => submit.mutate()}>Submit batch</Button>
          </div>
          <p className="text-xs text-ink-600">Samples that fail a check can still be submitted; a moderator decides. By submitting you agree that accepted data is published under CC BY 4.0.</p>
        </section>
      ) : null}
    </div>
  );
}

const col = createColumnHelper<PreviewRow>();

function PreviewTable({ rows }: { rows: PreviewRow[] }) {
  const columns = useMemo(
    () => [
      col.display({ id: "row", header: "Row", cell: ({ row }) => row.index + 1 }),
      col.accessor((r) => r.cells.station_code ?? "", { id: "station", header: "Station" }),
      col.accessor((r) => `${r.cells.collected_from ?? ""} → ${r.cells.collected_until ?? ""}`, { id: "period", header: "Period" }),
      col.accessor((r) => r.cells.d18O_permil ?? "", { id: "d18O", header: "δ18O" }),
      col.accessor((r) => r.cells.d2H_permil ?? "", { id: "d2H", header: "δ2H" }),
      col.accessor("dExcess", { header: "d-excess", cell: (c) => (c.getValue() === null ? "" : (c.getValue() as number).toFixed(1)) }),
      col.display({
        id: "result",
        header: "Problems and checks",
        cell: ({ row }) =>
          row.original.errors.length ? (
            <ul className="flex flex-col gap-1" data-testid="row-errors">
              {row.original.errors.map((e, i) => (
                <li key={i} className="text-severity-fail">
                  <span className="font-medium">{e.column === "row" ? "Row" : columnLabel(e.column)}:</span> {e.message}
                </li>
              ))}
            </ul>
          ) : (
            <div className="flex flex-col gap-1">
              <SeverityBadge severity={row.original.worst} />
              <CheckList checks={row.original.checks.filter((c) => c.severity !== "note" || row.original.checks.length < 4)} />
            </div>
          ),
      }),
    ],
    [],
  );
  // TanStack Table's instance is not memoisable by the React Compiler; this component opts out knowingly.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel(), getPaginationRowModel: getPaginationRowModel(), initialState: { pagination: { pageSize: 50 } } });
  return (
    <div className="flex flex-col gap-2">
      <div className="overflow-x-auto">
        <table className="w-full min-w-[48rem] text-left text-sm" data-testid="preview-table">
          <thead className="border-b border-ink-300">
            {table.getHeaderGroups().map((g) => (
              <tr key={g.id}>{g.headers.map((h) => <th key={h.id} scope="col" className="py-1 pr-3 font-medium">{flexRender(h.column.columnDef.header, h.getContext())}</th>)}</tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((r) => (
              <tr key={r.id} data-line={r.original.line} className={`border-b border-ink-100 align-top ${r.original.errors.length ? "bg-red-50" : ""}`}>
                {r.getVisibleCells().map((c) => <td key={c.id} className="py-1 pr-3">{flexRender(c.column.columnDef.cell, c.getContext())}</td>)}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {table.getPageCount() > 1 ? (
        <div className="flex items-center gap-2 text-sm">
          <Button kind="secondary" type="button" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>Previous</Button>
          <span>Page {table.getState().pagination.pageIndex + 1} of {table.getPageCount()}</span>
          <Button kind="secondary" type="button" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>Next</Button>
        </div>
      ) : null}
    </div>
  );
}
