"use client";

import { useQuery } from "@tanstack/react-query";
import { useState } from "react";
import { CHART_COLOURS, IsotopeChart } from "../charts/isotope-chart";
import { Alert } from "../ui/alert";
import { getJson, QueryProvider } from "./query-provider";

// A public station's δ2H–δ18O chart with its water line by the method the visitor picks.

const METHODS = [
  ["ols", "Least squares"],
  ["rma", "Reduced major axis"],
  ["pwlsr", "Amount-weighted least squares"],
  ["pwrma", "Amount-weighted reduced major axis"],
] as const;

type Data = {
  points: { d18O: number; d2H: number; amountMm: number | null; startDate: string }[];
  line: { slope: number; intercept: number; slopeSE: number; interceptSE: number; r2: number; n: number; residualSD: number } | null;
  lineNote: string | null;
  methodInfo: { title: string; source: string };
  gmwl: { slope: number; intercept: number };
};

export function StationWaterLine({ code }: { code: string }) {
  return (
    <QueryProvider>
      <Inner code={code} />
    </QueryProvider>
  );
}

function Inner({ code }: { code: string }) {
  const [method, setMethod] = useState<string>("ols");
  const q = useQuery({ queryKey: ["water-line", code, method], queryFn: () => getJson<Data>(`/api/stations/${encodeURIComponent(code)}/water-line?method=${method}`) });
  return (
    <div className="flex flex-col gap-3">
      <label className="flex max-w-xs flex-col text-sm">
        Fit the station&apos;s line by
        <select className="rounded border border-ink-300 px-2 py-1" value={method} onChange={(e) => setMethod(e.target.value)} data-testid="line-method">
          {METHODS.map(([k, v]) => <option key={k} value={k}>{v}</option>)}
        </select>
      </label>
      {q.error ? <Alert tone="error">{q.error.message}</Alert> : null}
      {q.data ? (
        <>
          <IsotopeChart
            title={`δ2H against δ18O of the accepted samples of ${code}`}
            groups={[{ id: "acc", label: "Accepted samples", points: q.data.points.map((p) => ({ x: p.d18O, y: p.d2H, label: p.startDate })), colour: CHART_COLOURS.batch, shape: "circle" }]}
            lines={[
              { id: "gmwl", label: "Global meteoric water line δ2H = 8·δ18O + 10 (Craig 1961)", slope: q.data.gmwl.slope, intercept: q.data.gmwl.intercept, colour: CHART_COLOURS.gmwl, dash: "5 4" },
              ...(q.data.line ? [{ id: "st", label: "This station's line", slope: q.data.line.slope, intercept: q.data.line.intercept, colour: CHART_COLOURS.station }] : []),
            ]}
          />
          {q.data.line ? (
            <p className="text-sm" data-testid="line-fit">
              {q.data.methodInfo.title}: δ2H = {q.data.line.slope.toFixed(2)} (± {q.data.line.slopeSE.toFixed(2)}) · δ18O + {q.data.line.intercept.toFixed(2)} (± {q.data.line.interceptSE.toFixed(2)}) ‰, r² = {q.data.line.r2.toFixed(3)}, n = {q.data.line.n}, residual SD {q.data.line.residualSD.toFixed(2)} ‰. Source: {q.data.methodInfo.source}.
            </p>
          ) : (
            <p className="text-sm text-ink-700">{q.data.lineNote}</p>
          )}
        </>
      ) : null}
    </div>
  );
}
