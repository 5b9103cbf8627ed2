// The empirical semivariogram (points, area ∝ pairs) with every fitted candidate model drawn as a
// curve (the chosen one solid and thick), as plain server-rendered SVG. A table with the same
// numbers follows on the page for screen readers and exact values.
import type { SurfaceVariogram } from "@/lib/editions/types";
import { semivariance } from "@/lib/geostats";

const W = 560;
const H = 300;
const PAD = { left: 56, right: 16, top: 12, bottom: 44 };
// colour-blind-safe picks from a perceptually uniform ramp (dark blue, teal, yellow-green)
const MODEL_COLOUR: Record<string, string> = { spherical: "#3b2f7f", exponential: "#21918c", gaussian: "#8fa11a" };

function nice(x: number): number {
  if (!(x > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10]) if (m * p >= x) return m * p;
  return 10 * p;
}

export function VariogramChart({ variogram, units, title }: { variogram: SurfaceVariogram; units: string; title: string }) {
  const pts = variogram.empirical;
  const xMax = nice(Math.max(variogram.cutoffKm, ...pts.map((p) => p.distanceKm)));
  const curves = variogram.fitted.map((f) => ({
    f,
    ys: Array.from({ length: 81 }, (_, i) => {
      const h = (xMax * i) / 80;
      return [h, h === 0 ? 0 : semivariance({ model: f.model, nugget: f.nugget, psill: f.psill, range: f.rangeKm }, h)] as const;
    }),
  }));
  const yMax = nice(Math.max(...pts.map((p) => p.gamma), ...curves.flatMap((c) => c.ys.map((y) => y[1]))) * 1.05);
  const pw = W - PAD.left - PAD.right;
  const ph = H - PAD.top - PAD.bottom;
  const x = (v: number) => PAD.left + (v / xMax) * pw;
  const y = (v: number) => PAD.top + ph - (v / yMax) * ph;
  const maxPairs = Math.max(1, ...pts.map((p) => p.pairs));
  const ticks = [0, 0.25, 0.5, 0.75, 1];
  return (
    <figure className="flex flex-col gap-1">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title} className="w-full max-w-xl" data-testid="variogram-chart">
        {ticks.map((t) => (
          <g key={`y${t}`}>
            <line x1={PAD.left} x2={W - PAD.right} y1={y(t * yMax)} y2={y(t * yMax)} stroke="#e3e7eb" />
            <text x={PAD.left - 6} y={y(t * yMax) + 4} textAnchor="end" fontSize="11" fill="#56606b">
              {(t * yMax).toPrecision(3)}
            </text>
            <text x={x(t * xMax)} y={H - PAD.bottom + 16} textAnchor="middle" fontSize="11" fill="#56606b">
              {Math.round(t * xMax).toLocaleString("en-GB")}
            </text>
          </g>
        ))}
        <text x={PAD.left + pw / 2} y={H - 6} textAnchor="middle" fontSize="12" fill="#354052">
          distance (km)
        </text>
        <text x={14} y={PAD.top + ph / 2} textAnchor="middle" fontSize="12" fill="#354052" transform={`rotate(-90 14 ${PAD.top + ph / 2})`}>
          semivariance ({units})
        </text>
        {curves.map(({ f, ys }) => (
          <polyline
            key={f.model}
            fill="none"
            stroke={MODEL_COLOUR[f.model]}
            strokeWidth={f.model === variogram.chosen ? 3 : 1.5}
            strokeDasharray={f.model === variogram.chosen ? undefined : "5 4"}
            points={ys.map(([h, g]) => `${x(h).toFixed(1)},${y(g).toFixed(1)}`).join(" ")}
          />
        ))}
        {pts.map((p) => (
          <circle key={p.distanceKm} cx={x(p.distanceKm)} cy={y(p.gamma)} r={2.5 + 4 * Math.sqrt(p.pairs / maxPairs)} fill="#151b25" fillOpacity={0.75} />
        ))}
      </svg>
      <figcaption className="flex flex-wrap gap-4 text-xs text-ink-700">
        <span>● empirical (dot area ∝ station pairs)</span>
        {variogram.fitted.map((f) => (
          <span key={f.model}>
            <span aria-hidden="true" style={{ color: MODEL_COLOUR[f.model] }}>
              {f.model === variogram.chosen ? "━━" : "╌╌"}
            </span>{" "}
            {f.model}
            {f.model === variogram.chosen ? " (used)" : ""}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
