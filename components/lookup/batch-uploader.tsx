"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";

// Batch lookup in the browser: read the sites file, send it, show progress while
// the results arrive (NDJSON from /api/lookup/batch), then offer the results CSV.

type Problem = { detail?: string; errors?: Record<string, string[]> };

export function BatchUploader({ maxSites, editions }: { maxSites: number; editions: { id: string; label: string }[] }) {
  const [file, setFile] = useState<File | null>(null);
  const [edition, setEdition] = useState("");
  const [busy, setBusy] = useState(false);
  const [progress, setProgress] = useState<{ done: number; total: number } | null>(null);
  const [problem, setProblem] = useState<{ detail: string; lines: string[] } | null>(null);
  const [result, setResult] = useState<{ url: string; name: string; rows: number; edition: string } | null>(null);

  async function run(e: React.FormEvent) {
    e.preventDefault();
    setProblem(null);
    if (result) URL.revokeObjectURL(result.url);
    setResult(null);
    if (!file) {
      setProblem({ detail: "Choose a CSV file of sites first.", lines: [] });
      return;
    }
    if (file.size > 3_000_000) {
      setProblem({ detail: "The file is larger than 3 MB; split it.", lines: [] });
      return;
    }
    setBusy(true);
    try {
      const csv = await file.text();
      const res = await fetch("/api/lookup/batch", { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ csv, fileName: file.name, edition: edition || undefined }) });
      if (!res.ok || !res.body) {
        const p = (await res.json().catch(() => ({}))) as Problem;
        setProblem({ detail: p.detail ?? `The lookup failed (${res.status}).`, lines: p.errors?.csv ?? [] });
        return;
      }
      const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
      const parts: string[] = [];
      let buf = "";
      let total = 0;
      let ed = "";
      let finished = false;
      for (;;) {
        const { value, done } = await reader.read();
        if (done) break;
        buf += value;
        let nl: number;
        while ((nl = buf.indexOf("\n")) >= 0) {
          const msg = JSON.parse(buf.slice(0, nl)) as { type: string; total?: number; done?: number; csv?: string; header?: string; edition?: string };
          buf = buf.slice(nl + 1);
          if (msg.type === "start") {
            total = msg.total ?? 0;
            ed = msg.edition ?? "";
            parts.push(msg.header ?? "");
            setProgress({ done: 0, total });
          } else if (msg.type === "rows") {
            parts.push(msg.csv ?? "");
            setProgress({ done: msg.done ?? 0, total });
          } else if (msg.type === "end") finished = true;
        }
      }
      if (!finished) {
        setProblem({ detail: "The connection ended before every site was looked up; try again.", lines: [] });
        return;
      }
      const blob = new Blob(parts, { type: "text/csv;charset=utf-8" });
      const base = file.name.replace(/\.[^.]*$/, "") || "sites";
      setResult({ url: URL.createObjectURL(blob), name: `${base}-rainprint-${ed}.csv`, rows: total, edition: ed });
    } catch (err) {
      setProblem({ detail: err instanceof Error ? err.message : String(err), lines: [] });
    } finally {
      setBusy(false);
    }
  }

  const pct = progress && progress.total ? Math.round((100 * progress.done) / progress.total) : 0;
  return (
    <form onSubmit={run} className="flex flex-col gap-4 rounded-md border border-ink-200 bg-white p-4" data-testid="batch-form">
      <div className="grid gap-4 sm:grid-cols-2">
        <label className="flex flex-col gap-1 text-sm font-medium">
          Sites file (CSV, up to {maxSites.toLocaleString("en")} sites)
          <input type="file" name="file" accept=".csv,text/csv,text/plain" onChange={(e) => setFile(e.target.files?.[0] ?? null)} className="font-normal" data-testid="batch-file" />
        </label>
        <label className="flex flex-col gap-1 text-sm font-medium">
          Edition
          <select value={edition} onChange={(e) => setEdition(e.target.value)} className="rounded border border-ink-300 px-3 py-2 font-normal">
            <option value="">Current edition</option>
            {editions.map((x) => (
              <option key={x.id} value={x.id}>
                {x.label}
              </option>
            ))}
          </select>
        </label>
      </div>
      <div>
        <Button type="submit" disabled={busy} data-testid="batch-run">
          {busy ? "Looking up…" : "Look up every site"}
        </Button>
      </div>
      {progress && (busy || result) ? (
        <div className="flex flex-col gap-1" data-testid="batch-progress">
          <progress max={progress.total || 1} value={progress.done} className="h-3 w-full" aria-label="Sites looked up" />
          <p className="text-sm text-ink-700">
            {progress.done.toLocaleString("en")} of {progress.total.toLocaleString("en")} sites ({pct}%)
          </p>
        </div>
      ) : null}
      {problem ? (
        <div role="alert" className="rounded border border-severity-fail/50 bg-red-50 px-4 py-3 text-sm" data-testid="batch-problem">
          <p className="font-semibold">{problem.detail}</p>
          {problem.lines.length ? (
            <ul className="mt-1 list-disc pl-5">
              {problem.lines.map((l) => (
                <li key={l}>{l}</li>
              ))}
            </ul>
          ) : null}
        </div>
      ) : null}
      {result ? (
        <p className="text-sm" role="status">
          {result.rows.toLocaleString("en")} sites looked up in edition {result.edition}.{" "}
          <a href={result.url} download={result.name} className="font-medium underline" data-testid="batch-download">
            Download the results ({result.name})
          </a>
        </p>
      ) : null}
    </form>
  );
}
