import "server-only";
import { createHash } from "node:crypto";
import { and, asc, eq, inArray, like } from "drizzle-orm";
import { getClient, getDb } from "@/db";
import { editionStationMeans, editions, reviewEvents, samples, stations, surfaceChunks, surfaces } from "@/db/schema";
import { aggregateStationMeans } from "@/lib/isotopes";
import { forgetSurfaceChunks, readSurfacePlaneData, writeSurfacePlanes, CHUNK } from "@/lib/surfaces/store";
import type { EditionSummary, SurfaceGridSpec } from "../types";
import { annualPrecipitation, assemblePeriod, krigePeriod, makeGrid, preparePeriod, type BuildParameters, type GridContext, type StationPeriodMean, type SurfaceResult } from "./compute";
import { computeEditionDiff } from "./diff";
import { loadActiveElevation } from "./elevation";

// The database side of an edition build. Every stage can be repeated: a build that was killed
// resumes from what the database already holds (station means are written in one transaction
// together with the inputs hash; a period counts as done once its δ2H surface — written last —
// exists; a half-written period is deleted and redone). Until publishing the edition is
// "building" / "ready" and invisible to the public; publishing is one transaction.

/** Periods in build order: the months first (the annual precipitation is their sum), then the annual. */
export const BUILD_ORDER = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 0] as const;

export interface BuildProgress {
  stage: string;
  fraction: number;
}

export interface BuildHooks {
  signal?: AbortSignal;
  threads?: number;
  progress?: (p: BuildProgress) => Promise<void> | void;
  /** Called after each finished period (the job saves a checkpoint here). */
  periodDone?: (period: number) => Promise<void> | void;
  /** Test hook: wait this long after each period (only honoured under RAINPRINT_TEST=1). */
  pauseAfterPeriodMs?: number;
}

/** The next free edition id for a date: YYYY.MM.N. */
export async function nextEditionId(now = new Date()): Promise<string> {
  const prefix = `${now.getUTCFullYear()}.${String(now.getUTCMonth() + 1).padStart(2, "0")}.`;
  const rows = await getDb().select({ id: editions.id }).from(editions).where(like(editions.id, `${prefix}%`)).all();
  let n = 0;
  for (const r of rows) n = Math.max(n, Number(r.id.slice(prefix.length)) || 0);
  return `${prefix}${n + 1}`;
}

// ───────────────────────────── inputs ─────────────────────────────

export interface BuildInputs {
  inputsHash: string;
  sampleCount: number;
  stations: { id: string; code: string; lat: number; lon: number; elevationM: number; isDemo: boolean }[];
  /** Per station id: its aggregateStationMeans result. */
  means: Map<string, ReturnType<typeof aggregateStationMeans>>;
}

/**
 * Accepted samples of approved (or retired) stations, and each station's means. The inputs hash is
 * SHA-256 over the sorted lines `sample id, version, row version` and `station id, lat, lon,
 * elevation` — the same accepted data gives the same hash.
 */
export async function gatherInputs(params: BuildParameters): Promise<BuildInputs> {
  const db = getDb();
  const st = await db
    .select({ id: stations.id, code: stations.code, lat: stations.lat, lon: stations.lon, elevationM: stations.elevationM, isDemo: stations.isDemo })
    .from(stations)
    .where(inArray(stations.status, ["approved", "retired"]))
    .orderBy(asc(stations.code))
    .all();
  const rows = await db
    .select({
      id: samples.id,
      stationId: samples.stationId,
      version: samples.version,
      rowVersion: samples.rowVersion,
      startDate: samples.startDate,
      endDate: samples.endDate,
      d18O: samples.d18O,
      d2H: samples.d2H,
      amountMm: samples.amountMm,
    })
    .from(samples)
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(and(eq(samples.status, "accepted"), inArray(stations.status, ["approved", "retired"])))
    .orderBy(asc(samples.stationId), asc(samples.startDate), asc(samples.id))
    .all();
  const hash = createHash("sha256");
  const sampleLines = rows.map((r) => `s ${r.id} ${r.version} ${r.rowVersion}`).sort();
  for (const l of sampleLines) hash.update(l + "\n");
  for (const s of [...st].sort((a, b) => (a.id < b.id ? -1 : 1))) hash.update(`t ${s.id} ${s.lat} ${s.lon} ${s.elevationM}\n`);
  const byStation = new Map<string, typeof rows>();
  for (const r of rows) {
    const list = byStation.get(r.stationId) ?? [];
    list.push(r);
    byStation.set(r.stationId, list);
  }
  const means = new Map<string, ReturnType<typeof aggregateStationMeans>>();
  const withData = st.filter((s) => byStation.has(s.id));
  for (const s of withData) means.set(s.id, aggregateStationMeans(byStation.get(s.id)!, params.stationMeanRules));
  return { inputsHash: hash.digest("hex"), sampleCount: rows.length, stations: withData, means };
}

