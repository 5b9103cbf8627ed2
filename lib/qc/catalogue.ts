// The checks explained, for the interface's help and the developer guide.
import type { CheckCode, Severity } from "./types";

export interface CheckInfo {
  title: string;
  /** What the check looks at and why, in plain words. */
  explanation: string;
  /** The severities this check can give. */
  severities: readonly Severity[];
}

export const CHECK_CATALOGUE: Readonly<Record<CheckCode, CheckInfo>> = Object.freeze({
  missing: {
    title: "Isotope value missing",
    explanation:
      "Both δ18O and δ2H are needed. A sample without one of them cannot be used in station means or maps.",
    severities: ["fail"],
  },
  units: {
    title: "Values in the wrong units",
    explanation:
      "δ values are reported in per mil (‰). Values like −0.0081 are usually per mil divided by 1000 (a fraction); values near 0.002 and 0.00015 are raw isotope ratios rather than δ values.",
    severities: ["fail"],
  },
  swapped: {
    title: "δ18O and δ2H swapped",
    explanation:
      "In precipitation δ2H is roughly eight times δ18O. When the two numbers only make sense the other way round, the columns were probably swapped.",
    severities: ["fail"],
  },
  sign: {
    title: "Minus signs possibly missing",
    explanation:
      "Most precipitation has negative δ values. Two clearly positive values that look ordinary once negated may have lost their minus signs.",
    severities: ["warn"],
  },
  range: {
    title: "Value outside the natural range",
    explanation:
      "δ values and precipitation amounts outside what nature produces point to a typing, unit or instrument error.",
    severities: ["warn", "fail"],
  },
  period: {
    title: "Collection period",
    explanation:
      "The period must be a real span of days that has already ended, of a sensible length, and must not overlap a period already stored for the station. Gaps between periods are pointed out.",
    severities: ["note", "warn", "fail"],
  },
  duplicate: {
    title: "Possible duplicate",
    explanation:
      "The same station and period twice, or exactly the same δ values as another sample, usually means a row was entered twice or copied.",
    severities: ["warn", "fail"],
  },
  "amount-missing": {
    title: "Precipitation amount missing",
    explanation:
      "Station means are weighted by the amount of precipitation. A sample without an amount cannot be weighted and is left out of the means.",
    severities: ["warn"],
  },
  "amount-zero": {
    title: "Zero precipitation with a sample",
    explanation:
      "A sample cannot be collected from 0 mm of precipitation. Enter the measured amount, or a small amount for a trace.",
    severities: ["warn"],
  },
  precision: {
    title: "Analytical precision",
    explanation:
      "The stated uncertainty of the analysis should be within the usual acceptance limits (about 0.3‰ for δ18O and 2‰ for δ2H). Without a stated uncertainty the data are harder to judge.",
    severities: ["note", "warn"],
  },
  scale: {
    title: "Normalisation scale",
    explanation:
      "Values are only comparable on the VSMOW–SLAP scale, normalised with two reference waters. The scale and the reference waters used should be stated.",
    severities: ["note", "warn", "fail"],
  },
  evaporation: {
    title: "Signs of evaporation",
    explanation:
      "A deuterium excess below 0‰ (or low, in a small sample) suggests the water partly evaporated in the collector or in storage, which makes it heavier than the rain was.",
    severities: ["note", "warn"],
  },
  "line-offset": {
    title: "Far from the water line",
    explanation:
      "The sample lies unusually far from the station's own water line (in units of the line's scatter) or from the global meteoric water line, which can mean an analysis or data-entry error.",
    severities: ["note", "warn"],
  },
  "spatial-outlier": {
    title: "Unlike the surrounding area",
    explanation:
      "The sample differs from the value predicted for the station's location by several standard deviations.",
    severities: ["note", "warn"],
  },
  "station-outlier": {
    title: "Unlike the station's record",
    explanation:
      "The sample differs strongly from the station's own accepted samples (robust z-score against their median).",
    severities: ["note", "warn"],
  },
  history: {
    title: "Short station record",
    explanation:
      "The station has too few accepted samples for the checks that compare with its own record; those checks were skipped.",
    severities: ["note"],
  },
});
