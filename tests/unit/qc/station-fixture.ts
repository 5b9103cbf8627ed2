// A synthetic station for the check tests (synthetic demo data, invented): 26 months of
// seasonal monthly samples around δ2H = 7.8·δ18O + 9, and a clean new sample that should
// trip nothing. Deterministic (seeded).
import { fitWaterLine, mulberry32 } from "@/lib/isotopes";
import type { QcContext, QcHistorySample, QcSample } from "@/lib/qc";

export const TODAY = "2025-06-15";

function iso(y: number, m: number): string {
  return `${y}-${String(m).padStart(2, "0")}-01`;
}

export function makeHistory(): QcHistorySample[] {
  const rand = mulberry32(2025);
  const gauss = () => Math.sqrt(-2 * Math.log(Math.max(rand(), 1e-300))) * Math.cos(2 * Math.PI * rand());
  const out: QcHistorySample[] = [];
  for (let k = 0; k < 26; k++) {
    const y = 2023 + Math.floor(k / 12);
    const m = (k % 12) + 1;
    const next = m === 12 ? iso(y + 1, 1) : iso(y, m + 1);
    const season = Math.cos(((m - 1) / 12) * 2 * Math.PI); // winter light, summer heavy (invented)
    const d18O = -8 - 2.5 * season + 0.4 * gauss();
    const d2H = 7.8 * d18O + 9 + 1.5 * gauss();
    out.push({
      startDate: iso(y, m),
      endDate: next,
      d18O: Math.round(d18O * 100) / 100,
      d2H: Math.round(d2H * 10) / 10,
      amountMm: Math.round(40 + 30 * (1 + season) + 10 * rand()),
    });
  }
  return out;
}

export const HISTORY = makeHistory();
const line = fitWaterLine(HISTORY, "ols");

export function baseContext(overrides: Partial<QcContext> = {}): QcContext {
  return {
    today: TODAY,
    station: { lat: 47.1, lon: 8.4, elevationM: 420, samplingInterval: "monthly" },
    history: HISTORY,
    stationLine: { slope: line.slope, intercept: line.intercept, residualSD: line.residualSD, n: line.n },
    otherBatchSamples: [],
    storedPeriods: HISTORY.map((h) => ({ startDate: h.startDate, endDate: h.endDate })),
    labPrecision: { d18O: 0.1, d2H: 0.8 },
    predicted: { d18O: { value: -8.2, sd: 1.6 }, d2H: { value: -55, sd: 13 } },
    ...overrides,
  };
}

/** The March 2025 sample, right after the stored record ends (2025-03-01): clean. */
export const CLEAN: QcSample = {
  ref: "row 1",
  stationId: "st-1",
  startDate: "2025-03-01",
  endDate: "2025-04-01",
  amountMm: 62.4,
  d18O: -7.9,
  d2H: -52.3,
  d18OSd: 0.1,
  d2HSd: 0.8,
  method: "laser spectroscopy",
  laboratory: "Example Isotope Lab (invented)",
  scale: "VSMOW-SLAP",
  referenceWaters: "VSMOW2, SLAP2",
};

export function sample(overrides: Partial<QcSample>): QcSample {
  return { ...CLEAN, ...overrides };
}
