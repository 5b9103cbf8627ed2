// Quota units per day as stacked bars, one colour per key, drawn as plain SVG
// on the server (no script). A table with the same numbers follows it for
// screen readers and exact values.

export type UsageChartSeries = { id: string; label: string; values: number[] };

// A colour-blind-safe sequence sampled from a perceptually uniform dark-blue → green → yellow ramp;
// the "no key" series is neutral grey.
const COLOURS = ["#3b2f7f", "#2c728e", "#28ae80", "#addc30", "#472d7b", "#21918c", "#5ec962", "#fde725"];
const NO_KEY = "#9aa3ad";

const W = 720;
const H = 240;
const PAD = { left: 48, right: 12, top: 12, bottom: 36 };

function niceMax(x: number): number {
  if (x <= 5) return 5;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * p >= x) return m * p;
  return 10 * p;
}

export function seriesColour(id: string, index: number): string {
  return id === "no-key" ? NO_KEY : COLOURS[index % COLOURS.length];
}

export function UsageChart({ days, series, dailyLimit, title }: { days: string[]; series: UsageChartSeries[]; dailyLimit: number; title: string }) {
  const totals = days.map((_, i) => series.reduce((s, x) => s + x.values[i], 0));
  const yMax = niceMax(Math.max(1, ...totals));
  const plotW = W - PAD.left - PAD.right;
  const plotH = H - PAD.top - PAD.bottom;
  const slot = plotW / days.length;
  const barW = Math.max(2, slot * 0.7);
  const y = (v: number) => PAD.top + plotH - (v / yMax) * plotH;
  const ticks = [0, 0.25, 0.5, 0.75, 1].map((f) => f * yMax);
  return (
    <figure className="flex flex-col gap-2">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title} className="w-full max-w-3xl" data-testid="usage-chart">
        {ticks.map((t) => (
          <g key={t}>
            <line x1={PAD.left} x2={W - PAD.right} y1={y(t)} y2={y(t)} stroke="#e3e7eb" />
            <text x={PAD.left - 6} y={y(t) + 4} textAnchor="end" fontSize="11" fill="#56606b">
              {Number.isInteger(t) ? t.toLocaleString("en-GB") : t.toFixed(1)}
            </text>
          </g>
        ))}
        {dailyLimit > 0 && dailyLimit <= yMax ? (
          <g>
            <line x1={PAD.left} x2={W - PAD.right} y1={y(dailyLimit)} y2={y(dailyLimit)} stroke="#b3261e" strokeDasharray="4 3" />
            <text x={W - PAD.right} y={y(dailyLimit) - 4} textAnchor="end" fontSize="11" fill="#b3261e">
              daily quota
            </text>
          </g>
        ) : null}
        {days.map((d, i) => {
          let base = 0;
          const x = PAD.left + i * slot + (slot - barW) / 2;
          return (
            <g key={d}>
              {series.map((s, k) => {
                const v = s.values[i];
                if (!v) return null;
                const top = y(base + v);
                const h = y(base) - top;
                base += v;
                return (
                  <rect key={s.id} x={x} y={top} width={barW} height={Math.max(0.5, h)} fill={seriesColour(s.id, k)}>
                    <title>{`${d}: ${s.label} ${v.toLocaleString("en-GB")}`}</title>
                  </rect>
                );
              })}
              {i % Math.ceil(days.length / 8) === 0 || i === days.length - 1 ? (
                <text x={x + barW / 2} y={H - PAD.bottom + 16} textAnchor="middle" fontSize="11" fill="#56606b">
                  {d.slice(5)}
                </text>
              ) : null}
            </g>
          );
        })}
        <line x1={PAD.left} x2={W - PAD.right} y1={y(0)} y2={y(0)} stroke="#56606b" />
      </svg>
      <figcaption className="flex flex-wrap gap-x-4 gap-y-1 text-sm text-ink-700">
        {series.map((s, k) => (
          <span key={s.id} className="inline-flex items-center gap-1">
            <span aria-hidden="true" className="inline-block h-3 w-3 rounded-sm" style={{ background: seriesColour(s.id, k) }} />
            {s.label}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}
