import "server-only";
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { getDb } from "@/db";
import { editionStationMeans, editions, stations, surfaces, type SurfaceVariable } from "@/db/schema";
import type {
  EditionStatus,
  EditionSummary,
  SurfaceCrossValidation,
  SurfaceGridSpec,
  SurfaceStats,
  SurfaceTrend,
  SurfaceVariogram,
} from "./types";

// Reading editions and their surfaces. Visibility rule: the public sees
// published editions and withdrawn ones (a withdrawn edition stays citable,
// marked as withdrawn); builds in progress, failed, cancelled and ready ones
// are for moderators only (`includeUnpublished`). "Current" is the newest
// published edition (by publication time); a withdrawn edition is never current.

export const PUBLIC_STATUSES = ["published", "withdrawn"] as const satisfies readonly EditionStatus[];

export interface EditionRow {
  id: string;
  status: EditionStatus;
  isDemo: boolean;
  createdAt: Date;
  publishedAt: Date | null;
  createdBy: string | null;
  jobId: string | null;
  inputsHash: string | null;
  parameters: unknown;
  summary: EditionSummary | null;
  diff: unknown;
  withdrawnAt: Date | null;
  withdrawnReason: string | null;
}

export interface SurfaceRow {
  id: string;
  editionId: string;
  variable: SurfaceVariable;
  period: number;
  grid: SurfaceGridSpec;
  stats: SurfaceStats | null;
  trend: SurfaceTrend | null;
  variogram: SurfaceVariogram | null;
  crossValidation: SurfaceCrossValidation | null;
}

const editionColumns = {
  id: editions.id,
  status: editions.status,
  isDemo: editions.isDemo,
  createdAt: editions.createdAt,
  publishedAt: editions.publishedAt,
  createdBy: editions.createdBy,
  jobId: editions.jobId,
  inputsHash: editions.inputsHash,
  parameters: editions.parameters,
  summary: editions.summary,
  diff: editions.diff,
  withdrawnAt: editions.withdrawnAt,
  withdrawnReason: editions.withdrawnReason,
};

function toEdition(r: Record<keyof typeof editionColumns, unknown>): EditionRow {
  return r as unknown as EditionRow;
}

/** True when the public may see the edition (published or withdrawn). */
export function isPublicEdition(e: Pick<EditionRow, "status">): boolean {
  return (PUBLIC_STATUSES as readonly string[]).includes(e.status);
}

/** The newest published edition, or null when none is published. */
export async function getCurrentEdition(): Promise<EditionRow | null> {
  const row = await getDb()
    .select(editionColumns)
    .from(editions)
    .where(eq(editions.status, "published"))
    .orderBy(desc(editions.publishedAt), desc(editions.id))
    .limit(1)
    .get();
  return row ? toEdition(row) : null;
}

/**
 * One edition by id ("current" = the newest published). Without `includeUnpublished`
 * only published and withdrawn editions are found (null otherwise).
 */
export async function getEdition(id: string, opts: { includeUnpublished?: boolean } = {}): Promise<EditionRow | null> {
  if (id === "current") return getCurrentEdition();
  const row = await getDb().select(editionColumns).from(editions).where(eq(editions.id, id)).get();
  if (!row) return null;
  const e = toEdition(row);
  return opts.includeUnpublished || isPublicEdition(e) ? e : null;
}

/** Published and withdrawn editions, newest publication first. */
export async function listPublishedEditions(opts: { includeWithdrawn?: boolean } = {}): Promise<EditionRow[]> {
  const statuses = opts.includeWithdrawn === false ? ["published" as const] : [...PUBLIC_STATUSES];
  const rows = await getDb()
    .select(editionColumns)
    .from(editions)
    .where(inArray(editions.status, statuses))
    .orderBy(desc(editions.publishedAt), desc(editions.id))
    .all();
  return rows.map(toEdition);
}

/** Editions not (yet) public: building, ready, failed, cancelled — newest first (moderators). */
export async function listUnpublishedEditions(limit = 50): Promise<EditionRow[]> {
  const rows = await getDb()
    .select(editionColumns)
    .from(editions)
    .where(inArray(editions.status, ["building", "ready", "failed", "cancelled"]))
    .orderBy(desc(editions.createdAt))
    .limit(limit)
    .all();
  return rows.map(toEdition);
}

const surfaceColumns = {
  id: surfaces.id,
  editionId: surfaces.editionId,
  variable: surfaces.variable,
  period: surfaces.period,
  grid: surfaces.grid,
  stats: surfaces.stats,
  trend: surfaces.trend,
  variogram: surfaces.variogram,
  crossValidation: surfaces.crossValidation,
};

/**
 * One surface of an edition (any status — check the edition's visibility with getEdition first),
 * or null. Its planes: lib/surfaces/store (readSurfaceWindow(surface.id, surface.grid, "value", …)).
 */
export async function getSurface(editionId: string, variable: SurfaceVariable, period: number): Promise<SurfaceRow | null> {
  const row = await getDb()
    .select(surfaceColumns)
    .from(surfaces)
    .where(and(eq(surfaces.editionId, editionId), eq(surfaces.variable, variable), eq(surfaces.period, period)))
    .get();
  return (row as SurfaceRow | undefined) ?? null;
}

/** All surfaces of an edition, by variable then period. */
export async function listSurfaces(editionId: string): Promise<SurfaceRow[]> {
  const rows = await getDb()
    .select(surfaceColumns)
    .from(surfaces)
    .where(eq(surfaces.editionId, editionId))
    .orderBy(asc(surfaces.variable), asc(surfaces.period))
    .all();
  return rows as SurfaceRow[];
}

export interface EditionStationMean {
  stationId: string;
  code: string;
  name: string;
  lat: number;
  lon: number;
  elevationM: number;
  isDemo: boolean;
  period: number;
  d18O: number | null;
  d2H: number | null;
  dExcess: number | null;
  precipMm: number | null;
  /** True when the mean passed the coverage rules and went into the period's surfaces. */
  included: boolean;
}

/** The station means frozen in an edition for one period (0 annual, 1–12), with station positions (the map's station layer). */
export async function getEditionStationMeans(editionId: string, period: number): Promise<EditionStationMean[]> {
  return getDb()
    .select({
      stationId: editionStationMeans.stationId,
      code: stations.code,
      name: stations.name,
      // the position frozen with the edition (the station's current one for older rows)
      lat: sql<number>`coalesce(${editionStationMeans.lat}, ${stations.lat})`,
      lon: sql<number>`coalesce(${editionStationMeans.lon}, ${stations.lon})`,
      elevationM: sql<number>`coalesce(${editionStationMeans.elevationM}, ${stations.elevationM})`,
      isDemo: stations.isDemo,
      period: editionStationMeans.period,
      d18O: editionStationMeans.d18O,
      d2H: editionStationMeans.d2H,
      dExcess: editionStationMeans.dExcess,
      precipMm: editionStationMeans.precipMm,
      included: editionStationMeans.included,
    })
    .from(editionStationMeans)
    .innerJoin(stations, eq(stations.id, editionStationMeans.stationId))
    .where(and(eq(editionStationMeans.editionId, editionId), eq(editionStationMeans.period, period)))
    .orderBy(asc(stations.code))
    .all();
}
