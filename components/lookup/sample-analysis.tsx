"use client";

import { useState } from "react";
import { DualIsotopeChart } from "@/components/charts/lookup-charts";
import { Button } from "@/components/ui/button";
import type { SitePrediction } from "@/lib/editions/prediction";
import { num } from "@/lib/lookup/format";
import { analyseSamples, parseSamplesText, type PredictedLine, type SampleAnalysis } from "@/lib/lookup/samples";

// The δ2H–δ18O chart of the site report with the user's own samples placed on it.
// Everything is computed in the browser (lib/isotopes); the samples never leave it.

export function SampleAnalysisPanel({ p, line }: { p: SitePrediction; line: PredictedLine | null }) {
  const [text, setText] = useState("");
  const [error, setError] = useState<string | null>(null);
  const [result, setResult] = useState<SampleAnalysis | null>(null);

  function place() {
    setError(null);
    if (!line) {
      setError("This site has no predicted water line, so samples cannot be placed against it.");
      return;
    }
    try {
      setResult(analyseSamples(parseSamplesText(text), line));
    } catch (e) {
      setResult(null);
      setError(e instanceof Error ? e.message : String(e));
    }
  }

  async function load(file: File | undefined) {
    if (!file) return;
    if (file.size > 200_000) {
      setError("That file is larger than 200 KB; a sample list is a few KB.");
      return;
    }
    setText(await file.text());
  }

  const ev = result?.evaporation;
  return (
    <div className="flex flex-col gap-4">
      <DualIsotopeChart
        p={p}
        line={line}
        samples={result?.samples ?? []}
        evaporation={ev?.kind === "fitted" ? ev.line : null}
        source={ev?.kind === "fitted" ? ev.sourceWater : null}
      />
      <div className="no-print flex flex-col gap-2 rounded-md border border-ink-200 bg-white p-4">
        <label htmlFor="samples-text" className="text-sm font-medium">
          Your water samples (δ18O and δ2H in ‰ VSMOW)
        </label>
        <p id="samples-hint" className="text-xs text-ink-600">
          One sample per line: <code>δ18O, δ2H</code> or <code>label, δ18O, δ2H</code>, or a CSV whose header names <code>d18O</code> and <code>d2H</code>{" "}
          (and optionally <code>id</code>). Computed in your browser; nothing is uploaded or stored.
        </p>
        <textarea
          id="samples-text"
          aria-describedby="samples-hint"
          rows={6}
          value={text}
          onChange={(e) => setText(e.target.value)}
          className="rounded border border-ink-300 px-3 py-2 font-mono text-sm"
          placeholder={"spring-1, -9.8, -70.1\nspring-2, -8.9, -66.0"}
          data-testid="samples-input"
        />
        <div className="flex flex-wrap items-center gap-3">
          <Button type="button" onClick={place} data-testid="place-samples">
            Place samples against the line
          </Button>
          <label className="text-sm">
            or read a CSV file:{" "}
            <input type="file" accept=".csv,.txt,text/csv,text/plain" onChange={(e) => void load(e.target.files?.[0])} className="text-sm" />
          </label>
        </div>
        {error ? (
          <p role="alert" className="text-sm text-severity-fail" data-testid="samples-error">
            {error}
          </p>
        ) : null}
      </div>

      {result ? (
        <section aria-labelledby="samples-heading" className="flex flex-col gap-3" data-testid="samples-result">
          <h3 id="samples-heading" className="font-semibold">
            Your samples against the predicted line
          </h3>
          <p className="text-sm text-ink-700">
            {result.samples.length} sample{result.samples.length === 1 ? "" : "s"}: {result.samples.length - result.below - result.above} within the line&apos;s 95% band,{" "}
            {result.below} below it, {result.above} above it. The band combines the line&apos;s own uncertainty with a typical analytical δ2H uncertainty of 2 ‰.
          </p>
          <div className="overflow-x-auto">
            <table className="w-full border-collapse text-sm">
              <thead>
                <tr className="border-b border-ink-300 text-left">
                  <th className="px-2 py-1">Sample</th>
                  <th className="px-2 py-1 text-right">δ18O ‰</th>
                  <th className="px-2 py-1 text-right">δ2H ‰</th>
                  <th className="px-2 py-1 text-right">d-excess ‰</th>
                  <th className="px-2 py-1 text-right">lc-excess ‰</th>
                  <th className="px-2 py-1 text-right">band ± ‰</th>
                  <th className="px-2 py-1">Position</th>
                </tr>
              </thead>
              <tbody>
                {result.samples.map((s) => (
                  <tr key={`${s.line}-${s.label}`} className="border-b border-ink-100" data-testid="sample-row">
                    <td className="px-2 py-1">{s.label}</td>
                    <td className="px-2 py-1 text-right tabular-nums">{num(s.d18O)}</td>
                    <td className="px-2 py-1 text-right tabular-nums">{num(s.d2H, 1)}</td>
                    <td className="px-2 py-1 text-right tabular-nums">{num(s.dExcess, 1)}</td>
                    <td className="px-2 py-1 text-right tabular-nums">{num(s.lcExcess, 1)}</td>
                    <td className="px-2 py-1 text-right tabular-nums">{num(s.band95, 1)}</td>
                    <td className="px-2 py-1">{s.position}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <p className="text-xs text-ink-600">
            d-excess = δ2H − 8·δ18O (Dansgaard 1964); lc-excess = δ2H − a·δ18O − b against the predicted local line (Landwehr &amp; Coplen 2006). Negative
            lc-excess beyond the band suggests evaporation after the water fell, or another source.
          </p>
          {ev?.kind === "fitted" ? (
            <div className="rounded border border-ink-200 bg-white p-3 text-sm" data-testid="source-water-estimate">
              <p className="font-semibold">Evaporation line and source water</p>
              <p>
                The samples fall along δ2H = {num(ev.line.slope, 2)}·δ18O {ev.line.intercept < 0 ? "−" : "+"} {num(Math.abs(ev.line.intercept), 1)} ‰ (least squares, r²{" "}
                {num(ev.line.r2, 2)}). Followed back to the predicted local line, the source water is about <strong>δ18O {num(ev.sourceWater.d18O)} ‰</strong> (95%:{" "}
                {num(ev.sourceWater.interval95.d18O[0])} to {num(ev.sourceWater.interval95.d18O[1])}) and <strong>δ2H {num(ev.sourceWater.d2H, 1)} ‰</strong> (95%:{" "}
                {num(ev.sourceWater.interval95.d2H[0], 1)} to {num(ev.sourceWater.interval95.d2H[1], 1)}), by {ev.sourceWater.uncertaintyMethod} of both lines&apos; uncertainties.
              </p>
              {ev.sourceWater.warnings.length ? (
                <ul className="mt-1 list-disc pl-5 text-ink-700">
                  {ev.sourceWater.warnings.map((w) => (
                    <li key={w}>{w}</li>
                  ))}
                </ul>
              ) : null}
              <p className="mt-1 text-ink-700">
                The intersection assumes all samples come from one water that evaporated from a single source, and that the source was local precipitation. Confirm with
                a hydrogeologist before drawing conclusions.
              </p>
            </div>
          ) : ev ? (
            <p className="text-sm text-ink-700" data-testid="no-evaporation-fit">
              No evaporation line: {ev.reason}
            </p>
          ) : null}
        </section>
      ) : null}
    </div>
  );
}
