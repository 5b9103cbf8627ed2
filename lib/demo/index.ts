// lib/demo: the synthetic demo scenario (invented stations, people, organisations and
// samples from a toy model), pure and deterministic from a seed. Everything it makes is
// "synthetic demo data" and must be labelled so wherever it is shown.

export { generateDemoScenario, DEFAULT_DEMO_SEED, DEMO_CONTRIBUTOR_OWNER, DEMO_SCALE, MIN_COAST_KM, type GenerateOptions } from "./scenario";
export { REGIONS, regionCount, TEST_PROFILE_SHARE, type RegionSpec } from "./regions";
export { makeTerrain, type Terrain } from "./terrain";
export {
  stationClimate,
  makeFields,
  monthValues,
  latitudeTermPermil,
  BW_A,
  BW_B,
  BW_D,
  LAPSE_PERMIL_PER_M,
  CONTINENTAL_PERMIL_PER_1000KM,
  AMOUNT_PERMIL_PER_MM,
  D_EXCESS_MEAN,
} from "./model";
export { Rng, mulberry32, hash32 } from "./prng";
export * from "./types";
