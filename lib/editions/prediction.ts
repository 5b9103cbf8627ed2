// The contract between edition builds (which store fitted models) and site
// predictions (site lookup page, site report, batch lookup, /api/v1/predict).
// Pure types: the predictor that implements them lives in
// lib/editions/predictor.ts (server only).

import type { KrigingModelJSON } from "@/lib/geostats";
import type { SurfaceVariable } from "./types";

/**
 * `surfaces.model` for a kriged surface: everything needed to predict exactly
 * at a site, without the grid.
 *   regression-kriging: value = trend(site) + OK residual(site);
 *     trend(site) = b·[1, |lat|, lat², elevation_m] with b from `surfaces.trend`;
 *     variance = kriging variance of the residual + xᵀ·Cov(b)·x (trend variance).
 *   sqrt-kriging (precipitation): z = OK of √P; P = max(z, 0)².
 */
export interface SurfaceModelRecord {
  kind: "regression-kriging" | "sqrt-kriging";
  /** Station codes in the order of the kriging model's arrays. */
  stationCodes: string[];
  /** lib/geostats krigingModelToJSON of the kriging (residual or √P) model. */
  kriging: KrigingModelJSON;
  /** Distance to the nearest station beyond which a site counts as extrapolation, km. */
  extrapolationKm: number;
}

/** A predicted quantity: value, standard deviation and the Gaussian 95% interval (value ± 1.959964·sd). */
export interface Estimate {
  value: number;
  sd: number;
  lower95: number;
  upper95: number;
}

export interface SiteInput {
  lat: number;
  lon: number;
  /** Metres above sea level; null/undefined → the sea-level-equivalent prediction (elevation term at 0 m). */
  elevationM?: number | null;
}

export interface PeriodPrediction {
  d18O: Estimate;
  d2H: Estimate;
  dExcess: Estimate;
  /** Mean precipitation, mm (per month; the annual one is the sum of months). */
  precipMm: Estimate | null;
}

export interface InformingStation {
  code: string;
  name: string;
  distanceKm: number;
  /** Ordinary-kriging weight of this station in the annual δ18O residual prediction. */
  weight: number;
}

export interface SitePrediction {
  edition: string;
  site: {
    lat: number;
    lon: number;
    elevationM: number | null;
    /** True when the nearest station is farther than the edition's extrapolation distance. */
    extrapolation: boolean;
    nearestStationKm: number;
    extrapolationKm: number;
  };
  annual: PeriodPrediction;
  /** Twelve entries, month 1–12. */
  monthly: (PeriodPrediction & { month: number })[];
  /**
   * Predicted local meteoric water line: δ2H = slope·δ18O + intercept fitted through the 12 monthly
   * predictions, weighted by predicted monthly precipitation (lib/isotopes fitWaterLine 'pwlsr').
   */
  waterLine: { slope: number; intercept: number; slopeSE: number; interceptSE: number; r2: number; method: string };
  stations: InformingStation[];
}

export type PredictedVariable = Exclude<SurfaceVariable, "precipMm">;

/**
 * What lib/editions/predictor.ts exports (implemented with the edition pipeline):
 *   loadEditionPredictor(editionId?: string): Promise<EditionPredictor>   // default: current published edition;
 *     throws a typed "unknown-edition" error (lib/errors) for an unknown or unpublished id; cached per edition.
 */
export interface EditionPredictor {
  editionId: string;
  predict(site: SiteInput): SitePrediction;
  /** Same numbers as predict(), for many sites at once (batch lookups, POST /api/v1/predict). */
  predictMany(sites: SiteInput[]): SitePrediction[];
}
