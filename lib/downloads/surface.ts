import type { SurfaceVariable } from "@/db/schema";

// One plane of an edition surface as the download writers take it: a north-up
// grid of cell centres and Float32 values (NaN = no value). Pure types and
// helpers; no framework, no database.
//
// Grid convention (the same as lib/geo and the editions build): column c is
// at lon0 + c·dLon (west → east), row 0 is the northernmost row and row r is
// at lat0 − r·dLat; the value of cell (r, c) is values[r·nx + c].

export type { SurfaceVariable };

export interface SurfaceGrid {
  /** Longitude of the centre of column 0, degrees (WGS84). */
  lon0: number;
  /** Latitude of the centre of row 0 (the northernmost row), degrees. */
  lat0: number;
  /** Cell width, degrees (> 0). */
  dLon: number;
  /** Cell height, degrees (> 0; rows run north → south). */
  dLat: number;
  nx: number;
  ny: number;
}

export interface SurfaceMeta {
  editionId: string;
  variable: SurfaceVariable;
  /** 0 = annual, 1–12 = calendar month. */
  period: number;
  /** Which plane: the predicted value or its kriging variance. */
  plane: "value" | "variance";
  /** Built from synthetic demo data (labelled in every file). */
  isDemo: boolean;
}

export interface SurfacePlane {
  grid: SurfaceGrid;
  /** ny·nx values, row-major from the north-west cell; NaN = no value. */
  values: Float32Array;
  meta: SurfaceMeta;
}

const VARIABLE_TEXT: Record<SurfaceVariable, { label: string; units: string; unitsAscii: string; column: string }> = {
  d18O: { label: "d18O (delta oxygen-18)", units: "‰ VSMOW", unitsAscii: "per mil VSMOW", column: "d18O_permil" },
  d2H: { label: "d2H (delta deuterium)", units: "‰ VSMOW", unitsAscii: "per mil VSMOW", column: "d2H_permil" },
  dExcess: { label: "d-excess (d2H - 8 d18O)", units: "‰", unitsAscii: "per mil", column: "d_excess_permil" },
  precipMm: { label: "precipitation amount", units: "mm", unitsAscii: "mm", column: "precip_mm" },
};

/** Units of a plane, ASCII (for TIFF tags). Variance planes are in squared units. */
export function unitsAscii(meta: Pick<SurfaceMeta, "variable" | "plane" | "period">): string {
  const base = VARIABLE_TEXT[meta.variable].unitsAscii;
  const perPeriod = meta.variable === "precipMm" ? (meta.period === 0 ? " per year" : " per month") : "";
  return meta.plane === "variance" ? `(${base})^2${perPeriod ? ` [${perPeriod.trim()}]` : ""}` : `${base}${perPeriod}`;
}

export function variableLabel(variable: SurfaceVariable): string {
  return VARIABLE_TEXT[variable].label;
}

/** "annual" or "month 07". */
export function periodText(period: number): string {
  return period === 0 ? "annual" : `month ${String(period).padStart(2, "0")}`;
}

/** The value column's name in CSV, e.g. `d18O_permil` or `d18O_variance_permil2`. */
export function valueColumn(meta: Pick<SurfaceMeta, "variable" | "plane">): string {
  const c = VARIABLE_TEXT[meta.variable].column;
  if (meta.plane === "value") return c;
  const [name, unit] = [c.slice(0, c.lastIndexOf("_")), c.slice(c.lastIndexOf("_") + 1)];
  return `${name}_variance_${unit}2`;
}

/** A file name like `rainprint-2026.12.1-d18O-annual.tif` (`-m07` for July). */
export function surfaceFileName(meta: SurfaceMeta, ext: "tif" | "csv"): string {
  const period = meta.period === 0 ? "annual" : `m${String(meta.period).padStart(2, "0")}`;
  return `rainprint-${meta.editionId}-${meta.variable}${meta.plane === "variance" ? "-variance" : ""}-${period}.${ext}`;
}

/** Throws a RangeError with a plain message when the plane is not a consistent north-up grid. */
export function checkPlane(p: SurfacePlane): void {
  const { lon0, lat0, dLon, dLat, nx, ny } = p.grid;
  for (const [k, v] of Object.entries({ lon0, lat0, dLon, dLat }))
    if (!Number.isFinite(v)) throw new RangeError(`grid.${k} must be a finite number of degrees, got ${v}`);
  if (!(dLon > 0) || !(dLat > 0)) throw new RangeError("grid.dLon and grid.dLat must be positive (rows run north to south)");
  if (!Number.isInteger(nx) || !Number.isInteger(ny) || nx < 1 || ny < 1 || nx > 65_535 || ny > 65_535)
    throw new RangeError(`grid.nx and grid.ny must be whole numbers from 1 to 65535, got ${nx} × ${ny}`);
  if (p.values.length !== nx * ny) throw new RangeError(`values has ${p.values.length} cells; the grid needs nx·ny = ${nx * ny}`);
  if (!Number.isInteger(p.meta.period) || p.meta.period < 0 || p.meta.period > 12) throw new RangeError("meta.period must be 0 (annual) or 1–12");
}
