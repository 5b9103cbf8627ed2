// Leave-one-out cross-validation: each station's observed mean against its prediction from the
// other stations, with the 1:1 line, as plain server-rendered SVG.
import type { SurfaceCrossValidation } from "@/lib/editions/types";

const S = 320;
const PAD = { left: 56, right: 12, top: 12, bottom: 44 };

export function CrossValidationChart({ cv, units, title }: { cv: SurfaceCrossValidation; units: string; title: string }) {
  const all = cv.points.flatMap((p) => [p.observed, p.predicted]);
  let lo = Math.min(...all);
  let hi = Math.max(...all);
  const pad = (hi - lo) * 0.05 || 1;
  lo -= pad;
  hi += pad;
  const pw = S - PAD.left - PAD.right;
  const ph = S - PAD.top - PAD.bottom;
  const x = (v: number) => PAD.left + ((v - lo) / (hi - lo)) * pw;
  const y = (v: number) => PAD.top + ph - ((v - lo) / (hi - lo)) * ph;
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((t) => lo + t * (hi - lo));
  return (
    <figure className="flex flex-col gap-1">
      <svg viewBox={`0 0 ${S} ${S}`} role="img" aria-label={title} className="w-full max-w-sm" data-testid="cv-chart">
        {ticks.map((t) => (
          <g key={t}>
            <line x1={PAD.left} x2={S - PAD.right} y1={y(t)} y2={y(t)} stroke="#e3e7eb" />
            <line x1={x(t)} x2={x(t)} y1={PAD.top} y2={PAD.top + ph} stroke="#e3e7eb" />
            <text x={PAD.left - 6} y={y(t) + 4} textAnchor="end" fontSize="10" fill="#56606b">
              {t.toPrecision(3)}
            </text>
            <text x={x(t)} y={S - PAD.bottom + 14} textAnchor="middle" fontSize="10" fill="#56606b">
              {t.toPrecision(3)}
            </text>
          </g>
        ))}
        <line x1={x(lo)} y1={y(lo)} x2={x(hi)} y2={y(hi)} stroke="#b3261e" strokeDasharray="4 3" />
        {cv.points.map((p) => (
          <circle key={p.stationCode} cx={x(p.observed)} cy={y(p.predicted)} r={3} fill="#18555c" fillOpacity={0.7}>
            <title>{`${p.stationCode}: observed ${p.observed.toFixed(2)}, predicted ${p.predicted.toFixed(2)} ${units}`}</title>
          </circle>
        ))}
        <text x={PAD.left + pw / 2} y={S - 6} textAnchor="middle" fontSize="12" fill="#354052">
          observed ({units})
        </text>
        <text x={14} y={PAD.top + ph / 2} textAnchor="middle" fontSize="12" fill="#354052" transform={`rotate(-90 14 ${PAD.top + ph / 2})`}>
          predicted without the station ({units})
        </text>
      </svg>
      <figcaption className="text-xs text-ink-700">Dashed line: predicted = observed. Each dot is one station left out and predicted from the others.</figcaption>
    </figure>
  );
}
