import "server-only";
import { and, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { samples, type Severity } from "@/db/schema";
import { dExcess, fitWaterLine, lcExcess, MIN_LINE_SAMPLES, parseIsoDay, type WaterLineFit } from "@/lib/isotopes";
import { qcSampleOf, runChecks, worstSeverity, type CheckResult, type QcContext, type QcHistorySample, type QcSample, type QcStoredPeriod } from "@/lib/qc";
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
  /** storedPeriods indexed for neighbour search, filled on first use. */
  storedIndex?: { byStart: Period[]; byEnd: Period[]; maxLen: number; count: number };
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
 * batch, but each sample is shown only the other samples (and stored periods) that can change
 * its findings: same-station periods that overlap it (duplicates, overlaps), the one that ends
 * last before it (the gap note reads only that end), and samples anywhere in the batch with
 * the identical δ pair (repeated values). That keeps a 100,000-row file linear instead of
 * quadratic. tests/unit/intake/checks.test.ts
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
  const qc: QcSample[] = items.map((it) => qcSampleOf(it.sample, it.stationId, it.ref));
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

type Period = { i: number; start: number; end: number };

/** Index of the first element of `xs` (sorted by key) whose key is ≥ v. */
function lowerBound<T>(xs: readonly T[], v: number, key: (x: T) => number): number {
  let lo = 0;
  let hi = xs.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (key(xs[mid]) < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * Of a station's periods, the ones lib/qc's period checks can use for a sample [start, end):
 * every period overlapping it (duplicates, overlaps) and the one that ends last at or before
 * its start (the gap note reads only that end). `byStart` and `byEnd` are the periods sorted.
 */
function periodNeighbours(start: number, end: number, byStart: readonly Period[], byEnd: readonly Period[], maxLen: number, self = -1): number[] {
  const out: number[] = [];
  for (let k = lowerBound(byStart, start - maxLen, (p) => p.start); k < byStart.length && byStart[k].start < end; k++) {
    const p = byStart[k];
    if (p.i !== self && p.end > start) out.push(p.i);
  }
  const last = lowerBound(byEnd, start + 1, (p) => p.end) - 1;
  if (last >= 0 && byEnd[last].i !== self) out.push(byEnd[last].i);
  return out;
}

function sortedPeriods(ps: Period[]) {
  const byStart = [...ps].sort((x, y) => x.start - y.start);
  const byEnd = [...ps].sort((x, y) => x.end - y.end);
  const maxLen = ps.reduce((m, p) => Math.max(m, p.end - p.start), 0);
  return { byStart, byEnd, maxLen };
}

/**
 * The station's stored periods that can change this sample's period findings (see
 * periodNeighbours). lib/qc only notes a gap when the station has stored periods at all, so one
 * stays in the list when none is a neighbour; not overlapping and not before, it changes nothing.
 */
function storedWithinReach(ctx: StationContext, s: QcSample): QcStoredPeriod[] {
  const all = ctx.storedPeriods;
  if (all.length <= 4) return all as QcStoredPeriod[];
  const start = parseIsoDay(s.startDate ?? "");
  const end = parseIsoDay(s.endDate ?? "");
  if (start === null || end === null || end <= start) return all as QcStoredPeriod[];
  if (!ctx.storedIndex) {
    const valid: Period[] = [];
    all.forEach((p, i) => {
      const a = parseIsoDay(p.startDate);
      const b = parseIsoDay(p.endDate);
      if (a !== null && b !== null && b > a) valid.push({ i, start: a, end: b });
    });
    ctx.storedIndex = { ...sortedPeriods(valid), count: valid.length };
  }
  const ix = ctx.storedIndex;
  if (ix.count === 0) return [];
  const picked = periodNeighbours(start, end, ix.byStart, ix.byEnd, ix.maxLen);
  if (!picked.length) picked.push(ix.byStart[0].i);
  return [...new Set(picked)].sort((x, y) => x - y).map((i) => all[i]);
}

/** For each sample, the indices (ascending) of the other samples that can change its findings. */
export function relevantOthers(list: readonly QcSample[]): number[][] {
  const out: Set<number>[] = list.map(() => new Set());
  // Identical δ pairs, anywhere in the batch (repeated values).
  const byPair = new Map<string, number[]>();
  list.forEach((s, i) => {
    const k = `${s.d18O}|${s.d2H}`;
    const g = byPair.get(k);
    if (g) g.push(i);
    else byPair.set(k, [i]);
  });
  for (const g of byPair.values()) if (g.length > 1) for (const i of g) for (const j of g) if (i !== j) out[i].add(j);
  // Same station: overlapping periods and the latest one ending before (lib/qc skips unreadable periods).
  const byStation = new Map<string, { valid: Period[]; invalid: number[] }>();
  list.forEach((s, i) => {
    const start = parseIsoDay(s.startDate ?? "");
    const end = parseIsoDay(s.endDate ?? "");
    const key = String(s.stationId ?? "");
    const g = byStation.get(key) ?? { valid: [], invalid: [] };
    if (start !== null && end !== null && end > start) g.valid.push({ i, start, end });
    else g.invalid.push(i);
    byStation.set(key, g);
  });
  for (const g of byStation.values()) {
    const ix = sortedPeriods(g.valid);
    for (const p of g.valid) for (const j of periodNeighbours(p.start, p.end, ix.byStart, ix.byEnd, ix.maxLen, p.i)) out[p.i].add(j);
    // A sample whose own period is unreadable gets every valid period of its station (lib/qc decides).
    for (const i of g.invalid) for (const p of g.valid) out[i].add(p.i);
  }
  return out.map((x) => [...x].sort((a, b) => a - b));
}


const round6 = (x: number) => Math.round(x * 1e6) / 1e6;
