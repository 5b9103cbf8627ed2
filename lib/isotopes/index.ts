// Rainprint's isotope science core: pure functions, no framework, no database.
// δ values in ‰ vs VSMOW, temperatures in °C, humidity as a fraction 0–1, amounts in mm.
// Each formula names its published source beside it; DEVELOPERS.md lists them all.

export { dExcess, lcExcess, GMWL, GMWL_AMOUNT_WEIGHTED_1993, D_EXCESS_SLOPE } from "./excess";
export type { WaterLine, IsotopePair } from "./excess";

export { fitWaterLine, WATER_LINE_METHODS, WATER_LINE_METHOD_INFO, MIN_LINE_SAMPLES } from "./water-line";
export type { WaterLineMethod, WaterLineSample, WaterLineFit } from "./water-line";

export { amountWeightedMean } from "./means";
export type { WeightedMean } from "./means";

export {
  aggregateStationMeans,
  STATION_MEAN_RULES,
  COVERAGE_FLAG_TEXT,
  defaultStationMeanRules,
} from "./station-means";
export type {
  StationSample,
  StationMeans,
  PeriodMean,
  PeriodCoverage,
  YearCoverage,
  CoverageFlag,
  StationMeanRuleKey,
  StationMeanRuleValues,
} from "./station-means";

export {
  equilibriumAlpha,
  equilibriumEpsilonPermil,
  kineticEnrichment,
  kineticConstant,
  kineticConstantFromDiffusivity,
  MERLIVAT_DIFFUSIVITY_RATIOS,
  GONFIANTINI_KINETIC_CONSTANTS_PERMIL,
  EQUILIBRIUM_RANGE_C,
  ISOTOPES,
  KELVIN,
} from "./fractionation";
export type { Isotope, EquilibriumSource, KineticMethod } from "./fractionation";

export { craigGordon, equilibriumVapour } from "./craig-gordon";
export type { CraigGordonParams, CraigGordonResult, CraigGordonIsotope } from "./craig-gordon";

export { oceanVapourClosure, OCEAN_KINETIC_FACTORS_PERMIL, SEAWATER } from "./ocean-vapour";
export type { OceanVapourParams, OceanVapourResult } from "./ocean-vapour";

export { rayleigh } from "./rayleigh";
export type { RayleighParams, RayleighResult } from "./rayleigh";

export { normalizeTwoPoint, twoPointScale, REFERENCE_WATERS, VSMOW_RATIOS } from "./normalize";
export type { ReferenceReading, ReferenceWater } from "./normalize";

export { sourceWaterFromEvaporationLine, mulberry32 } from "./source-water";
export type { SourceWaterResult, SourceWaterOptions, MeteoricLineInput } from "./source-water";

export { parseIsoDay, isoFromDay, yearMonthOfDay, daysInMonth } from "./dates";
