/**
 * Rainprint's geostatistics engine (pure TypeScript, no framework, no database, no worker_threads):
 * distances, neighbour search, variograms, ordinary/universal kriging, cross-validation, model
 * storage. Safe to import from Next.js server code. The multi-threaded grid runner lives in
 * `./grid-runner` (Node scripts and the job worker only).
 */
export { GeostatsError, isGeostatsError, type GeostatsErrorCode } from "./errors";
export {
  WGS84_A_KM,
  WGS84_F,
  type CoordinateSystem,
  greatCircleKm,
  planarDistance,
  distance,
  normalizeLon,
} from "./distance";
export {
  StationSet,
  NeighbourSearcher,
  createStationSet,
  type StationSetOptions,
  type NeighbourTable,
  type PointsInput,
} from "./stations";
export {
  VARIOGRAM_MODELS,
  type VariogramModel,
  type VariogramModelType,
  type EmpiricalVariogram,
  type EmpiricalVariogramOptions,
  checkVariogram,
  unitStructure,
  semivariance,
  covariance,
  empiricalVariogram,
} from "./variogram";
export { type FitMethod, type FitVariogramOptions, type VariogramFit, fitVariogram, fitVariogramBest } from "./fit";
export {
  KrigingModel,
  KrigingEvaluator,
  createKrigingModel,
  type KrigingModelOptions,
  type KrigingPrediction,
  type NeighbourWeight,
  type PredictManyOptions,
  type PredictionPlanes,
} from "./kriging";
export { crossValidate, type CrossValidation } from "./crossval";
export { SurfaceBatch, predictSurfaces, type SurfaceOutput, type TargetSource } from "./batch";
export { type GridSpec, checkGrid, gridCellCount, gridCellCentre, gridCellCentres, gridFromBounds } from "./grid";
export {
  MODEL_FORMAT,
  MODEL_FORMAT_VERSION,
  type KrigingModelHeader,
  type SerializedKrigingModel,
  type KrigingModelJSON,
  serializeKrigingModel,
  krigingModelToJSON,
  restoreKrigingModel,
} from "./serialize";