// ───────────────────────────── stages ─────────────────────────────

/** Stage 1: station means and the inputs hash, in one transaction. Skipped when already done. */
export async function ensureStationMeans(editionId: string, params: BuildParameters): Promise<{ inputsHash: string; sampleCount: number }> {
  const db = getDb();
  const e = await db.select({ inputsHash: editions.inputsHash, summary: editions.summary }).from(editions).where(eq(editions.id, editionId)).get();
  if (!e) throw new Error(`Edition ${editionId} does not exist.`);
  if (e.inputsHash) {
    const s = e.summary as { stations?: { samples?: number } } | null;
    return { inputsHash: e.inputsHash, sampleCount: s?.stations?.samples ?? 0 };
  }
  const inputs = await gatherInputs(params);
  const values: (typeof editionStationMeans.$inferInsert)[] = [];
  for (const s of inputs.stations) {
    const m = inputs.means.get(s.id)!;
    for (const pm of [m.annual, ...m.monthly]) {
      values.push({
        editionId,
        stationId: s.id,
        period: pm.period,
        d18O: pm.d18O,
        d2H: pm.d2H,
        dExcess: pm.dExcess,
        precipMm: pm.precipMm,
        coverage: pm.coverage,
        included: pm.included,
        lat: s.lat,
        lon: s.lon,
        elevationM: s.elevationM,
      });
    }
  }
  await db.transaction(async (tx) => {
    await tx.delete(editionStationMeans).where(eq(editionStationMeans.editionId, editionId));
    for (let i = 0; i < values.length; i += 500) await tx.insert(editionStationMeans).values(values.slice(i, i + 500));
    await tx
      .update(editions)
      .set({
        inputsHash: inputs.inputsHash,
        // built from any synthetic demo station → labelled synthetic demo data wherever shown
        isDemo: inputs.stations.some((s) => s.isDemo),
        summary: { stations: { total: inputs.stations.length, samples: inputs.sampleCount } } as unknown as EditionSummary,
      })
      .where(eq(editions.id, editionId));
  });
  return { inputsHash: inputs.inputsHash, sampleCount: inputs.sampleCount };
}

/** The frozen means of one period, as the surfaces need them. */
export async function periodMeans(editionId: string, period: number): Promise<StationPeriodMean[]> {
  const rows = await getDb()
    .select({
      code: stations.code,
      lat: editionStationMeans.lat,
      lon: editionStationMeans.lon,
      elevationM: editionStationMeans.elevationM,
      d18O: editionStationMeans.d18O,
      dExcess: editionStationMeans.dExcess,
      precipMm: editionStationMeans.precipMm,
      included: editionStationMeans.included,
    })
    .from(editionStationMeans)
    .innerJoin(stations, eq(stations.id, editionStationMeans.stationId))
    .where(and(eq(editionStationMeans.editionId, editionId), eq(editionStationMeans.period, period)))
    .orderBy(asc(stations.code))
    .all();
  return rows.map((r) => ({ ...r, lat: r.lat!, lon: r.lon!, elevationM: r.elevationM ?? 0 }));
}

export function gridSpec(ctx: GridContext): SurfaceGridSpec {
  return { ...ctx.grid, chunk: CHUNK };
}

async function deletePeriod(editionId: string, period: number): Promise<void> {
  const ids = (
    await getDb()
      .select({ id: surfaces.id })
      .from(surfaces)
      .where(and(eq(surfaces.editionId, editionId), eq(surfaces.period, period)))
      .all()
  ).map((r) => r.id);
  if (!ids.length) return;
  await getDb().delete(surfaceChunks).where(inArray(surfaceChunks.surfaceId, ids));
  await getDb().delete(surfaces).where(inArray(surfaces.id, ids));
  for (const id of ids) forgetSurfaceChunks(id);
}

/** Write one surface: its row, then its chunks. */
async function writeSurface(editionId: string, ctx: GridContext, r: SurfaceResult): Promise<string> {
  const row = await getDb()
    .insert(surfaces)
    .values({
      editionId,
      variable: r.variable,
      period: r.period,
      grid: gridSpec(ctx),
      trend: r.trend,
      variogram: r.variogram,
      crossValidation: r.crossValidation,
      stats: r.stats,
      model: r.model,
    })
    .returning({ id: surfaces.id })
    .get();
  await writeSurfacePlanes(row.id, ctx.grid, r.planes, getClient());
  return row.id;
}

