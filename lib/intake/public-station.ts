import "server-only";
import { and, asc, eq, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { samples, stations } from "@/db/schema";
import { errors } from "@/lib/errors";
import { aggregateStationMeans, fitWaterLine, GMWL, MIN_LINE_SAMPLES, WATER_LINE_METHOD_INFO, type WaterLineMethod } from "@/lib/isotopes";

// What a public station page shows: metadata, amount-weighted means with coverage
// (lib/isotopes aggregateStationMeans) and the δ2H–δ18O pairs with a water line fitted by
// the method the visitor picks (lib/isotopes fitWaterLine). Approved (or retired) stations only.

export async function publicStationData(code: string, method: WaterLineMethod) {
  const db = getDb();
  const st = await db
    .select()
    .from(stations)
    .where(and(eq(stations.code, code.toUpperCase()), inArray(stations.status, ["approved", "retired"])))
    .get();
  if (!st) throw errors.notFound(`There is no public station with the code ${code}.`);
  const rows = await db
    .select({ startDate: samples.startDate, endDate: samples.endDate, d18O: samples.d18O, d2H: samples.d2H, amountMm: samples.amountMm })
    .from(samples)
    .where(and(eq(samples.stationId, st.id), eq(samples.status, "accepted")))
    .orderBy(asc(samples.startDate))
    .all();
  const means = rows.length ? aggregateStationMeans(rows) : null;
  let line = null;
  let lineNote: string | null = null;
  if (rows.length >= MIN_LINE_SAMPLES) {
    try {
      line = fitWaterLine(rows, method);
    } catch (e) {
      lineNote = e instanceof Error ? e.message : "The line could not be fitted.";
    }
  } else lineNote = `A water line needs at least ${MIN_LINE_SAMPLES} accepted samples; this station has ${rows.length}.`;
  return {
    station: {
      code: st.code,
      name: st.name,
      lat: st.lat,
      lon: st.lon,
      elevationM: st.elevationM,
      collectorType: st.collectorType,
      samplingInterval: st.samplingInterval,
      operatingOrg: st.operatingOrg,
      startDate: st.startDate,
      status: st.status,
      isDemo: st.isDemo,
    },
    sampleCount: rows.length,
    firstDate: rows[0]?.startDate ?? null,
    lastDate: rows.at(-1)?.endDate ?? null,
    means: means ? { annual: means.annual, monthly: means.monthly } : null,
    points: rows.map((r) => ({ d18O: r.d18O, d2H: r.d2H, amountMm: r.amountMm, startDate: r.startDate })),
    method,
    methodInfo: WATER_LINE_METHOD_INFO[method],
    line: line ? { slope: line.slope, intercept: line.intercept, slopeSE: line.slopeSE, interceptSE: line.interceptSE, r2: line.r2, n: line.n, residualSD: line.residualSD } : null,
    lineNote,
    gmwl: { slope: GMWL.slope, intercept: GMWL.intercept },
  };
}
