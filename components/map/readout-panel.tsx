"use client";

import Link from "next/link";
import { Cautions } from "@/components/cautions";
import type { MapReadout, ReadoutValue as MapReadoutValue } from "@/lib/map/data";
import { decimalsFor, num, unitsText } from "./format";

/** The readout route's answer (GET /api/map/readout); type-only imports, nothing server-side reaches the client. */
export type ReadoutValue = MapReadoutValue;
export type ReadoutData = MapReadout;

const ROWS = [
  { key: "d18O", label: "δ18O" },
  { key: "d2H", label: "δ2H" },
  { key: "dExcess", label: "d-excess" },
  { key: "precipMm", label: "Precipitation" },
] as const;

function Interval({ v, variable }: { v: ReadoutValue; variable: string }) {
  const d = decimalsFor(variable);
  return (
    <>
      <span className="font-semibold tabular-nums">{num(v.value, d)}</span> ± {num(1.959964 * v.sd, d)} {unitsText(v.units)}
      <span className="block text-xs text-ink-600 tabular-nums">
        95% interval {num(v.lower, d)} to {num(v.upper, d)}
      </span>
    </>
  );
}

/** The side panel for a clicked point. Rendered inside an aria-live region by the explorer. */
export function ReadoutPanel({ readout, variable, error, loading }: { readout: ReadoutData | null; variable: string; error: string | null; loading: boolean }) {
  if (loading) return <p className="text-sm text-ink-700">Reading the surfaces at this point…</p>;
  if (error) return <p className="text-sm text-severity-fail">{error}</p>;
  if (!readout)
    return (
      <p className="text-sm text-ink-700">
        Click anywhere on the map (or enter a latitude and longitude below) to read the predicted values there, with their 95% intervals.
      </p>
    );
  const chosen = (readout.values as Record<string, ReadoutValue | null>)[variable] ?? null;
  const lat = readout.lat.toFixed(3);
  const lon = readout.lon.toFixed(3);
  return (
    <div className="flex flex-col gap-3 text-sm" data-testid="readout">
      <p className="text-ink-700">
        <span className="font-semibold text-ink-900">
          {num(readout.lat, 3)}°, {num(readout.lon, 3)}°
        </span>{" "}
        · {readout.periodLabel} · edition {readout.edition}
        {readout.cell ? (
          <span className="block text-xs text-ink-600">
            grid cell centred on {num(readout.cell.lat, 3)}°, {num(readout.cell.lon, 3)}°
          </span>
        ) : null}
      </p>
      {!readout.cell ? (
        <p className="text-ink-800">No surface value here: the point is at sea or outside the grid of this edition.</p>
      ) : (
        <>
          {chosen ? (
            <p className="text-base text-ink-900" data-testid="readout-chosen">
              <span className="sr-only">Predicted </span>
              {ROWS.find((r) => r.key === variable)?.label}: <Interval v={chosen} variable={variable} />
            </p>
          ) : null}
          <table className="w-full text-left">
            <caption className="sr-only">Predicted values at this point</caption>
            <thead className="text-xs text-ink-600">
              <tr>
                <th scope="col" className="font-medium">
                  Variable
                </th>
                <th scope="col" className="font-medium">
                  Predicted ± 95% interval
                </th>
              </tr>
            </thead>
            <tbody>
              {ROWS.map((r) => {
                const v = readout.values[r.key];
                return (
                  <tr key={r.key} className="border-t border-ink-100 align-top">
                    <th scope="row" className="py-1 pr-2 font-medium">
                      {r.label}
                    </th>
                    <td className="py-1">{v ? <Interval v={v} variable={r.key} /> : <span className="text-ink-500">no surface</span>}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          {readout.extrapolation ? (
            <p role="note" className="rounded border border-severity-warn/50 bg-amber-50 p-2 text-ink-800" data-testid="readout-extrapolation">
              <strong>Extrapolation.</strong> This point is farther than {readout.extrapolationDistanceKm ?? "the stated distance"} km from the nearest station
              used: the value leans on the trend, and the interval may understate how wrong it can be.
            </p>
          ) : null}
          {readout.seaLevelEquivalent ? (
            <p className="text-ink-700">
              <strong>Sea-level-equivalent.</strong> The map&apos;s surfaces leave out the effect of the ground&apos;s elevation. A site lookup applies the fitted
              elevation gradient at your site&apos;s elevation.
            </p>
          ) : null}
          {readout.notes
            .filter((n) => !(readout.seaLevelEquivalent && /^sea-level-equivalent/i.test(n)))
            .map((n) => (
            <p key={n} className="text-xs text-ink-600">
              {n}
            </p>
          ))}
        </>
      )}
      <Link href={`/lookup?lat=${lat}&lon=${lon}`} className="self-start rounded bg-tarn-700 px-3 py-1.5 font-medium text-white hover:bg-tarn-800">
        Site lookup at {lat}, {lon}
      </Link>
      <Cautions variant="compact" only={["estimates", "provenance"]} />
    </div>
  );
}
