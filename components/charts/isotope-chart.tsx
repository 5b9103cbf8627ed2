// δ2H–δ18O chart as plain SVG (no script needed): point groups and straight lines.
// Colours from a colour-blind-safe, perceptually ordered set; shapes differ too.

export type ChartPoint = { x: number; y: number; label?: string };
export type ChartGroup = { id: string; label: string; points: ChartPoint[]; colour: string; shape: "circle" | "square" | "diamond"; size?: number };
export type ChartLine = { id: string; label: string; slope: number; intercept: number; colour: string; dash?: string };

const W = 560;
const H = 400;
const PAD = { left: 56, right: 16, top: 16, bottom: 44 };

function ticks(min: number, max: number, n = 6): number[] {
  const span = max - min || 1;
  const step0 = span / n;
  const p = 10 ** Math.floor(Math.log10(step0));
  const step = [1, 2, 2.5, 5, 10].map((m) => m * p).find((s) => s >= step0) ?? 10 * p;
  const out = [];
  for (let v = Math.ceil(min / step) * step; v <= max + 1e-9; v += step) out.push(Math.round(v * 1e6) / 1e6);
  return out;
}

export function IsotopeChart({ groups, lines, title }: { groups: ChartGroup[]; lines: ChartLine[]; title: string }) {
  const all = groups.flatMap((g) => g.points);
  const xs = all.map((p) => p.x);
  const ys = all.map((p) => p.y);
  let xMin = Math.min(...xs, -2);
  let xMax = Math.max(...xs, 0);
  const padX = (xMax - xMin) * 0.08 || 1;
  xMin -= padX;
  xMax += padX;
  let yMin = Math.min(...ys, 8 * xMin + 10);
  let yMax = Math.max(...ys, 8 * xMax + 10);
  const padY = (yMax - yMin) * 0.05 || 5;
  yMin -= padY;
  yMax += padY;
  const pw = W - PAD.left - PAD.right;
  const ph = H - PAD.top - PAD.bottom;
  const sx = (x: number) => PAD.left + ((x - xMin) / (xMax - xMin)) * pw;
  const sy = (y: number) => PAD.top + (1 - (y - yMin) / (yMax - yMin)) * ph;
  return (
    <figure className="flex flex-col gap-2">
      <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-label={title} className="w-full max-w-2xl rounded border border-ink-200 bg-white" data-testid="isotope-chart">
        <title>{title}</title>
        <defs>
          <clipPath id="plot-area">
            <rect x={PAD.left} y={PAD.top} width={pw} height={ph} />
          </clipPath>
        </defs>
        {ticks(xMin, xMax).map((t) => (
          <g key={`x${t}`}>
            <line x1={sx(t)} x2={sx(t)} y1={PAD.top} y2={PAD.top + ph} stroke="#e3e8ee" />
            <text x={sx(t)} y={H - PAD.bottom + 16} fontSize="11" textAnchor="middle" fill="#56677d">{t}</text>
          </g>
        ))}
        {ticks(yMin, yMax).map((t) => (
          <g key={`y${t}`}>
            <line x1={PAD.left} x2={PAD.left + pw} y1={sy(t)} y2={sy(t)} stroke="#e3e8ee" />
            <text x={PAD.left - 6} y={sy(t) + 4} fontSize="11" textAnchor="end" fill="#56677d">{t}</text>
          </g>
        ))}
        <text x={PAD.left + pw / 2} y={H - 6} fontSize="12" textAnchor="middle" fill="#151b25">δ18O (‰ VSMOW)</text>
        <text x={14} y={PAD.top + ph / 2} fontSize="12" textAnchor="middle" fill="#151b25" transform={`rotate(-90 14 ${PAD.top + ph / 2})`}>δ2H (‰ VSMOW)</text>
        <g clipPath="url(#plot-area)">
          {lines.map((l) => (
            <line key={l.id} x1={sx(xMin)} y1={sy(l.slope * xMin + l.intercept)} x2={sx(xMax)} y2={sy(l.slope * xMax + l.intercept)} stroke={l.colour} strokeWidth={1.5} strokeDasharray={l.dash} />
          ))}
          {groups.map((g) =>
            g.points.map((p, i) => {
              const r = g.size ?? 3;
              const cx = sx(p.x);
              const cy = sy(p.y);
              const t = p.label ? <title>{p.label}</title> : null;
              if (g.shape === "square") return <rect key={`${g.id}${i}`} x={cx - r} y={cy - r} width={2 * r} height={2 * r} fill={g.colour} stroke="#151b25" strokeWidth={0.5}>{t}</rect>;
              if (g.shape === "diamond") return <path key={`${g.id}${i}`} d={`M${cx} ${cy - r * 1.4}L${cx + r * 1.4} ${cy}L${cx} ${cy + r * 1.4}L${cx - r * 1.4} ${cy}Z`} fill={g.colour} stroke="#151b25" strokeWidth={0.5}>{t}</path>;
              return <circle key={`${g.id}${i}`} cx={cx} cy={cy} r={r} fill={g.colour} fillOpacity={0.6}>{t}</circle>;
            }),
          )}
        </g>
      </svg>
      <figcaption className="flex flex-wrap gap-4 text-xs text-ink-700">
        {groups.map((g) => (
          <span key={g.id} className="inline-flex items-center gap-1">
            <svg width="12" height="12" aria-hidden="true"><rect x="2" y="2" width="8" height="8" fill={g.colour} /></svg>
            {g.label} ({g.points.length})
          </span>
        ))}
        {lines.map((l) => (
          <span key={l.id} className="inline-flex items-center gap-1">
            <svg width="20" height="12" aria-hidden="true"><line x1="0" y1="6" x2="20" y2="6" stroke={l.colour} strokeWidth="2" strokeDasharray={l.dash} /></svg>
            {l.label}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}

export const CHART_COLOURS = { history: "#9aa3ad", batch: "#2c728e", flagged: "#fde725", gmwl: "#151b25", station: "#28ae80" } as const;
