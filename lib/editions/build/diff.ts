import "server-only";
import { and, desc, eq } from "drizzle-orm";
import { getDb } from "@/db";
import { editionStationMeans, editions, stations, surfaces } from "@/db/schema";
import type { LonLatGrid } from "@/lib/geo";
import { readSurfaceCell } from "@/lib/surfaces/store";
import type { EditionDiff, EditionStationChange } from "../types";

// The comparison of a new edition with the previous published one: stations added and removed,
// the largest changes of the annual station means, and of the predicted annual values at the
// stations (each edition's surface read at the cell holding the station).

const TOP = 10;
const VARIABLES = ["d18O", "dExcess", "precipMm"] as const;

async function annualMeans(editionId: string) {
  const rows = await getDb()
    .select({
      code: stations.code,
      lat: editionStationMeans.lat,
      lon: editionStationMeans.lon,
      d18O: editionStationMeans.d18O,
      dExcess: editionStationMeans.dExcess,
      precipMm: editionStationMeans.precipMm,
      included: editionStationMeans.included,
    })
    .from(editionStationMeans)
    .innerJoin(stations, eq(stations.id, editionStationMeans.stationId))
    .where(and(eq(editionStationMeans.editionId, editionId), eq(editionStationMeans.period, 0)))
    .all();
  return new Map(rows.map((r) => [r.code, r]));
}

function cellOf(grid: LonLatGrid, lon: number, lat: number): { row: number; col: number } {
  return { row: Math.round((grid.lat0 - lat) / grid.dLat), col: Math.round((lon - grid.lon0) / grid.dLon) };
}

async function valueAt(editionId: string, variable: string, lon: number, lat: number): Promise<number> {
  const s = await getDb()
    .select({ id: surfaces.id, grid: surfaces.grid })
    .from(surfaces)
    .where(and(eq(surfaces.editionId, editionId), eq(surfaces.variable, variable as "d18O"), eq(surfaces.period, 0)))
    .get();
  if (!s) return NaN;
  const grid = s.grid as LonLatGrid;
  const { row, col } = cellOf(grid, lon, lat);
  return readSurfaceCell(s.id, grid, "value", row, col);
}

function top(list: EditionStationChange[]): EditionStationChange[] {
  const out: EditionStationChange[] = [];
  for (const v of VARIABLES)
    out.push(
      ...list
        .filter((c) => c.variable === v)
        .sort((a, b) => Math.abs(b.change) - Math.abs(a.change) || (a.stationCode < b.stationCode ? -1 : 1))
        .slice(0, TOP),
    );
  return out;
}

/** The diff of `editionId` against the newest published edition other than itself (null fields for the first). */
export async function computeEditionDiff(editionId: string): Promise<EditionDiff> {
  const prev = await getDb()
    .select({ id: editions.id })
    .from(editions)
    .where(eq(editions.status, "published"))
    .orderBy(desc(editions.publishedAt), desc(editions.id))
    .all();
  const previous = prev.find((p) => p.id !== editionId)?.id ?? null;
  const cur = await annualMeans(editionId);
  if (!previous) return { previous: null, stationsAdded: [...cur.keys()].sort(), stationsRemoved: [], meanChanges: [], predictedChanges: [] };
  const old = await annualMeans(previous);
  const stationsAdded = [...cur.keys()].filter((c) => !old.has(c)).sort();
  const stationsRemoved = [...old.keys()].filter((c) => !cur.has(c)).sort();
  const meanChanges: EditionStationChange[] = [];
  const predictedChanges: EditionStationChange[] = [];
  for (const [code, c] of cur) {
    const o = old.get(code);
    if (o)
      for (const v of VARIABLES) {
        const a = o[v];
        const b = c[v];
        if (a !== null && b !== null && o.included && c.included) meanChanges.push({ stationCode: code, variable: v, period: 0, previous: a, current: b, change: b - a });
      }
    if (c.lat === null || c.lon === null) continue;
    for (const v of VARIABLES) {
      const [a, b] = await Promise.all([valueAt(previous, v, c.lon, c.lat), valueAt(editionId, v, c.lon, c.lat)]);
      if (Number.isFinite(a) && Number.isFinite(b)) predictedChanges.push({ stationCode: code, variable: v, period: 0, previous: a, current: b, change: b - a });
    }
  }
  return { previous, stationsAdded, stationsRemoved, meanChanges: top(meanChanges), predictedChanges: top(predictedChanges) };
}
