import type { SitePrediction } from "@/lib/editions/prediction";
import { MONTHS, num } from "@/lib/lookup/format";

// Tables of a site lookup: values with 95% intervals per period, the predicted
// water line and the informing stations. Server or client; no state.

function Cell({ e, digits = 2 }: { e: { value: number; lower95: number; upper95: number } | null; digits?: number }) {
  if (!e) return <td className="px-2 py-1 text-right text-ink-500">—</td>;
  return (
    <td className="px-2 py-1 text-right tabular-nums" data-value={e.value}>
      <span className="font-medium text-ink-900">{num(e.value, digits)}</span>
      <span className="block text-xs text-ink-600">
        {num(e.lower95, digits)} to {num(e.upper95, digits)}
      </span>
    </td>
  );
}

export function PredictionTable({ p }: { p: SitePrediction }) {
  const rows = [{ label: "Year (annual)", v: p.annual, strong: true }, ...p.monthly.map((m) => ({ label: MONTHS[m.month - 1], v: m, strong: false }))];
  return (
    <div className="overflow-x-auto">
      <table className="w-full min-w-[36rem] border-collapse text-sm" data-testid="prediction-table">
        <caption className="pb-2 text-left text-sm text-ink-700">
          Predicted value, with the 95% interval beneath it. δ in ‰ vs VSMOW; precipitation in mm (the year&apos;s total is the sum of the months).
        </caption>
        <thead>
          <tr className="border-b border-ink-300 text-left">
            <th scope="col" className="px-2 py-1">Period</th>
            <th scope="col" className="px-2 py-1 text-right">δ18O ‰</th>
            <th scope="col" className="px-2 py-1 text-right">δ2H ‰</th>
            <th scope="col" className="px-2 py-1 text-right">d-excess ‰</th>
            <th scope="col" className="px-2 py-1 text-right">Precipitation mm</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => (
            <tr key={r.label} className={`border-b border-ink-100 ${r.strong ? "bg-ink-50" : ""}`} data-period={r.label}>
              <th scope="row" className={`px-2 py-1 text-left ${r.strong ? "font-semibold" : "font-normal"}`}>
                {r.label}
              </th>
              <Cell e={r.v.d18O} />
              <Cell e={r.v.d2H} digits={1} />
              <Cell e={r.v.dExcess} digits={1} />
              <Cell e={r.v.precipMm} digits={0} />
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function WaterLineSummary({ p }: { p: SitePrediction }) {
  const w = p.waterLine;
  if (!Number.isFinite(w.slope)) {
    return <p className="text-ink-700">No water line can be fitted here: the monthly predictions hardly vary.</p>;
  }
  return (
    <div className="flex flex-col gap-1" data-testid="water-line">
      <p className="text-lg">
        δ2H = <strong>{num(w.slope, 2)}</strong> · δ18O {w.intercept < 0 ? "−" : "+"} <strong>{num(Math.abs(w.intercept), 1)}</strong> ‰
      </p>
      <p className="text-sm text-ink-700">
        Slope {num(w.slope, 2)} ± {num(w.slopeSE, 2)}, intercept {num(w.intercept, 1)} ± {num(w.interceptSE, 1)} ‰ (standard errors), r² {num(w.r2, 3)}.{" "}
        {w.method === "pwlsr"
          ? "Fitted through the twelve monthly predictions, each weighted by its predicted precipitation (precipitation-weighted least squares, Hughes & Crawford 2012)."
          : "Fitted through the twelve monthly predictions by ordinary least squares (this edition has no precipitation surfaces to weight by)."}
      </p>
    </div>
  );
}

export function StationsTable({ p }: { p: SitePrediction }) {
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-sm" data-testid="informing-stations">
        <caption className="pb-2 text-left text-sm text-ink-700">
          Nearest stations used for the annual δ18O, with their kriging weights (weights can be negative when a nearer station screens a farther one).
        </caption>
        <thead>
          <tr className="border-b border-ink-300 text-left">
            <th scope="col" className="px-2 py-1">Station</th>
            <th scope="col" className="px-2 py-1">Name</th>
            <th scope="col" className="px-2 py-1 text-right">Distance km</th>
            <th scope="col" className="px-2 py-1 text-right">Weight</th>
          </tr>
        </thead>
        <tbody>
          {p.stations.map((s) => (
            <tr key={s.code} className="border-b border-ink-100">
              <td className="px-2 py-1 font-mono text-xs">{s.code}</td>
              <td className="px-2 py-1">{s.name}</td>
              <td className="px-2 py-1 text-right tabular-nums">{num(s.distanceKm, 1)}</td>
              <td className="px-2 py-1 text-right tabular-nums">{num(s.weight, 3)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