export async function donePeriods(editionId: string): Promise<Set<number>> {
  const rows = await getDb()
    .select({ period: surfaces.period })
    .from(surfaces)
    .where(and(eq(surfaces.editionId, editionId), eq(surfaces.variable, "d2H")))
    .all();
  return new Set(rows.map((r) => r.period));
}

async function readBack(editionId: string, period: number, ctx: GridContext) {
  const s = await getDb()
    .select({ id: surfaces.id, stats: surfaces.stats })
    .from(surfaces)
    .where(and(eq(surfaces.editionId, editionId), eq(surfaces.variable, "precipMm"), eq(surfaces.period, period)))
    .get();
  if (!s) return null;
  const [value, variance, extrapolation] = await Promise.all([
    readSurfacePlaneData(s.id, ctx.grid, "value"),
    readSurfacePlaneData(s.id, ctx.grid, "variance"),
    readSurfacePlaneData(s.id, ctx.grid, "extrapolation"),
  ]);
  forgetSurfaceChunks(s.id);
  return { value, variance, extrapolation, stations: (s.stats as { stations: { used: number } }).stations.used };
}

/** Run (or resume) the whole build of an edition that is "building". Returns the summary. */
export async function runEditionBuild(editionId: string, hooks: BuildHooks = {}): Promise<EditionSummary> {
  const db = getDb();
  const e = await db.select().from(editions).where(eq(editions.id, editionId)).get();
  if (!e) throw new Error(`Edition ${editionId} does not exist.`);
  const params = e.parameters as BuildParameters;
  const timings: Record<string, number> = {};
  const report = async (stage: string, fraction: number) => hooks.progress && (await hooks.progress({ stage, fraction }));

  await report("station means", 0);
  let t = performance.now();
  const { sampleCount } = await ensureStationMeans(editionId, params);
  timings.stationMeans = (performance.now() - t) / 1000;
  hooks.signal?.throwIfAborted();

  t = performance.now();
  const elevation = await loadActiveElevation(params);
  const ctx = makeGrid(params.grid, elevation?.cells ?? null);
  timings.grid = (performance.now() - t) / 1000;

  const done = await donePeriods(editionId);
  const pause = process.env.RAINPRINT_TEST === "1" ? (hooks.pauseAfterPeriodMs ?? 0) : 0;
  // Overlapped: while period p+1 is kriged on worker threads, this thread assembles period p and
  // writes it (deflate + inserts). Writes stay in period order and the δ2H row stays last within its
  // period, so "done" keeps its meaning for a resume. The kriging is aborted if anything fails.
  const todo = BUILD_ORDER.map((period, i) => ({ period, i })).filter((x) => !done.has(x.period));
  const local = new AbortController();
  const onAbort = () => local.abort(hooks.signal?.reason);
  hooks.signal?.addEventListener("abort", onAbort);
  if (hooks.signal?.aborted) onAbort();
  let pending: Promise<void> = Promise.resolve();
  let inFlight: Promise<unknown> = Promise.resolve();
  const writePeriod = async (period: number, results: SurfaceResult[]) => {
    const tw = performance.now();
    for (const r of results) await writeSurface(editionId, ctx, r);
    timings.write = (timings.write ?? 0) + (performance.now() - tw) / 1000;
    await hooks.periodDone?.(period);
    if (pause) await new Promise((res) => setTimeout(res, pause));
  };
  const label = (period: number) => (period === 0 ? "annual" : `month ${period}`);
  const start = async (k: number) => {
    const { period, i } = todo[k];
    const base = 0.05 + (0.9 * i) / BUILD_ORDER.length;
    const span = 0.9 / BUILD_ORDER.length;
    await deletePeriod(editionId, period);
    const prepared = preparePeriod(period, await periodMeans(editionId, period), params, timings);
    const planes = krigePeriod(prepared, ctx, {
      signal: local.signal,
      threads: hooks.threads,
      timings,
      onProgress: hooks.progress ? (f) => void hooks.progress!({ stage: `surfaces: ${label(period)}`, fraction: base + span * 0.9 * f }) : undefined,
    });
    inFlight = planes.catch(() => {});
    return { prepared, planes, base };
  };
  try {
    let next = todo.length ? await start(0) : null;
    for (let k = 0; k < todo.length; k++) {
      const cur = next!;
      const period = todo[k].period;
      await report(`surfaces: ${label(period)}`, cur.base);
      const planes = await cur.planes;
      local.signal.throwIfAborted();
      next = k + 1 < todo.length ? await start(k + 1) : null;
      const results = assemblePeriod(cur.prepared, planes, ctx, params, timings);
      if (period === 0) {
        await pending; // the annual precipitation sums the stored months
        const months = [];
        for (let m = 1; m <= 12; m++) {
          const p = await readBack(editionId, m, ctx);
          if (p) months.push(p);
        }
        if (months.length === 12) results.splice(results.length - 1, 0, annualPrecipitation(months, ctx, params));
      }
      await pending;
      local.signal.throwIfAborted();
      pending = writePeriod(period, results);
      pending.catch(() => {}); // awaited below; no unhandled rejection meanwhile
    }
    await pending;
  } catch (e) {
    local.abort(e);
    await Promise.all([pending.catch(() => {}), inFlight]);
    throw e;
  } finally {
    hooks.signal?.removeEventListener("abort", onAbort);
  }
  hooks.signal?.throwIfAborted();

  await report("summary and comparison", 0.96);
  t = performance.now();
  const summary = await summarise(editionId, ctx, sampleCount, timings);
  const diff = await computeEditionDiff(editionId);
  timings.diff = (performance.now() - t) / 1000;
  summary.timings = timings;
  await db
    .update(editions)
    .set({ summary, diff, status: "ready" })
    .where(and(eq(editions.id, editionId), eq(editions.status, "building")));
  await report("ready", 1);
  return summary;
}

