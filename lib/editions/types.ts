// Shapes stored with an edition and its surfaces (the JSON columns of
// `editions` and `surfaces`). Pure types and constants: safe for pages,
// components, the map, tiles, downloads and the job worker alike.
//
// Grid convention (lib/geo, lib/geostats, lib/surfaces/store): cell centres,
// north-up — column c at lon0 + c·dLon, row r at lat0 − r·dLat (row 0 is the
// northernmost), cell index r·nx + c.

import type { SurfaceVariable } from "@/db/schema";

export type { SurfaceVariable };

export const EDITION_VARIABLES = ["d18O", "d2H", "dExcess", "precipMm"] as const satisfies readonly SurfaceVariable[];

/** 0 = annual, 1–12 = calendar months. */
export const PERIODS = [0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12] as const;

export type EditionStatus = "building" | "failed" | "cancelled" | "ready" | "published" | "withdrawn";

/** `surfaces.grid`: the grid of every plane of the surface, plus the chunk size of the store. */
export interface SurfaceGridSpec {
  lon0: number;
  lat0: number;
  dLon: number;
  dLat: number;
  nx: number;
  ny: number;
  /** Cells per chunk side in `surface_chunks` (lib/surfaces/store CHUNK). */
  chunk: number;
}

/** Summary of one plane over the cells that hold a value. */
export interface PlaneStats {
  /** Cells with a value. */
  cells: number;
  min: number;
  max: number;
  mean: number;
  /** 2nd and 98th percentiles (the map legend's default range). */
  p02: number;
  p98: number;
}

/** How a surface was made. */
export type SurfaceMethod =
  /** trend (least squares on |lat|, lat², elevation) + ordinary kriging of the residuals */
  | "regression-kriging"
  /** ordinary kriging of √P, back-transformed P = max(ẑ, 0)² */
  | "sqrt-kriging"
  /** δ2H = d-excess + 8·δ18O */
  | "derived-d2H"
  /** annual precipitation = Σ of the twelve monthly surfaces */
  | "derived-annual-sum";

/** `surfaces.stats`: what the map legend, the edition page and downloads show. */
export interface SurfaceStats {
  method: SurfaceMethod;
  /** "‰" (δ18O, δ2H, d-excess) or "mm" (precipitation; per month, or per year for the annual). */
  units: "‰" | "mm";
  value: PlaneStats;
  variance: PlaneStats;
  /** Standard deviation √variance (the uncertainty layer's range). */
  sd: PlaneStats;
  stations: {
    /** Stations whose mean for this period went into the surface. */
    used: number;
    /** Stations with samples whose mean for this period failed the coverage rules. */
    excludedCoverage: number;
  };
  /**
   * True when the grid carries no elevation: the trend's elevation term is taken at 0 m
   * (a sea-level-equivalent surface). Site lookups apply the fitted gradient at the site's elevation.
   */
  seaLevelEquivalent: boolean;
  /** Cells farther than `distanceKm` from the nearest station used are flagged in the extrapolation plane. */
  extrapolation: { distanceKm: number; cells: number; fraction: number };
  /** Statement of a derivation or assumption, shown with the surface and in downloads. */
  note?: string;
  /** derived-d2H only: the correlation ρ of the d-excess and δ18O errors used in the variance (stated in `note`). */
  d2HCorrelation?: number;
}

/** One term of the trend. */
export interface TrendTerm {
  name: "intercept" | "absLat" | "lat2" | "elevation";
  /** Coefficient (‰ per degree, per degree², per metre; ‰ for the intercept). */
  estimate: number;
  standardError: number;
}

/** `surfaces.trend` (regression-kriging surfaces). */
export interface SurfaceTrend {
  /** δ = b0 + b1·|lat| + b2·lat² + b3·elevation_m — Bowen & Wilkinson (2002), Geology 30:315 form [pub citation]. */
  formula: string;
  terms: TrendTerm[];
  /** Covariance matrix of the coefficients (row-major, order of `terms`), s²(XᵀX)⁻¹. */
  covariance: number[];
  rSquared: number;
  /** Residual standard error s, ‰. */
  residualSE: number;
  n: number;
  /** Degrees of freedom n − p. */
  df: number;
}

export interface VariogramModelRecord {
  model: "spherical" | "exponential" | "gaussian";
  nugget: number;
  psill: number;
  /** Range parameter, km (gstat's convention). */
  rangeKm: number;
}

export interface FittedVariogramRecord extends VariogramModelRecord {
  sse: number;
  converged: boolean;
  warnings: string[];
  /** Leave-one-out statistics with this model. */
  crossValidation: CrossValidationStats;
}

/** `surfaces.variogram` */
export interface SurfaceVariogram {
  /** What the variogram describes: the trend residuals (‰), or √P (√mm). */
  of: "trend residuals" | "square root of precipitation";
  empirical: { distanceKm: number; gamma: number; pairs: number }[];
  cutoffKm: number;
  fitted: FittedVariogramRecord[];
  chosen: VariogramModelRecord["model"];
  /** How the choice was made. */
  rule: string;
}

export interface CrossValidationStats {
  n: number;
  meanError: number;
  rmse: number;
  meanZ: number;
  meanZ2: number;
}

/** `surfaces.crossValidation`: leave-one-out with the chosen model, in the surface's units. */
export interface SurfaceCrossValidation extends CrossValidationStats {
  /** Per station: observed and predicted (trend + kriged residual), kriging variance. */
  points: { stationCode: string; observed: number; predicted: number; variance: number; residual: number; z: number }[];
}

/** Per-surface line of an edition's summary (also what the API lists). */
export interface EditionSurfaceSummary {
  variable: SurfaceVariable;
  period: number;
  method: SurfaceMethod;
  stations: number;
  crossValidation: CrossValidationStats | null;
  variogram: VariogramModelRecord["model"] | null;
}

/** `editions.summary` */
export interface EditionSummary {
  stations: { total: number; withAnnualMean: number; samples: number };
  /** Stations left out per period (0 annual, 1–12) for failing coverage. */
  excludedByPeriod: number[];
  surfaces: EditionSurfaceSummary[];
  seaLevelEquivalent: boolean;
  landCells: number;
  /** Seconds per stage of the build. */
  timings: Record<string, number>;
}

/** One station's change between two editions. */
export interface EditionStationChange {
  stationCode: string;
  variable: "d18O" | "dExcess" | "precipMm";
  /** 0 = annual. */
  period: number;
  previous: number;
  current: number;
  /** current − previous */
  change: number;
}

/** `editions.diff`: what changed since the previous published edition. */
export interface EditionDiff {
  /** The edition compared against, or null for the first one. */
  previous: string | null;
  stationsAdded: string[];
  stationsRemoved: string[];
  /** Largest changes of the annual station means (by |change|, per variable). */
  meanChanges: EditionStationChange[];
  /** Largest changes of the annual surfaces' predicted values at the stations' cells. */
  predictedChanges: EditionStationChange[];
}
