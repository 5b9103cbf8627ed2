// Runs lib/qc's intake checks on the pending demo samples while seeding, with the
// context the intake would give them: the station, its accepted history and water line,
// the other samples of the batch, the laboratory's precision, and as "today" the day the
// batch was submitted (so results are reproducible).

import { fitWaterLine, lcExcess, MIN_LINE_SAMPLES, type WaterLineFit } from "../../lib/isotopes";
import { qcSampleOf, runChecks, worstSeverity, type QcContext, type QcSample } from "../../lib/qc";
import type { DemoSample, DemoScenario } from "../../lib/demo";
import type { SeedCheckSample } from "./demo-data";

/** Method of the station water line used for line-offset and lc-excess: ordinary least squares [trade]. */
export const DEMO_LINE_METHOD = "ols" as const;

const toQc = (s: DemoSample): QcSample => qcSampleOf(s, s.stationCode, s.key);

/**
 * A checker for seedDemoData: lib/qc's runChecks with the intake's context, and lc-excess
 * (Landwehr & Coplen 2006) against the station's own line when it has enough history.
 * Caches per station and batch, so make one per seeding run.
 */
export function makeDemoCheckSample(): SeedCheckSample {
  const lines = new Map<string, WaterLineFit | null>();
  const batchSamples = new Map<string, DemoSample[]>();
  let indexed: DemoScenario | null = null;

  return (sample, { station, history, scenario }) => {
    if (indexed !== scenario) {
      indexed = scenario;
      batchSamples.clear();
      lines.clear();
      for (const s of scenario.samples) {
        if (!batchSamples.has(s.batchKey)) batchSamples.set(s.batchKey, []);
        batchSamples.get(s.batchKey)!.push(s);
      }
    }
    let line = lines.get(station.code);
    if (line === undefined) {
      line = history.length >= MIN_LINE_SAMPLES ? fitWaterLine(history, DEMO_LINE_METHOD) : null;
      lines.set(station.code, line);
    }
    const batch = scenario.batches.find((b) => b.key === sample.batchKey);
    const lab = scenario.laboratories.find((l) => l.name === sample.laboratory);
    const context: QcContext = {
      today: batch?.submittedOn ?? scenario.meta.lastAcceptedMonth + "-28",
      station: { lat: station.lat, lon: station.lon, elevationM: station.elevationM, samplingInterval: station.samplingInterval },
      history: history.map((h) => ({ startDate: h.startDate, endDate: h.endDate, d18O: h.d18O, d2H: h.d2H, amountMm: h.amountMm })),
      stationLine: line ? { slope: line.slope, intercept: line.intercept, residualSD: line.residualSD, n: line.n } : null,
      otherBatchSamples: (batchSamples.get(sample.batchKey) ?? []).filter((s) => s.key !== sample.key).map(toQc),
      storedPeriods: history.map((h) => ({ startDate: h.startDate, endDate: h.endDate, ref: `accepted ${h.startDate.slice(0, 7)}` })),
      labPrecision: lab ? { d18O: lab.d18OSdPermil[1], d2H: lab.d2HSdPermil[1] } : null,
    };
    const checks = runChecks(toQc(sample), context);
    return {
      checks,
      worstSeverity: worstSeverity(checks),
      lcExcess: line ? Math.round(lcExcess(sample.d18O, sample.d2H, line) * 1e6) / 1e6 : null,
    };
  };
}