async function summarise(editionId: string, ctx: GridContext, sampleCount: number, timings: Record<string, number>): Promise<EditionSummary> {
  const db = getDb();
  const means = await db
    .select({ stationId: editionStationMeans.stationId, period: editionStationMeans.period, included: editionStationMeans.included, d18O: editionStationMeans.d18O })
    .from(editionStationMeans)
    .where(eq(editionStationMeans.editionId, editionId))
    .all();
  const total = new Set(means.map((m) => m.stationId)).size;
  const excludedByPeriod = Array.from({ length: 13 }, (_, p) => means.filter((m) => m.period === p && !m.included && m.d18O !== null).length);
  const withAnnualMean = means.filter((m) => m.period === 0 && m.included).length;
  const rows = await db
    .select({ variable: surfaces.variable, period: surfaces.period, stats: surfaces.stats, variogram: surfaces.variogram, cv: surfaces.crossValidation })
    .from(surfaces)
    .where(eq(surfaces.editionId, editionId))
    .orderBy(asc(surfaces.variable), asc(surfaces.period))
    .all();
  return {
    stations: { total, withAnnualMean, samples: sampleCount },
    excludedByPeriod,
    surfaces: rows.map((r) => {
      const stats = r.stats as SurfaceResult["stats"];
      const cv = r.cv as SurfaceResult["crossValidation"];
      const vg = r.variogram as SurfaceResult["variogram"];
      return {
        variable: r.variable,
        period: r.period,
        method: stats.method,
        stations: stats.stations.used,
        crossValidation: cv ? { n: cv.n, meanError: cv.meanError, rmse: cv.rmse, meanZ: cv.meanZ, meanZ2: cv.meanZ2 } : null,
        variogram: vg?.chosen ?? null,
      };
    }),
    seaLevelEquivalent: ctx.elevation === null,
    landCells: ctx.activeCells,
    timings,
  };
}

// ───────────────────────────── lifecycle writes ─────────────────────────────

type Tx = Parameters<Parameters<ReturnType<typeof getDb>["transaction"]>[0]>[0];

export async function audit(
  tx: Tx | ReturnType<typeof getDb>,
  e: { actorId: string | null; editionId: string; action: string; before?: unknown; after?: unknown; reason?: string | null },
): Promise<void> {
  await tx.insert(reviewEvents).values({
    actorId: e.actorId,
    entityType: "edition",
    entityId: e.editionId,
    action: e.action,
    before: e.before ?? null,
    after: e.after ?? null,
    reason: e.reason ?? null,
  });
}

/**
 * Publish a ready edition: status, time and audit entry in one transaction. Only "ready" editions
 * publish; returns false when the edition was not ready (nothing changed).
 */
export async function publishEdition(editionId: string, actorId: string | null): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    const now = new Date();
    const row = await tx
      .update(editions)
      .set({ status: "published", publishedAt: now })
      .where(and(eq(editions.id, editionId), eq(editions.status, "ready")))
      .returning({ id: editions.id })
      .get();
    if (!row) return false;
    await audit(tx, { actorId, editionId, action: "publish", before: { status: "ready" }, after: { status: "published", publishedAt: now.toISOString() } });
    return true;
  });
}

/** Mark a building edition failed (its job gave up). */
export async function markEditionFailed(editionId: string, message: string): Promise<void> {
  await getDb().transaction(async (tx) => {
    const row = await tx
      .update(editions)
      .set({ status: "failed" })
      .where(and(eq(editions.id, editionId), eq(editions.status, "building")))
      .returning({ id: editions.id })
      .get();
    if (row) await audit(tx, { actorId: null, editionId, action: "build-failed", after: { status: "failed" }, reason: message.slice(0, 500) });
  });
}
