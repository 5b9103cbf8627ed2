// Every threshold the checks use, in one table, each with its source:
// [pub] published, [trade] common practice, [mem] recalled and not confirmed.

export interface Threshold {
  value: number | string;
  unit: string;
  /** Which check uses it. */
  check: string;
  source: string;
}

export const CHECK_THRESHOLDS = Object.freeze({
  d18OMinPermil: {
    value: -60,
    unit: "‰",
    check: "range",
    source: "[trade] natural precipitation spans about −60 to +10‰ δ18O",
  },
  d18OMaxPermil: { value: 10, unit: "‰", check: "range", source: "[trade] as above" },
  d2HMinPermil: {
    value: -480,
    unit: "‰",
    check: "range",
    source: "[trade] natural precipitation spans about −480 to +60‰ δ2H",
  },
  d2HMaxPermil: { value: 60, unit: "‰", check: "range", source: "[trade] as above" },
  plausibleDExcessMinPermil: {
    value: -40,
    unit: "‰",
    check: "swapped, units",
    source: "[trade] widest d-excess band seen in precipitation; used only to recognise swapped or rescaled values",
  },
  plausibleDExcessMaxPermil: { value: 50, unit: "‰", check: "swapped, units", source: "[trade] as above" },
  typicalDExcessMinPermil: {
    value: -10,
    unit: "‰",
    check: "swapped, units, sign",
    source: "[trade] d-excess of ordinary precipitation; a corrected value must land here",
  },
  typicalDExcessMaxPermil: { value: 30, unit: "‰", check: "swapped, units, sign", source: "[trade] as above" },
  fractionMinAbsPermilAfterScaling: {
    value: 1,
    unit: "‰",
    check: "units",
    source: "[trade] ×1000 must give |δ18O| ≥ 1‰ before we call a value a fraction",
  },
  ratio18OMin: {
    value: 1.8e-3,
    unit: "ratio",
    check: "units",
    source: "[pub] VSMOW ¹⁸O/¹⁶O = 2005.20·10⁻⁶ (IAEA sheet); [trade] natural δ18O of −60…+10‰ keeps precipitation within about −6%/+1% of it",
  },
  ratio18OMax: { value: 2.1e-3, unit: "ratio", check: "units", source: "[pub] as above" },
  ratio2HMin: {
    value: 7e-5,
    unit: "ratio",
    check: "units",
    source: "[pub] VSMOW ²H/¹H = 155.76·10⁻⁶ (IAEA sheet); [trade] natural δ2H of −480…+60‰ keeps precipitation within about −48%/+6% of it",
  },
  ratio2HMax: { value: 1.7e-4, unit: "ratio", check: "units", source: "[pub] as above" },
  signMinD18OPermil: {
    value: 2,
    unit: "‰",
    check: "sign",
    source: "[trade] both δ values positive and δ18O above this suggests dropped minus signs",
  },
  futureToleranceDays: {
    value: 1,
    unit: "days",
    check: "period",
    source: "[trade] the end date is exclusive, so a sample collected today ends tomorrow",
  },
  oldestStartDate: {
    value: "1950-01-01",
    unit: "date",
    check: "period",
    source: "[trade] routine precipitation isotope records begin in the 1950s–60s; earlier dates are usually typing errors",
  },
  maxPeriodDaysWarn: {
    value: 62,
    unit: "days",
    check: "period",
    source: "[trade] longer than two months cannot stand for one month in the station means",
  },
  maxPeriodDaysFail: {
    value: 366,
    unit: "days",
    check: "period",
    source: "[trade] a collection period longer than a year is not a precipitation sample",
  },
  monthlyMinDays: {
    value: 25,
    unit: "days",
    check: "period",
    source: "[trade] a monthly station's period shorter than this is unusual",
  },
  monthlyMaxDays: {
    value: 38,
    unit: "days",
    check: "period",
    source: "[trade] a monthly station's period longer than this is unusual",
  },
  gapNoteDays: {
    value: 3,
    unit: "days",
    check: "period",
    source: "[trade] unsampled days between consecutive periods worth pointing out",
  },
  maxAmountMmPerDayWarn: {
    value: 300,
    unit: "mm/day",
    check: "range",
    source: "[trade] an average above this over the whole period is exceptional; check the amount",
  },
  maxAmountMmPerDayFail: {
    value: 1825,
    unit: "mm/day",
    check: "range",
    source: "[mem] world 24-hour rainfall record, 1825 mm (La Réunion, January 1966, WMO)",
  },
  precisionMaxD18OPermil: {
    value: 0.3,
    unit: "‰ (1σ)",
    check: "precision",
    source: "[trade] laboratories quote ≤ 0.3‰ δ18O as an acceptance limit (typical 0.1–0.2‰)",
  },
  precisionMaxD2HPermil: {
    value: 2.0,
    unit: "‰ (1σ)",
    check: "precision",
    source: "[trade] laboratories quote ≤ 2.0‰ δ2H as an acceptance limit (typical 1–2‰)",
  },
  evaporationDExcessMaxPermil: {
    value: 0,
    unit: "‰",
    check: "evaporation",
    source: "[trade] d < 0‰ suggests evaporation or loss during sampling",
  },
  lowDExcessNotePermil: {
    value: 5,
    unit: "‰",
    check: "evaporation",
    source: "[trade] low d-excess worth a note when the amount is also small",
  },
  smallAmountMm: {
    value: 5,
    unit: "mm",
    check: "evaporation",
    source: "[trade] small samples evaporate most easily in the collector",
  },
  evaporationSlopeMax: {
    value: 6.5,
    unit: "slope",
    check: "evaporation",
    source: "[trade] evaporation lines have slopes below 8, commonly 4–6",
  },
  evaporationMinShiftPermil: {
    value: 1,
    unit: "‰",
    check: "evaporation",
    source: "[trade] δ18O shift above the station mean needed before a slope from the mean means anything",
  },
  lineOffsetNoteK: {
    value: 2,
    unit: "× residual SD",
    check: "line-offset",
    source: "[trade] |lc-excess| beyond 2–3 times the station line's residual SD",
  },
  lineOffsetWarnK: { value: 3, unit: "× residual SD", check: "line-offset", source: "[trade] as above" },
  lineOffsetMinN: {
    value: 8,
    unit: "samples",
    check: "line-offset, history",
    source: "[trade] fewest samples behind a station line before it is used to judge a sample",
  },
  gmwlResidualMaxPermil: {
    value: 20,
    unit: "‰",
    check: "line-offset",
    source: "[trade] a δ2H residual from the global line (δ2H = 8·δ18O + 10, Craig 1961) beyond ~20‰ suggests an analysis or data-entry error",
  },
  spatialNoteZ: {
    value: 3,
    unit: "SD",
    check: "spatial-outlier",
    source: "[trade] distance from the predicted value in standard deviations",
  },
  spatialWarnZ: { value: 4, unit: "SD", check: "spatial-outlier", source: "[trade] as above" },
  stationMinN: {
    value: 12,
    unit: "samples",
    check: "station-outlier, history",
    source: "[trade] a year of monthly samples before the station's own record is used to judge a sample",
  },
  stationNoteZ: {
    value: 3.5,
    unit: "robust z",
    check: "station-outlier",
    source: "[mem] modified z-score 0.6745·(x − median)/MAD above 3.5 — Iglewicz & Hoaglin (1993)",
  },
  stationWarnZ: { value: 5, unit: "robust z", check: "station-outlier", source: "[trade] a clearly larger margin" },
} satisfies Record<string, Threshold>);

export type ThresholdKey = keyof typeof CHECK_THRESHOLDS;

/** Numeric value of a threshold. */
export function t(key: ThresholdKey): number {
  return CHECK_THRESHOLDS[key].value as number;
}
