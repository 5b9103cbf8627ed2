// Checks that interpret the δ values: evaporation, line-offset, spatial-outlier,
// station-outlier, and a note when the station's record is too short for them.
import { amountWeightedMean } from "../../isotopes/means";
import { GMWL } from "../../isotopes/excess";
import { t } from "../thresholds";
import type { CheckResult, QcContext, QcHistorySample, QcSample } from "../types";
import { fmt, num, result, worse } from "../util";

interface Values {
  d18O: number;
  d2H: number;
}

function usableHistory(ctx: QcContext): QcHistorySample[] {
  return (ctx.history ?? []).filter((h) => h && num(h.d18O) !== null && num(h.d2H) !== null);
}

/** The station's mean composition: amount-weighted when amounts are known, else plain. */
function stationMean(history: readonly QcHistorySample[]): Values | null {
  if (!history.length) return null;
  const amounts = history.map((h) => num(h.amountMm));
  const w18 = amountWeightedMean(
    history.map((h) => h.d18O),
    amounts.map((a) => (a !== null && a >= 0 ? a : null)),
  );
  const w2 = amountWeightedMean(
    history.map((h) => h.d2H),
    amounts.map((a) => (a !== null && a >= 0 ? a : null)),
  );
  if (w18.mean !== null && w2.mean !== null && w18.n >= history.length / 2) return { d18O: w18.mean, d2H: w2.mean };
  const n = history.length;
  return {
    d18O: history.reduce((a, h) => a + (h.d18O as number), 0) / n,
    d2H: history.reduce((a, h) => a + (h.d2H as number), 0) / n,
  };
}

/** `evaporation`: d < 0‰ [trade], or low d in a small sample. */
export function checkEvaporation(s: QcSample, v: Values, ctx: QcContext): CheckResult[] {
  const dx = v.d2H - 8 * v.d18O; // Dansgaard (1964)
  const amount = num(s.amountMm);
  const history = usableHistory(ctx);
  const mean = history.length >= t("stationMinN") ? stationMean(history) : null;
  let slopeFromMean: number | null = null;
  if (mean && v.d18O - mean.d18O >= t("evaporationMinShiftPermil")) {
    slopeFromMean = (v.d2H - mean.d2H) / (v.d18O - mean.d18O);
  }
  const values = {
    d18O: v.d18O,
    d2H: v.d2H,
    dExcess: dx,
    amountMm: amount,
    slopeFromStationMean: slopeFromMean,
  };
  const slopeWords =
    slopeFromMean !== null && slopeFromMean < t("evaporationSlopeMax")
      ? ` It also lies on a line of slope ${fmt(slopeFromMean, 1)} from the station's mean, the shallow slope evaporation produces (rain follows about 8).`
      : "";
  if (dx < t("evaporationDExcessMaxPermil")) {
    return [
      result(
        "evaporation",
        "warn",
        `The deuterium excess is ${fmt(dx, 1)}‰, below ${t("evaporationDExcessMaxPermil")}‰: the water may have partly evaporated in the collector or in storage.${slopeWords} ` +
          "Check the collector (oil layer or seal, tube) and how the sample was stored.",
        values,
      ),
    ];
  }
  if (dx < t("lowDExcessNotePermil") && amount !== null && amount < t("smallAmountMm")) {
    return [
      result(
        "evaporation",
        "note",
        `The deuterium excess is low (${fmt(dx, 1)}‰) in a small sample (${fmt(amount, 1)} mm); small samples evaporate easily.${slopeWords}`,
        values,
      ),
    ];
  }
  return [];
}

/** `line-offset`: far from the station's line (k·residual SD) or from the global line (~20‰) [trade]. */
export function checkLineOffset(v: Values, ctx: QcContext): CheckResult[] {
  const parts: string[] = [];
  let severity: "note" | "warn" | null = null;
  const values: Record<string, number | string | null> = { d18O: v.d18O, d2H: v.d2H };

  const line = ctx.stationLine;
  const slope = num(line?.slope);
  const intercept = num(line?.intercept);
  const sd = num(line?.residualSD);
  const n = num(line?.n);
  if (slope !== null && intercept !== null && sd !== null && sd > 0 && n !== null && n >= t("lineOffsetMinN")) {
    // Landwehr & Coplen (2006): lc-excess = δ2H − a·δ18O − b
    const lc = v.d2H - slope * v.d18O - intercept;
    const k = Math.abs(lc) / sd;
    values.lcExcess = lc;
    values.stationLineResidualSD = sd;
    values.stationLineSlope = slope;
    values.stationLineIntercept = intercept;
    values.timesResidualSD = k;
    const wording = `${fmt(Math.abs(lc), 1)}‰ ${lc < 0 ? "below" : "above"} the station's water line (δ2H = ${fmt(slope, 2)}·δ18O ${intercept < 0 ? "−" : "+"} ${fmt(Math.abs(intercept), 1)}), ${fmt(k, 1)} times the line's usual scatter of ${fmt(sd, 1)}‰`;
    if (k > t("lineOffsetWarnK")) {
      severity = "warn";
      parts.push(`The sample lies ${wording}.`);
    } else if (k > t("lineOffsetNoteK")) {
      severity = "note";
      parts.push(`The sample lies ${wording}.`);
    }
  }
  const residual = v.d2H - (GMWL.slope * v.d18O + GMWL.intercept); // Craig (1961) line
  values.gmwlResidual = residual;
  if (Math.abs(residual) > t("gmwlResidualMaxPermil")) {
    severity = severity ? worse(severity, "warn") as "note" | "warn" : "warn";
    parts.push(
      `Its δ2H is ${fmt(Math.abs(residual), 1)}‰ ${residual < 0 ? "below" : "above"} the global meteoric water line (δ2H = 8·δ18O + 10), more than the ${t("gmwlResidualMaxPermil")}‰ that usually points to an analysis or data-entry error.`,
    );
  }
  if (!severity) return [];
  return [result("line-offset", severity, `${parts.join(" ")} Check the values against the laboratory report.`, values)];
}

