import "server-only";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { editions, surfaces, SURFACE_VARIABLES, type SurfaceVariable } from "@/db/schema";
import type { SurfacePlane } from "./surface";

// Which edition surfaces can be downloaded, and reading one plane of one.
// Only published editions are offered: an edition is citable and immutable
// once published; one being built, failed or withdrawn is not.

/** Edition ids as the download URLs accept them (e.g. 2026.12.1). */
export const EDITION_ID = /^[A-Za-z0-9][A-Za-z0-9._-]{0,31}$/;

/** `d18O-annual.tif`, `dExcess-m07.csv` → variable, period (0 annual, 1–12) and format; null if not a surface file name. */
export function parseSurfaceFile(file: string): { variable: SurfaceVariable; period: number; format: "tif" | "csv" } | null {
  const m = /^([A-Za-z0-9]+)-(annual|m(0[1-9]|1[0-2]))\.(tif|csv)$/.exec(file);
  if (!m || !(SURFACE_VARIABLES as readonly string[]).includes(m[1])) return null;
  return { variable: m[1] as SurfaceVariable, period: m[2] === "annual" ? 0 : Number(m[3]), format: m[4] as "tif" | "csv" };
}

export function surfaceFile(variable: SurfaceVariable, period: number, format: "tif" | "csv"): string {
  return `${variable}-${period === 0 ? "annual" : `m${String(period).padStart(2, "0")}`}.${format}`;
}

export async function findPublishedEdition(id: string): Promise<{ id: string; isDemo: boolean; publishedAt: Date | null } | null> {
  if (!EDITION_ID.test(id)) return null;
  const row = await getDb()
    .select({ id: editions.id, isDemo: editions.isDemo, publishedAt: editions.publishedAt })
    .from(editions)
    .where(and(eq(editions.id, id), eq(editions.status, "published")))
    .get();
  return row ?? null;
}

/** Published editions, newest first, with the surfaces each holds. */
export async function publishedEditionsWithSurfaces(limit = 10): Promise<
  { id: string; isDemo: boolean; publishedAt: Date | null; surfaces: { variable: SurfaceVariable; period: number }[] }[]
> {
  const db = getDb();
  const list = await db
    .select({ id: editions.id, isDemo: editions.isDemo, publishedAt: editions.publishedAt })
    .from(editions)
    .where(eq(editions.status, "published"))
    .orderBy(desc(editions.publishedAt))
    .limit(limit)
    .all();
  if (!list.length) return [];
  const surf = await db
    .select({ editionId: surfaces.editionId, variable: surfaces.variable, period: surfaces.period })
    .from(surfaces)
    .where(inArray(surfaces.editionId, list.map((e) => e.id)))
    .orderBy(asc(surfaces.variable), asc(surfaces.period))
    .all();
  return list.map((e) => ({ ...e, surfaces: surf.filter((s) => s.editionId === e.id).map(({ variable, period }) => ({ variable, period })) }));
}

/**
 * One surface plane of an edition: the predicted values on the edition's grid.
 *
 * PENDING EDITIONS: the editions build (surfaces + surface_chunks, Float32
 * chunks) is being written in parallel. Until it provides the reader, this
 * answers "not found" (null) for every edition, and the download route says
 * so with a 404. Replace the body with the editions module's reader; the
 * contract: `{ grid: { lon0, lat0, dLon, dLat, nx, ny } (cell centres, row 0
 * northernmost), values: Float32Array (NaN = no value, index = row·nx + col),
 * meta: { editionId, variable, period, plane: "value", isDemo } }`, or null
 * when the edition has no such surface.
 */
export async function readSurfacePlane(editionId: string, variable: SurfaceVariable, period: number): Promise<SurfacePlane | null> {
  void editionId;
  void variable;
  void period;
  return null;
}
