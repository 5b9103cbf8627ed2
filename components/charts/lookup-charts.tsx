import type { SitePrediction } from "@/lib/editions/prediction";
import { MONTHS_SHORT, num } from "@/lib/lookup/format";
import { type PlacedSample, type PredictedLine, lineSd } from "@/lib/lookup/samples";

// The site report's charts as plain SVG (print cleanly, no canvas, no client
// state): monthly series with the 95% band, and δ2H against δ18O with the
// global line, the predicted local line with its band, and the user's samples.
// Colours: blue-teal and amber from a colour-blind-safe pairing; every series
// also differs by line style or marker shape.

const W = 640;
const H = 300;
const M = { l: 56, r: 16, t: 16, b: 40 };

const LINE = "#1f6f78";
const BAND = "#1f6f78";
const GLOBAL = "#5b6472";
const SAMPLE = "#b35c00";
const EVAP = "#7a3e9d";

function ticks(lo: number, hi: number, n = 5): number[] {
  const span = hi - lo || 1;
  const step0 = span / n;
  const mag = 10 ** Math.floor(Math.log10(step0));
  const step = [1, 2, 2.5, 5, 10].map((f) => f * mag).find((s) => s >= step0) ?? step0;
  const out: number[] = [];
  for (let v = Math.ceil(lo / step) * step; v <= hi + 1e-9; v += step) out.push(Number(v.toFixed(6)));
  return out;
}

function padded(lo: number, hi: number, frac = 0.08): [number, number] {
  const d = (hi - lo || 1) * frac;
  return [lo - d, hi + d];
}

type Variable = "d18O" | "d2H" | "dExcess";
const LABEL: Record<Variable, string> = { d18O: "δ18O ‰", d2H: "δ2H ‰", dExcess: "d-excess ‰" };

export function MonthlySeriesChart({ p, variable }: { p: SitePrediction; variable: Variable }) {
  const m = p.monthly.map((x) => x[variable]);
  const [y0, y1] = padded(Math.min(...m.map((e) => e.lower95)), Math.max(...m.map((e) => e.upper95)));
  const x = (i: number) => M.l + ((i + 0.5) / 12) * (W - M.l - M.r);
  const y = (v: number) => M.t + (1 - (v - y0) / (y1 - y0)) * (H - M.t - M.b);
  const band = [...m.map((e, i) => `${x(i)},${y(e.upper95)}`), ...m.map((e, i) => `${x(i)},${y(e.lower95)}`).reverse()].join(" ");
  const path = m.map((e, i) => `${i ? "L" : "M"}${x(i)},${y(e.value)}`).join(" ");
  const annual = p.annual[variable];
  return (
    <svg viewBox={`0 0 ${W} ${H}`} role="img" aria-labelledby={`ms-${variable}-t`} className="h-auto w-full max-w-3xl" data-testid={`monthly-chart-${variable}`}>
      <title id={`ms-${variable}-t`}>{`Predicted monthly ${LABEL[variable]} with the 95% interval band; annual ${num(annual.value)} (${num(annual.lower95)} to ${num(annual.upper95)})`}</title>
      {ticks(y0, y1).map((t) => (
        <g key={t}>
          <line x1={M.l} x2={W - M.r} y1={y(t)} y2={y(t)} stroke="#e3e7ec" />
          <text x={M.l - 6} y={y(t) + 4} textAnchor="end" fontSize="11" fill="#3b4452">
            {num(t, Math.abs(t) < 10 ? 1 : 0)}
          </text>
        </g>
      ))}
      <line x1={M.l} x2={W - M.r} y1={y(annual.value)} y2={y(annual.value)} stroke={GLOBAL} strokeDasharray="2 4" />
      <text x={W - M.r} y={y(annual.value) - 4} textAnchor="end" fontSize="10" fill={GLOBAL}>
        annual
      </text>
      <polygon points={band} fill={BAND} fillOpacity="0.18" />
      <path d={path} fill="none" stroke={LINE} strokeWidth="2" />
      {m.map((e, i) => (
        <circle key={i} cx={x(i)} cy={y(e.value)} r="3" fill={LINE} />
      ))}
      {MONTHS_SHORT.map((mo, i) => (
        <text key={mo} x={x(i)} y={H - M.b + 16} textAnchor="middle" fontSize="11" fill="#3b4452">
          {mo}
        </text>
      ))}
      <text x={14} y={M.t + (H - M.t - M.b) / 2} transform={`rotate(-90 14 ${M.t + (H - M.t - M.b) / 2})`} textAnchor="middle" fontSize="12" fill="#151b25">
        {LABEL[variable]}
      </text>
    </svg>
  );
}

