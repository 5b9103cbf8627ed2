import "server-only";
import { and, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { samples, type Severity } from "@/db/schema";
import { dExcess, fitWaterLine, lcExcess, MIN_LINE_SAMPLES, parseIsoDay, type WaterLineFit } from "@/lib/isotopes";
import { runChecks, worstSeverity, type CheckResult, type QcContext, type QcHistorySample, type QcSample, type QcStoredPeriod } from "@/lib/qc";
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
  /** storedPeriods as day numbers, filled on first use. */
  storedDays?: (readonly [number, number])[];
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

/** Check results of one sample; `checksJson` is what is stored, `checks` the objects (kept for previews only). */
export type CheckedSample = { checks: CheckResult[] | null; checksJson: string; worst: Severity | null; dExcess: number; lcExcess: number | null };

/**
 * Run lib/qc on parsed samples. The result equals lib/qc's runBatchChecks over the whole
 * batch, but each sample is shown only the other samples that can change its findings:
 * same-station samples whose period reaches within a year of its own (duplicates, overlaps
 * and the gap to the previous period — lib/qc reports gaps of at most 366 days) and samples
 * anywhere in the batch with the identical δ pair (repeated values). That keeps a
 * 100,000-row file near-linear instead of quadratic. tests/unit/intake/checks.test.ts
 * compares the two on a batch with duplicates, overlaps, gaps and copied values.
 */
export function checkSamples(
  items: { sample: ParsedSample; stationId: string; ref: string }[],
  stationsById: Map<string, StationForChecks>,
  contexts: Map<string, StationContext>,
  today: string,
  opts: { keepObjects?: boolean } = {},
): CheckedSample[] {
  const keep = opts.keepObjects ?? true;
  const out: CheckedSample[] = new Array(items.length);
  const qc: QcSample[] = items.map((it) => toQc(it.sample, it.stationId, it.ref));
  const relevant = relevantOthers(qc);
  const bases = new Map<string, Omit<QcContext, "otherBatchSamples">>();
  for (let i = 0; i < items.length; i++) {
    const { stationId, sample: s } = items[i];
    let base = bases.get(stationId);
    const ctx = contexts.get(stationId) ?? { history: [], storedPeriods: [], line: null };
    if (!base) {
      const st = stationsById.get(stationId)!;
      base = {
        today,
        station: { lat: st.lat, lon: st.lon, elevationM: st.elevationM, samplingInterval: st.samplingInterval },
        history: ctx.history,
        storedPeriods: ctx.storedPeriods,
        stationLine: ctx.line ? { slope: ctx.line.slope, intercept: ctx.line.intercept, residualSD: ctx.line.residualSD, n: ctx.line.n } : null,
      };
      bases.set(stationId, base);
    }
    const checks = runChecks(qc[i], { ...base, storedPeriods: storedWithinReach(ctx, qc[i]), otherBatchSamples: relevant[i].map((j) => qc[j]) });
    out[i] = {
      checks: keep ? checks : null,
      checksJson: JSON.stringify(checks),
      worst: worstSeverity(checks),
      // d = δ2H − 8·δ18O, Dansgaard (1964), Tellus 16:436
      dExcess: round6(dExcess(s.d18O, s.d2H)),
      // lc-excess against the station's own line, Landwehr & Coplen (2006), IAEA-CSP-26
      lcExcess: ctx.line ? round6(lcExcess(s.d18O, s.d2H, ctx.line)) : null,
    };
  }
  return out;
}

/** Days of reach around a period within which another period can matter (lib/qc's gap note ends at 366 days). */
const REACH_DAYS = 367;

/**
 * The station's stored periods that can change this sample's period findings (same reach as
 * above). lib/qc only notes a gap when the station has stored periods at all, so one stays in
 * the list when none is within reach; being out of reach it cannot change a finding.
 */
function storedWithinReach(ctx: StationContext, s: QcSample): QcStoredPeriod[] {
  const all = ctx.storedPeriods;
  if (all.length <= 8) return all as QcStoredPeriod[];
  const start = parseIsoDay(s.startDate ?? "");
  const end = parseIsoDay(s.endDate ?? "");
  if (start === null || end === null) return all as QcStoredPeriod[];
  const days = (ctx.storedDays ??= all.map((p) => [parseIsoDay(p.startDate) ?? Number.NaN, parseIsoDay(p.endDate) ?? Number.NaN] as const));
  const out: QcStoredPeriod[] = [];
  for (let k = 0; k < all.length; k++) {
    const [a, b] = days[k];
    if (Number.isNaN(a) || Number.isNaN(b) || (a <= end + REACH_DAYS && b >= start - REACH_DAYS)) out.push(all[k]);
  }
  return out.length ? out : [all[0]];
}

/** For each sample, the indices (ascending) of the other samples that can change its findings. */
export function relevantOthers(list: readonly QcSample[]): number[][] {
  const out: Set<number>[] = list.map(() => new Set());
  // Identical δ pairs, anywhere in the batch.
  const byPair = new Map<string, number[]>();
  list.forEach((s, i) => {
    const k = `${s.d18O}|${s.d2H}`;
    const g = byPair.get(k);
    if (g) g.push(i);
    else byPair.set(k, [i]);
  });
  for (const g of byPair.values()) if (g.length > 1) for (const i of g) for (const j of g) if (i !== j) out[i].add(j);
  // Same station, periods within reach (sorted by start; a window over start days).
  const byStation = new Map<string, { i: number; start: number; end: number }[]>();
  list.forEach((s, i) => {
    const start = parseIsoDay(s.startDate ?? "");
    const end = parseIsoDay(s.endDate ?? "");
    const key = String(s.stationId ?? "");
    const g = byStation.get(key) ?? [];
    // Unparseable dates: keep them visible to every sample of the station (lib/qc skips them itself).
    g.push({ i, start: start ?? Number.NEGATIVE_INFINITY, end: end ?? Number.POSITIVE_INFINITY });
    byStation.set(key, g);
  });
  for (const g of byStation.values()) {
    g.sort((a, b) => a.start - b.start);
    const maxLen = g.reduce((m, x) => Math.max(m, x.end - x.start), 0);
    for (let a = 0; a < g.length; a++) {
      const me = g[a];
      const lo = me.start - REACH_DAYS - maxLen;
      for (let b = a - 1; b >= 0 && !(g[b].start < lo); b--) if (g[b].end >= me.start - REACH_DAYS) out[me.i].add(g[b].i);
      for (let b = a + 1; b < g.length && g[b].start <= me.end + REACH_DAYS; b++) out[me.i].add(g[b].i);
    }
  }
  return out.map((s) => [...s].sort((x, y) => x - y));
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
