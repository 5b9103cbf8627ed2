import "server-only";
import { and, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { samples, type Severity } from "@/db/schema";
import { dExcess, fitWaterLine, lcExcess, MIN_LINE_SAMPLES, type WaterLineFit } from "@/lib/isotopes";
import { runBatchChecks, worstSeverity, type CheckResult, type QcContext, type QcHistorySample, type QcSample, type QcStoredPeriod } from "@/lib/qc";
import type { ParsedSample } from "./schemas";

// The context lib/qc needs for a station, read from the database: its accepted history,
// the periods already stored (pending or accepted), and its own water line.

/** The station's line for line-offset and lc-excess: ordinary least squares [trade], as in the demo seed. */
export const INTAKE_LINE_METHOD = "ols" as const;

export type StationForChecks = { id: string; code: string; lat: number; lon: number; elevationM: number; samplingInterval: string | null };

export type StationContext = {
  history: QcHistorySample[];
  storedPeriods: QcStoredPeriod[];
  line: WaterLineFit | null;
};

export async function loadStationContexts(stationIds: string[], opts: { excludeSampleIds?: string[] } = {}): Promise<Map<string, StationContext>> {
  const out = new Map<string, StationContext>();
  for (const id of stationIds) out.set(id, { history: [], storedPeriods: [], line: null });
  if (!stationIds.length) return out;
  const exclude = new Set(opts.excludeSampleIds ?? []);
  const rows = await getDb()
    .select({ id: samples.id, stationId: samples.stationId, status: samples.status, startDate: samples.startDate, endDate: samples.endDate, d18O: samples.d18O, d2H: samples.d2H, amountMm: samples.amountMm })
    .from(samples)
    .where(and(inArray(samples.stationId, stationIds), inArray(samples.status, ["accepted", "pending"])))
    .all();
  for (const r of rows) {
    if (exclude.has(r.id)) continue;
    const c = out.get(r.stationId)!;
    c.storedPeriods.push({ startDate: r.startDate, endDate: r.endDate, ref: `${r.status} ${r.startDate}` });
    if (r.status === "accepted") c.history.push({ startDate: r.startDate, endDate: r.endDate, d18O: r.d18O, d2H: r.d2H, amountMm: r.amountMm });
  }
  for (const c of out.values()) {
    c.history.sort((a, b) => (a.startDate < b.startDate ? -1 : 1));
    if (c.history.length >= MIN_LINE_SAMPLES) {
      try {
        c.line = fitWaterLine(c.history, INTAKE_LINE_METHOD);
      } catch {
        c.line = null;
      }
    }
  }
  return out;
}

export type CheckedSample = { checks: CheckResult[]; worst: Severity | null; dExcess: number; lcExcess: number | null };

/**
 * Run lib/qc on parsed samples, grouped by station: each sample sees the other samples of
 * the batch at the same station (duplicate periods and repeated values are checked within a
 * station, which keeps a large batch linear in the number of stations).
 */
export function checkSamples(
  items: { sample: ParsedSample; stationId: string; ref: string }[],
  stationsById: Map<string, StationForChecks>,
  contexts: Map<string, StationContext>,
  today: string,
): CheckedSample[] {
  const out: CheckedSample[] = new Array(items.length);
  const groups = new Map<string, number[]>();
  items.forEach((it, i) => {
    const g = groups.get(it.stationId);
    if (g) g.push(i);
    else groups.set(it.stationId, [i]);
  });
  for (const [stationId, idx] of groups) {
    const st = stationsById.get(stationId)!;
    const ctx = contexts.get(stationId) ?? { history: [], storedPeriods: [], line: null };
    const qcSamples: QcSample[] = idx.map((i) => toQc(items[i].sample, stationId, items[i].ref));
    const base: Omit<QcContext, "otherBatchSamples"> = {
      today,
      station: { lat: st.lat, lon: st.lon, elevationM: st.elevationM, samplingInterval: st.samplingInterval },
      history: ctx.history,
      storedPeriods: ctx.storedPeriods,
      stationLine: ctx.line ? { slope: ctx.line.slope, intercept: ctx.line.intercept, residualSD: ctx.line.residualSD, n: ctx.line.n } : null,
    };
    const results = runBatchChecks(qcSamples, base);
    idx.forEach((i, k) => {
      const s = items[i].sample;
      out[i] = {
        checks: results[k],
        worst: worstSeverity(results[k]),
        // d = δ2H − 8·δ18O, Dansgaard (1964), Tellus 16:436
        dExcess: round6(dExcess(s.d18O, s.d2H)),
        // lc-excess against the station's own line, Landwehr & Coplen (2006), IAEA-CSP-26
        lcExcess: ctx.line ? round6(lcExcess(s.d18O, s.d2H, ctx.line)) : null,
      };
    });
  }
  return out;
}

function toQc(s: ParsedSample, stationId: string, ref: string): QcSample {
  return {
    ref,
    stationId,
    startDate: s.startDate,
    endDate: s.endDate,
    amountMm: s.amountMm,
    d18O: s.d18O,
    d2H: s.d2H,
    d18OSd: s.d18OSd,
    d2HSd: s.d2HSd,
    method: s.method,
    laboratory: s.laboratory,
    scale: s.scale,
    referenceWaters: s.referenceWaters,
  };
}

const round6 = (x: number) => Math.round(x * 1e6) / 1e6;
