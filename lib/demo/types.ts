// Types of the synthetic demo scenario. Plain objects only: no ids from the database,
// no Dates (ISO date strings), so the same seed gives deep-equal output everywhere.

import type { COLLECTOR_TYPES } from "@/db/schema";

export type CollectorType = (typeof COLLECTOR_TYPES)[number];

export const CONTINENTS = ["north-america", "south-america", "europe", "africa", "asia", "oceania"] as const;
export type Continent = (typeof CONTINENTS)[number];

export type DemoProfile = "full" | "test";

/**
 * The kinds of deliberately bad samples. Each names what is wrong, so tests can assert
 * later that the intake checks trip on them.
 */
export const BAD_SAMPLE_KINDS = [
  /** Evaporated in the collector: enriched along a slope-5 line, d-excess below 0. */
  "evaporated",
  /** δ18O and δ2H entered in each other's columns. */
  "swapped-columns",
  /** Same station and collection period as a sample already accepted. */
  "duplicate",
  /** Per-mil values entered as fractions (e.g. −0.0081 instead of −8.1). */
  "wrong-units",
  /** Collection end date before its start date. */
  "end-before-start",
  /** Collection period in the future. */
  "future-date",
  /** δ values outside what natural precipitation shows (δ18O −60…+10‰, δ2H −480…+60‰). */
  "out-of-range",
  /** Precipitation amount left empty. */
  "amount-missing",
  /** Analytical uncertainty far above laboratory acceptance limits (0.3‰ / 2‰). */
  "imprecise",
  /** On the station's line but ≥ 9‰ lighter than that month and far below the station's record. */
  "outlier",
  /** δ2H mistyped by tens of per mil: far off the meteoric line. */
  "mistyped",
] as const;
export type BadSampleKind = (typeof BAD_SAMPLE_KINDS)[number];

export interface DemoOrganization {
  key: string;
  name: string;
  slug: string;
  kind: "university" | "agency" | "volunteer network" | "trust";
}

export interface DemoPerson {
  key: string;
  name: string;
  email: string;
  organizationKey: string;
}

export interface DemoLaboratory {
  key: string;
  name: string;
  method: "laser spectroscopy" | "IRMS";
  /** Range of the 1σ analytical uncertainty this laboratory reports, ‰. */
  d18OSdPermil: [number, number];
  d2HSdPermil: [number, number];
  referenceWaters: string;
}

export interface DemoStation {
  /** Invented code, RP-<continent>-<number>, e.g. RP-EUR-007. */
  code: string;
  name: string;
  lon: number;
  lat: number;
  /** From the invented terrain function (lib/demo/terrain.ts), metres. */
  elevationM: number;
  continent: Continent;
  /** Placement group (see lib/demo/regions.ts). */
  region: string;
  /** Whether the region is one of the dense clusters. */
  dense: boolean;
  collectorType: CollectorType;
  samplingInterval: "monthly";
  organizationKey: string;
  /** A DemoPerson key, or DEMO_CONTRIBUTOR_OWNER for the demo contributor account. */
  ownerKey: string;
  /** First day of the station's record (ISO date; the test profile keeps only its last three years of samples). */
  startDate: string;
  coastDistanceKm: number;
  laboratoryKey: string;
  notes: string;
}

export interface DemoBatch {
  key: string;
  ownerKey: string;
  /** 'decided' for accepted history, 'queued' for the review desk. */
  status: "decided" | "queued";
  submittedOn: string;
  decidedOn: string | null;
  note: string;
}

export interface DemoSample {
  key: string;
  stationCode: string;
  batchKey: string;
  status: "accepted" | "pending";
  /** Collection period [startDate, endDate), ISO dates. */
  startDate: string;
  endDate: string;
  amountMm: number | null;
  d18O: number;
  d2H: number;
  d18OSd: number;
  d2HSd: number;
  method: string;
  laboratory: string;
  scale: string;
  referenceWaters: string;
  notes: string | null;
  /** The intended problem of a deliberately bad sample; null for a good one. */
  badKind: BadSampleKind | null;
  /** For a 'duplicate': the key of the accepted sample it repeats. */
  duplicateOf?: string;
}

export interface DemoScenario {
  meta: {
    label: "synthetic demo data";
    seed: number;
    profile: DemoProfile;
    /** First and last month of accepted samples (YYYY-MM). */
    firstMonth: string;
    lastAcceptedMonth: string;
  };
  organizations: DemoOrganization[];
  people: DemoPerson[];
  laboratories: DemoLaboratory[];
  stations: DemoStation[];
  batches: DemoBatch[];
  samples: DemoSample[];
}
