import "server-only";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { editions, surfaces, SURFACE_VARIABLES, type SurfaceVariable } from "@/db/schema";
import type { SurfaceGridSpec } from "@/lib/editions/types";
import { readSurfacePlaneData } from "@/lib/surfaces/store";
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
 * One surface plane of an edition: the predicted values on the edition's grid, read from the
 * surface store (lib/surfaces/store), or null when the edition has no such surface. The caller
 * checks that the edition is published (findPublishedEdition).
 */
export async function readSurfacePlane(editionId: string, variable: SurfaceVariable, period: number): Promise<SurfacePlane | null> {
  const db = getDb();
  const row = await db
    .select({ id: surfaces.id, grid: surfaces.grid, isDemo: editions.isDemo })
    .from(surfaces)
    .innerJoin(editions, eq(editions.id, surfaces.editionId))
    .where(and(eq(surfaces.editionId, editionId), eq(surfaces.variable, variable), eq(surfaces.period, period)))
    .get();
  if (!row) return null;
  const g = row.grid as SurfaceGridSpec;
  const grid = { lon0: g.lon0, lat0: g.lat0, dLon: g.dLon, dLat: g.dLat, nx: g.nx, ny: g.ny };
  const values = await readSurfacePlaneData(row.id, grid, "value");
  return { grid, values, meta: { editionId, variable, period, plane: "value", isDemo: row.isDemo } };
}
