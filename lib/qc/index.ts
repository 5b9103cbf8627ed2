// The checks run on every incoming sample: pure functions over a sample and its context.
// They never throw on odd data; they report. Thresholds: CHECK_THRESHOLDS; explanations: CHECK_CATALOGUE.
import { checkValues } from "./checks/values";
import { checkAmount, checkPeriod, checkRepeatedValues } from "./checks/period";
import { checkPrecision, checkScale } from "./checks/lab";
import { checkEvaporation, checkHistory, checkLineOffset, checkSpatial, checkStationOutlier } from "./checks/station";
import type { CheckCode, CheckResult, QcContext, QcSample, Severity } from "./types";
import { num, result, severityRank } from "./util";

export { CHECK_THRESHOLDS } from "./thresholds";
export type { Threshold, ThresholdKey } from "./thresholds";
export { CHECK_CATALOGUE } from "./catalogue";
export type { CheckInfo } from "./catalogue";
export { SEVERITIES, CHECK_CODES, qcSampleOf } from "./types";
export type {
  CheckCode,
  CheckResult,
  Severity,
  QcSample,
  QcContext,
  QcHistorySample,
  QcStoredPeriod,
  QcPrediction,
} from "./types";

/**
 * Run every check on one sample. Results come in a fixed order (values, period, amount,
 * laboratory, interpretation) and include only findings; a clean sample gives [] or notes.
 * When the δ values are missing, in the wrong units, swapped, possibly sign-less or out of range, the checks
 * that interpret them (evaporation, line-offset, spatial-outlier, station-outlier,
 * repeated values) are skipped.
 */
export function runChecks(sample: QcSample, context: QcContext): CheckResult[] {
  const s: QcSample = sample && typeof sample === "object" ? sample : {};
  const ctx: QcContext = context && typeof context === "object" ? context : { today: "" };
  const out: CheckResult[] = [];

  const values = guard("missing", () => checkValues(s), { results: [], usable: false });
  out.push(...values.results);
  const period = guard("period", () => checkPeriod(s, ctx), { results: [], period: null });
  out.push(...period.results);
  const hasIsotopes = num(s.d18O) !== null || num(s.d2H) !== null;
  out.push(...guard("amount-missing", () => checkAmount(s, period.period, hasIsotopes), []));
  out.push(...guard("precision", () => checkPrecision(s, ctx), []));
  out.push(...guard("scale", () => checkScale(s), []));

  if (values.usable) {
    const v = { d18O: s.d18O as number, d2H: s.d2H as number };
    out.push(...guard("duplicate", () => checkRepeatedValues(s, ctx), []));
    out.push(...guard("evaporation", () => checkEvaporation(s, v, ctx), []));
    out.push(...guard("line-offset", () => checkLineOffset(v, ctx), []));
    out.push(...guard("spatial-outlier", () => checkSpatial(v, ctx), []));
    out.push(...guard("station-outlier", () => checkStationOutlier(v, ctx), []));
    out.push(...guard("history", () => checkHistory(ctx), []));
  }
  if (!isIsoDate(ctx.today)) {
    out.push(
      result("period", "note", "Today's date was not supplied to the checks, so future dates could not be checked.", {
        today: typeof ctx.today === "string" ? ctx.today : null,
      }),
    );
  }
  return out;

  // A check that fails unexpectedly reports itself instead of throwing.
  function guard<T>(code: CheckCode, fn: () => T, fallback: T): T {
    try {
      return fn();
    } catch (e) {
      out.push(
        result(code, "warn", `This check could not run on this sample (${e instanceof Error ? e.message : String(e)}). A reviewer should look at it.`, {}),
      );
      return fallback;
    }
  }
}

/**
 * Run the checks on every sample of a batch; each sample sees the others as
 * `otherBatchSamples`. Returns one result list per sample, in order.
 */
export function runBatchChecks(samples: readonly QcSample[], context: Omit<QcContext, "otherBatchSamples">): CheckResult[][] {
  const list = Array.isArray(samples) ? samples : [];
  return list.map((s, i) =>
    runChecks(s, { ...context, otherBatchSamples: list.filter((_, j) => j !== i) }),
  );
}

/** The most serious severity among the results, or null when there are none. */
export function worstSeverity(results: readonly CheckResult[]): Severity | null {
  let worst: Severity | null = null;
  for (const r of results ?? []) {
    if (!r || !["note", "warn", "fail"].includes(r.severity)) continue;
    if (worst === null || severityRank(r.severity) > severityRank(worst)) worst = r.severity;
  }
  return worst;
}

function isIsoDate(v: unknown): boolean {
  return typeof v === "string" && /^\d{4}-\d{2}-\d{2}$/.test(v);
}