/** `spatial-outlier`: distance from the predicted value in SDs [trade]. */
export function checkSpatial(v: Values, ctx: QcContext): CheckResult[] {
  const pred = ctx.predicted;
  if (!pred) return [];
  const parts: string[] = [];
  let severity: "note" | "warn" | null = null;
  const values: Record<string, number | string | null> = { d18O: v.d18O, d2H: v.d2H };
  for (const [key, label, digits] of [
    ["d18O", "δ18O", 2],
    ["d2H", "δ2H", 1],
  ] as const) {
    const p = pred[key];
    const value = num(p?.value);
    const sd = num(p?.sd);
    if (value === null || sd === null || !(sd > 0)) continue;
    const z = (v[key] - value) / sd;
    values[`${key}Predicted`] = value;
    values[`${key}PredictedSd`] = sd;
    values[`${key}Z`] = z;
    if (Math.abs(z) > t("spatialWarnZ")) severity = "warn";
    else if (Math.abs(z) > t("spatialNoteZ")) severity = severity ?? "note";
    else continue;
    parts.push(
      `${label} ${fmt(v[key], digits)}‰ is ${fmt(Math.abs(z), 1)} standard deviations ${z < 0 ? "below" : "above"} the ${fmt(value, digits)}‰ ± ${fmt(sd, digits)}‰ expected at this location`,
    );
  }
  if (!severity) return [];
  return [
    result(
      "spatial-outlier",
      severity,
      `${parts.join("; ")}. This can be real (an unusual storm) or an error; check the values and the station's coordinates.`,
      values,
    ),
  ];
}

/** `station-outlier`: robust z against the station's accepted samples (Iglewicz & Hoaglin 1993 [mem]). */
export function checkStationOutlier(v: Values, ctx: QcContext): CheckResult[] {
  const history = usableHistory(ctx);
  if (history.length < t("stationMinN")) return [];
  const parts: string[] = [];
  let severity: "note" | "warn" | null = null;
  const values: Record<string, number | string | null> = { d18O: v.d18O, d2H: v.d2H, historyN: history.length };
  for (const [key, label, digits] of [
    ["d18O", "δ18O", 2],
    ["d2H", "δ2H", 1],
  ] as const) {
    const xs = history.map((h) => h[key] as number);
    const med = median(xs);
    const mad = median(xs.map((x) => Math.abs(x - med)));
    if (!(mad > 0)) continue;
    // Iglewicz & Hoaglin (1993) modified z-score: 0.6745·(x − median)/MAD
    const z = (0.6745 * (v[key] - med)) / mad;
    values[`${key}StationMedian`] = med;
    values[`${key}RobustZ`] = z;
    if (Math.abs(z) > t("stationWarnZ")) severity = "warn";
    else if (Math.abs(z) > t("stationNoteZ")) severity = severity ?? "note";
    else continue;
    parts.push(
      `${label} ${fmt(v[key], digits)}‰ is far ${z < 0 ? "below" : "above"} the station's usual values (median ${fmt(med, digits)}‰ of ${history.length} accepted samples; robust z ${fmt(z, 1)})`,
    );
  }
  if (!severity) return [];
  return [
    result("station-outlier", severity, `${parts.join("; ")}. Check the values; if they are right, a note on the weather helps the reviewer.`, values),
  ];
}

/** `history`: a note when the station's own record is too short for the record-based checks. */
export function checkHistory(ctx: QcContext): CheckResult[] {
  const n = usableHistory(ctx).length;
  const lineN = num(ctx.stationLine?.n);
  const hasLine = lineN !== null && lineN >= t("lineOffsetMinN") && num(ctx.stationLine?.residualSD) !== null;
  if (n >= t("stationMinN") && hasLine) return [];
  const skipped: string[] = [];
  if (n < t("stationMinN")) skipped.push(`comparison with the station's record (needs ${t("stationMinN")} accepted samples, has ${n})`);
  if (!hasLine) skipped.push(`comparison with the station's water line (needs a line from ${t("lineOffsetMinN")} samples)`);
  return [
    result("history", "note", `This station's record is still short, so these checks were skipped: ${skipped.join("; ")}.`, {
      historyN: n,
      stationLineN: lineN,
    }),
  ];
}

function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}