export function DualIsotopeChart({
  p,
  line,
  samples = [],
  evaporation,
  source,
}: {
  p: SitePrediction;
  line: PredictedLine | null;
  samples?: PlacedSample[];
  evaporation?: { slope: number; intercept: number } | null;
  source?: { d18O: number; d2H: number; interval95: { d18O: [number, number]; d2H: [number, number] } } | null;
}) {
  const xsAll = [...p.monthly.map((m) => m.d18O.value), ...samples.map((s) => s.d18O), ...(source ? [source.d18O] : [])];
  const ysAll = [...p.monthly.map((m) => m.d2H.value), ...samples.map((s) => s.d2H), ...(source ? [source.d2H] : [])];
  const [x0, x1] = padded(Math.min(...xsAll), Math.max(...xsAll), 0.15);
  const [y0, y1] = padded(Math.min(...ysAll), Math.max(...ysAll), 0.15);
  const Hh = 380;
  const x = (v: number) => M.l + ((v - x0) / (x1 - x0)) * (W - M.l - M.r);
  const y = (v: number) => M.t + (1 - (v - y0) / (y1 - y0)) * (Hh - M.t - M.b);
  const seg = (a: number, b: number) => `M${x(x0)},${y(a * x0 + b)} L${x(x1)},${y(a * x1 + b)}`;
  const N = 40;
  const xsBand = Array.from({ length: N + 1 }, (_, i) => x0 + ((x1 - x0) * i) / N);
  const band =
    line && Number.isFinite(line.slope)
      ? [
          ...xsBand.map((v) => `${x(v)},${y(line.slope * v + line.intercept + 1.959964 * lineSd(line, v))}`),
          ...xsBand.map((v) => `${x(v)},${y(line.slope * v + line.intercept - 1.959964 * lineSd(line, v))}`).reverse(),
        ].join(" ")
      : null;
  return (
    <svg viewBox={`0 0 ${W} ${Hh}`} role="img" aria-labelledby="dual-t" className="h-auto w-full max-w-3xl" data-testid="dual-isotope-chart" data-samples={samples.length}>
      <title id="dual-t">
        {`δ2H against δ18O: the global meteoric water line, the predicted local line${band ? " with its 95% band" : ""}, the twelve monthly predictions${samples.length ? ` and ${samples.length} of your samples` : ""}`}
      </title>
      <defs>
        <clipPath id="dual-clip">
          <rect x={M.l} y={M.t} width={W - M.l - M.r} height={Hh - M.t - M.b} />
        </clipPath>
      </defs>
      {ticks(y0, y1).map((t) => (
        <g key={`y${t}`}>
          <line x1={M.l} x2={W - M.r} y1={y(t)} y2={y(t)} stroke="#e3e7ec" />
          <text x={M.l - 6} y={y(t) + 4} textAnchor="end" fontSize="11" fill="#3b4452">
            {num(t, 0)}
          </text>
        </g>
      ))}
      {ticks(x0, x1).map((t) => (
        <g key={`x${t}`}>
          <line x1={x(t)} x2={x(t)} y1={M.t} y2={Hh - M.b} stroke="#eef1f4" />
          <text x={x(t)} y={Hh - M.b + 16} textAnchor="middle" fontSize="11" fill="#3b4452">
            {num(t, Math.abs(t) < 10 ? 1 : 0)}
          </text>
        </g>
      ))}
      <g clipPath="url(#dual-clip)">
        {band ? <polygon points={band} fill={BAND} fillOpacity="0.16" data-testid="line-band" /> : null}
        <path d={seg(8, 10)} stroke={GLOBAL} strokeWidth="1.5" strokeDasharray="6 4" fill="none" />
        {line && Number.isFinite(line.slope) ? <path d={seg(line.slope, line.intercept)} stroke={LINE} strokeWidth="2" fill="none" /> : null}
        {evaporation ? <path d={seg(evaporation.slope, evaporation.intercept)} stroke={EVAP} strokeWidth="1.5" strokeDasharray="2 3" fill="none" data-testid="evaporation-line" /> : null}
        {p.monthly.map((m) => (
          <circle key={m.month} cx={x(m.d18O.value)} cy={y(m.d2H.value)} r="3.5" fill={LINE}>
            <title>{`${MONTHS_SHORT[m.month - 1]}: δ18O ${num(m.d18O.value)} ‰, δ2H ${num(m.d2H.value, 1)} ‰`}</title>
          </circle>
        ))}
        {samples.map((s) => (
          <rect key={`${s.line}-${s.label}`} x={x(s.d18O) - 4} y={y(s.d2H) - 4} width="8" height="8" fill={s.position === "on the line" ? "white" : SAMPLE} stroke={SAMPLE} strokeWidth="1.5" data-testid="sample-point">
            <title>{`${s.label}: δ18O ${num(s.d18O)} ‰, δ2H ${num(s.d2H, 1)} ‰, lc-excess ${num(s.lcExcess, 1)} ‰ (${s.position})`}</title>
          </rect>
        ))}
        {source ? (
          <g data-testid="source-water">
            <line x1={x(source.interval95.d18O[0])} x2={x(source.interval95.d18O[1])} y1={y(source.d2H)} y2={y(source.d2H)} stroke={EVAP} strokeWidth="1.5" />
            <line x1={x(source.d18O)} x2={x(source.d18O)} y1={y(source.interval95.d2H[0])} y2={y(source.interval95.d2H[1])} stroke={EVAP} strokeWidth="1.5" />
            <path d={`M${x(source.d18O)},${y(source.d2H) - 6} l6,6 l-6,6 l-6,-6 z`} fill={EVAP} />
          </g>
        ) : null}
      </g>
      <text x={M.l + (W - M.l - M.r) / 2} y={Hh - 6} textAnchor="middle" fontSize="12" fill="#151b25">
        δ18O ‰ VSMOW
      </text>
      <text x={14} y={M.t + (Hh - M.t - M.b) / 2} transform={`rotate(-90 14 ${M.t + (Hh - M.t - M.b) / 2})`} textAnchor="middle" fontSize="12" fill="#151b25">
        δ2H ‰ VSMOW
      </text>
      <g fontSize="11" fill="#151b25" transform={`translate(${M.l + 8}, ${M.t + 8})`}>
        <rect x="-4" y="-10" width="250" height={samples.length ? 76 : 46} fill="white" fillOpacity="0.85" />
        <line x1="0" x2="22" y1="0" y2="0" stroke={GLOBAL} strokeDasharray="6 4" strokeWidth="1.5" />
        <text x="28" y="4">Global line δ2H = 8·δ18O + 10 (Craig 1961)</text>
        <line x1="0" x2="22" y1="16" y2="16" stroke={LINE} strokeWidth="2" />
        <text x="28" y="20">Predicted local line, 95% band; months ●</text>
        {samples.length ? (
          <>
            <rect x="7" y="28" width="8" height="8" fill={SAMPLE} />
            <text x="28" y="36">Your samples (hollow: within the band)</text>
            {evaporation ? (
              <>
                <line x1="0" x2="22" y1="48" y2="48" stroke={EVAP} strokeDasharray="2 3" strokeWidth="1.5" />
                <text x="28" y="52">Evaporation line; ◆ source-water estimate</text>
              </>
            ) : null}
          </>
        ) : null}
      </g>
    </svg>
  );
}
