"use client";

import type { MapLegend as MapLegendAnswer } from "@/lib/map/data";
import { num } from "./format";

/** The legend route's answer (GET /api/map/legend); a type-only import, nothing server-side reaches the client. */
export type LegendData = MapLegendAnswer;

/** The always-visible legend: ramp bar with ticks and units, the extrapolation swatch, the sea-level note. */
export function MapLegend({ legend, loading }: { legend: LegendData | null; loading: boolean }) {
  if (!legend)
    return (
      <div role="group" aria-label="Legend" data-testid="map-legend" className="rounded border border-ink-200 bg-white/95 p-3 text-sm text-ink-700 shadow-sm">
        {loading ? "Loading the legend…" : "No legend: this layer has no surface in the chosen edition and period."}
      </div>
    );
  const span = legend.max - legend.min;
  const decimals = legend.ticks.some((t) => !Number.isInteger(t)) ? 1 : 0;
  const units = legend.units === "‰" ? "‰" : "mm";
  const hatch = `repeating-linear-gradient(135deg, ${legend.extrapolation.ink} 0 1px, transparent 1px ${legend.extrapolation.spacing}px), rgba(255,255,255,${legend.extrapolation.veil})`;
  return (
    <div role="group" aria-label="Legend" data-testid="map-legend" className="w-72 rounded border border-ink-200 bg-white/95 p-3 text-xs text-ink-800 shadow-sm">
      <p className="text-sm font-semibold text-ink-900">
        {legend.title}, {units}
        {legend.units === "‰" ? <span className="font-normal text-ink-600"> (VSMOW)</span> : null}
        <span className="font-normal text-ink-600"> · {legend.periodLabel}</span>
      </p>
      <div className="px-3">
      <div
        aria-hidden="true"
        className="mt-2 h-3 w-full rounded-sm border border-ink-300"
        style={{ background: `linear-gradient(to right, ${legend.stops.join(", ")})` }}
      />
      <div className="relative mt-1 h-4" aria-hidden="true">
        {legend.ticks.map((t) => (
          <span key={t} className="absolute -translate-x-1/2 tabular-nums" style={{ left: `${((t - legend.min) / span) * 100}%` }}>
            {num(t, decimals)}
          </span>
        ))}
      </div>
      </div>
      <p className="sr-only">
        Colour scale {legend.ramp.name} from {num(legend.min, decimals)} to {num(legend.max, decimals)} {units}
        {legend.centre !== null ? `, centred on ${num(legend.centre, decimals)} ${units}` : ""}; values beyond are drawn in the end colours.
      </p>
      <p className="mt-1 text-ink-600">
        Ramp: {legend.ramp.name}
        {legend.centre !== null ? ` — light at +${legend.centre} ${units}` : ""}
        {legend.kind === "sd" ? " — darker is less certain" : ""}
      </p>
      <p className="mt-2 flex items-center gap-2">
        <span aria-hidden="true" className="inline-block h-3 w-6 rounded-sm border border-ink-300 bg-ink-200" style={{ background: hatch }} />
        <span>
          Extrapolation{legend.extrapolation.distanceKm !== null ? `: farther than ${legend.extrapolation.distanceKm} km from the nearest station` : ""}
        </span>
      </p>
      {legend.seaLevelEquivalent ? <p className="mt-1 text-ink-600">Sea-level-equivalent: no elevation effect on the grid.</p> : null}
    </div>
  );
}
