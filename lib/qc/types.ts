// Shapes shared by the sample checks. δ in ‰ vs VSMOW, amounts in mm, dates ISO YYYY-MM-DD
// with collection periods [start, end).

export const SEVERITIES = ["note", "warn", "fail"] as const;
export type Severity = (typeof SEVERITIES)[number];

export const CHECK_CODES = [
  "missing",
  "units",
  "swapped",
  "sign",
  "range",
  "period",
  "duplicate",
  "amount-missing",
  "amount-zero",
  "precision",
  "scale",
  "evaporation",
  "line-offset",
  "spatial-outlier",
  "station-outlier",
  "history",
] as const;
export type CheckCode = (typeof CHECK_CODES)[number];

/** One finding about one sample. */
export interface CheckResult {
  code: CheckCode;
  severity: Severity;
  /** Plain words for the contributor, with the numbers. */
  message: string;
  /** The numbers behind the finding (‰, mm, days, …; names say which). */
  values: Record<string, number | string | null>;
}

/**
 * A sample as submitted. Every field may be missing or odd (the checks report, never throw);
 * the types say what a well-formed sample holds.
 */
export interface QcSample {
  /** Label for messages, e.g. "row 7" (optional). */
  ref?: string | null;
  stationId?: string | null;
  startDate?: string | null;
  endDate?: string | null;
  amountMm?: number | null;
  d18O?: number | null;
  d2H?: number | null;
  /** Stated 1σ analytical uncertainty of this sample, ‰. */
  d18OSd?: number | null;
  d2HSd?: number | null;
  method?: string | null;
  laboratory?: string | null;
  /** Normalisation scale as entered, e.g. "VSMOW-SLAP". */
  scale?: string | null;
  /** Reference waters used for normalisation, as entered. */
  referenceWaters?: string | null;
}

/** An accepted sample of the station. */
export interface QcHistorySample {
  startDate: string;
  endDate: string;
  d18O: number | null;
  d2H: number | null;
  amountMm?: number | null;
}

/** A collection period already stored for the station (pending or accepted). */
export interface QcStoredPeriod {
  startDate: string;
  endDate: string;
  /** Label for messages (e.g. the sample id or "accepted 2024-03"). */
  ref?: string | null;
}

/** A predicted value for one sample at the station, with the SD expected for a single sample. */
export interface QcPrediction {
  /** ‰ */
  value: number;
  /** ‰; should include sample-to-sample variability, not only the mean's uncertainty. */
  sd: number;
}

export interface QcContext {
  /** Today's date (ISO YYYY-MM-DD), injected so results are reproducible. */
  today: string;
  station?: {
    lat: number;
    lon: number;
    elevationM: number;
    samplingInterval?: string | null;
  } | null;
  /** The station's accepted samples. */
  history?: readonly QcHistorySample[];
  /** The station's fitted water line, its residual SD (‰) and number of samples. */
  stationLine?: { slope: number; intercept: number; residualSD: number; n: number } | null;
  /** Other samples in the same batch (not this one). */
  otherBatchSamples?: readonly QcSample[];
  /** Periods already stored for this station. */
  storedPeriods?: readonly QcStoredPeriod[];
  /** The laboratory's stated 1σ precision, ‰. */
  labPrecision?: { d18O?: number | null; d2H?: number | null } | null;
  /** Predicted values at the station (e.g. from the current edition). */
  predicted?: { d18O?: QcPrediction | null; d2H?: QcPrediction | null } | null;
}

/** The submitted fields the checks read, picked from any sample-shaped record (a parsed row, a stored or a demo sample). */
export function qcSampleOf(s: Omit<QcSample, "ref" | "stationId">, stationId: string | null, ref: string | null): QcSample {
  return {
    ref,
    stationId,
    startDate: s.startDate,
    endDate: s.endDate,
    amountMm: s.amountMm,
    d18O: s.d18O,
    d2H: s.d2H,
    d18OSd: s.d18OSd,
    d2HSd: s.d2HSd,
    method: s.method,
    laboratory: s.laboratory,
    scale: s.scale,
    referenceWaters: s.referenceWaters,
  };
}
