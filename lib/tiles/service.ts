import "server-only";
import { createHash } from "node:crypto";
import { getEdition, listSurfaces, type EditionRow, type SurfaceRow } from "@/lib/editions/queries";
import { PERIODS } from "@/lib/editions/types";
import { readSurfaceWindow } from "@/lib/surfaces/store";
import type { LayerSpec } from "./layers";
import { TILE_SIZE } from "./mercator";
import { encodePng } from "./png";
import { RENDER_VERSION } from "./ramps";
import { renderTile, tileCellWindow } from "./render";
import { buildScale, type ColourScale } from "./scale";

// Tiles and legends of public editions, from the stored planes. Editions never change once
// written, so surface rows are remembered per process and tiles can be cached forever by URL.

const surfaceCache = new Map<string, SurfaceRow[]>();

/** A public (published or withdrawn) edition by id; "current" = the newest published one. */
export async function findPublicEdition(id: string): Promise<EditionRow | null> {
  return getEdition(id);
}

async function surfacesOf(editionId: string): Promise<SurfaceRow[]> {
  let rows = surfaceCache.get(editionId);
  if (!rows) {
    rows = await listSurfaces(editionId);
    if (surfaceCache.size > 32) surfaceCache.clear();
    surfaceCache.set(editionId, rows);
  }
  return rows;
}

/** The surface of a layer for one period, or null when the edition has none. */
export async function findSurface(editionId: string, spec: LayerSpec, period: number): Promise<SurfaceRow | null> {
  return (await surfacesOf(editionId)).find((s) => s.variable === spec.variable && s.period === period) ?? null;
}

/**
 * The periods that share one colour scale: all thirteen for the δ values, d-excess and their
 * uncertainties (so months compare at a glance); precipitation's twelve months share one and
 * its annual total has its own (a year's rain is an order larger than a month's).
 */
export function scaleGroup(spec: Pick<LayerSpec, "variable">, period: number): readonly number[] {
  if (spec.variable !== "precipMm") return PERIODS;
  return period === 0 ? [0] : PERIODS.filter((p) => p !== 0);
}

/** The colour scale of a layer in an edition (for `period`'s group), or null when no surface has statistics. */
export async function layerScale(editionId: string, spec: LayerSpec, period: number): Promise<ColourScale | null> {
  const group = scaleGroup(spec, period);
  const ranges = (await surfacesOf(editionId))
    .filter((s) => s.variable === spec.variable && group.includes(s.period) && s.stats)
    .map((s) => (spec.kind === "sd" ? s.stats!.sd : s.stats!.value))
    .filter((r) => r && r.cells > 0);
  return ranges.length ? buildScale(spec, ranges) : null;
}

/** A strong validator for one tile: the render version and everything in its URL. */
export function tileEtag(editionId: string, layer: string, period: number, z: number, x: number, y: number): string {
  const h = createHash("sha256").update(`${RENDER_VERSION}|${editionId}|${layer}|${period}|${z}|${x}|${y}`).digest("base64url").slice(0, 22);
  return `"${h}"`;
}

/** The PNG of one tile of a surface (transparent where the surface has no value). */
export async function renderSurfaceTile(surface: SurfaceRow, spec: LayerSpec, scale: ColourScale, z: number, x: number, y: number): Promise<Buffer> {
  const win = tileCellWindow(surface.grid, z, x, y);
  if (!win) return encodePng(new Uint8Array(TILE_SIZE * TILE_SIZE * 4), TILE_SIZE, TILE_SIZE);
  const values = await readSurfaceWindow(surface.id, surface.grid, spec.kind === "sd" ? "variance" : "value", win);
  if (spec.kind === "sd") for (let i = 0; i < values.length; i++) values[i] = Math.sqrt(Math.max(0, values[i]));
  const extrapolation = await readSurfaceWindow(surface.id, surface.grid, "extrapolation", win);
  const rgba = renderTile(surface.grid, z, x, y, { values, extrapolation, window: win }, scale);
  return encodePng(rgba, TILE_SIZE, TILE_SIZE);
}
