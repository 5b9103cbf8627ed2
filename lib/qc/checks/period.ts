// Checks on the collection period and the precipitation amount, and duplicates.
import { t, CHECK_THRESHOLDS } from "../thresholds";
import type { CheckResult, QcContext, QcSample } from "../types";
import { day, fmt, given, nameOf, num, result, shown } from "../util";
import { isoFromDay, parseIsoDay } from "../../isotopes/dates";

export interface ParsedPeriod {
  start: number;
  end: number;
  days: number;
}

/** `period` (and `duplicate` for periods); returns the parsed period when it has a positive length. */
export function checkPeriod(s: QcSample, ctx: QcContext): { results: CheckResult[]; period: ParsedPeriod | null } {
  const out: CheckResult[] = [];
  const start = day(s.startDate);
  const end = day(s.endDate);
  const problems: string[] = [];
  if (start === null)
    problems.push(given(s.startDate) ? `the start date ${shown(s.startDate)} is not a valid date` : "the start date is missing");
  if (end === null)
    problems.push(given(s.endDate) ? `the end date ${shown(s.endDate)} is not a valid date` : "the end date is missing");
  if (start === null || end === null) {
    out.push(
      result("period", "fail", `${capital(problems.join(" and "))}. Enter dates as YYYY-MM-DD (e.g. 2024-03-01).`, {
        startDate: typeof s.startDate === "string" ? s.startDate : null,
        endDate: typeof s.endDate === "string" ? s.endDate : null,
      }),
    );
    return { results: out, period: null };
  }
  const days = end - start;
  const values = { startDate: s.startDate as string, endDate: s.endDate as string, days };
  if (days <= 0) {
    out.push(
      result(
        "period",
        "fail",
        `The end date ${s.endDate} is ${days === 0 ? "the same as" : "before"} the start date ${s.startDate}. ` +
          "The period runs from the first day of collection to the day after the last (so March is 2024-03-01 to 2024-04-01).",
        values,
      ),
    );
    return { results: out, period: null };
  }

  const today = parseIsoDay(ctx.today);
  if (today !== null) {
    if (start > today) {
      out.push(result("period", "fail", `The period starts on ${s.startDate}, after today (${ctx.today}). Check the year.`, values));
    } else if (end > today + t("futureToleranceDays")) {
      out.push(
        result(
          "period",
          "fail",
          `The period ends on ${s.endDate}, after today (${ctx.today}); a sample can only be submitted once collected. Check the end date.`,
          values,
        ),
      );
    }
  }
  const oldest = parseIsoDay(CHECK_THRESHOLDS.oldestStartDate.value) as number;
  if (start < oldest) {
    out.push(
      result(
        "period",
        "warn",
        `The period starts on ${s.startDate}, before ${CHECK_THRESHOLDS.oldestStartDate.value}. Check the year; if the sample is really this old, say so in the notes.`,
        values,
      ),
    );
  }
  if (days > t("maxPeriodDaysFail")) {
    out.push(
      result(
        "period",
        "fail",
        `The period is ${days} days long, more than ${t("maxPeriodDaysFail")} days. Check the dates; a precipitation sample covers days to weeks, at most a few months.`,
        values,
      ),
    );
  } else if (days > t("maxPeriodDaysWarn")) {
    out.push(
      result(
        "period",
        "warn",
        `The period is ${days} days long, more than ${t("maxPeriodDaysWarn")} days, so it cannot stand for one month in the station means. Check the dates.`,
        values,
      ),
    );
  }
  const interval = ctx.station?.samplingInterval;
  if (interval === "monthly" && (days < t("monthlyMinDays") || days > t("monthlyMaxDays")) && days <= t("maxPeriodDaysWarn")) {
    out.push(
      result(
        "period",
        "note",
        `The station collects monthly, but this period is ${days} days (expected ${t("monthlyMinDays")}–${t("monthlyMaxDays")}). Check the dates.`,
        values,
      ),
    );
  }

  // Against periods already stored for the station.
  const stored = (ctx.storedPeriods ?? [])
    .map((p) => ({ p, start: parseIsoDay(p?.startDate), end: parseIsoDay(p?.endDate) }))
    .filter((q): q is { p: NonNullable<typeof q.p>; start: number; end: number } => q.start !== null && q.end !== null && q.end > q.start);
  for (const q of stored) {
    const label = q.p.ref ? ` (${q.p.ref})` : "";
    if (q.start === start && q.end === end) {
      out.push(
        result(
          "duplicate",
          "fail",
          `A sample for ${s.startDate} to ${s.endDate} is already stored for this station${label}. ` +
            "If this one replaces it, use a resubmission instead of a new sample.",
          values,
        ),
      );
      continue;
    }
    const overlap = Math.min(end, q.end) - Math.max(start, q.start);
    if (overlap > 0) {
      out.push(
        result(
          "period",
          "warn",
          `The period overlaps a stored sample${label} from ${q.p.startDate} to ${q.p.endDate} by ${overlap} day${overlap === 1 ? "" : "s"}; ` +
            "the same rain would be counted twice. Check the dates.",
          { ...values, overlapDays: overlap, storedStart: q.p.startDate, storedEnd: q.p.endDate },
        ),
      );
    }
  }
  // A gap since the previous period (stored, or earlier in this batch for the same station).
  const batchPeriods = (ctx.otherBatchSamples ?? [])
    .filter((o) => o && sameStation(s, o))
    .map((o) => ({ start: day(o.startDate), end: day(o.endDate) }))
    .filter((q): q is { start: number; end: number } => q.start !== null && q.end !== null && q.end > q.start);
  const known = [...stored.map((q) => ({ start: q.start, end: q.end })), ...batchPeriods];
  const before = known.filter((q) => q.end <= start).sort((a, b) => b.end - a.end)[0];
  const overlapsAny = known.some((q) => Math.min(end, q.end) - Math.max(start, q.start) > 0);
  if (stored.length && before && !overlapsAny) {
    const gap = start - before.end;
    if (gap > t("gapNoteDays") && gap <= 366) {
      out.push(
        result(
          "period",
          "note",
          `There are ${gap} days between the previous sample (ending ${isoFromDay(before.end)}) and this one; ` +
            "rain in that gap was not sampled. If that is right, nothing needs doing.",
          { ...values, gapDays: gap },
        ),
      );
    }
  }

  // Against other samples in the same batch for the same station.
  for (const o of ctx.otherBatchSamples ?? []) {
    if (!o || !sameStation(s, o)) continue;
    const os = day(o.startDate);
    const oe = day(o.endDate);
    if (os === null || oe === null || oe <= os) continue;
    if (os === start && oe === end) {
      out.push(
        result(
          "duplicate",
          "fail",
          `This batch has another sample for the same station and period (${nameOf(o)}). Remove one of them.`,
          { ...values, other: nameOf(o) },
        ),
      );
    } else {
      const overlap = Math.min(end, oe) - Math.max(start, os);
      if (overlap > 0) {
        out.push(
          result(
            "period",
            "warn",
            `The period overlaps ${nameOf(o)} in this batch by ${overlap} day${overlap === 1 ? "" : "s"}. Check the dates.`,
            { ...values, overlapDays: overlap, other: nameOf(o) },
          ),
        );
      }
    }
  }
  return { results: out, period: { start, end, days } };
}

/** `amount-missing`, `amount-zero` and `range` for amounts. */
export function checkAmount(s: QcSample, period: ParsedPeriod | null, hasIsotopes: boolean): CheckResult[] {
  const out: CheckResult[] = [];
  const p = num(s.amountMm);
  if (p === null) {
    out.push(
      result(
        "amount-missing",
        "warn",
        given(s.amountMm)
          ? `The precipitation amount ${shown(s.amountMm)} is not a number. Enter it in millimetres.`
          : "No precipitation amount is given. Without it the sample cannot be weighted in the station means; add the amount in millimetres if it was measured.",
        { amountMm: null },
      ),
    );
    return out;
  }
  if (p < 0) {
    out.push(
      result("range", "fail", `The precipitation amount ${fmt(p, 1)} mm is negative. Enter the amount collected, 0 mm or more.`, {
        amountMm: p,
      }),
    );
    return out;
  }
  if (p === 0 && hasIsotopes) {
    out.push(
      result(
        "amount-zero",
        "warn",
        "The amount is 0 mm, yet the sample was analysed. Enter the amount collected (a trace can be entered as a small amount such as 0.1 mm).",
        { amountMm: 0 },
      ),
    );
  }
  if (period) {
    const perDay = p / period.days;
    if (perDay > t("maxAmountMmPerDayFail")) {
      out.push(
        result(
          "range",
          "fail",
          `${fmt(p, 0)} mm in ${period.days} days is ${fmt(perDay, 0)} mm a day on average, more than the world's 24-hour record (about ${t("maxAmountMmPerDayFail")} mm). Check the amount and its unit (mm, not tenths of mm).`,
          { amountMm: p, days: period.days, mmPerDay: perDay },
        ),
      );
    } else if (perDay > t("maxAmountMmPerDayWarn")) {
      out.push(
        result(
          "range",
          "warn",
          `${fmt(p, 0)} mm in ${period.days} days is ${fmt(perDay, 0)} mm a day on average, which is exceptional. Check the amount and its unit.`,
          { amountMm: p, days: period.days, mmPerDay: perDay },
        ),
      );
    }
  }
  return out;
}

/** `duplicate` for identical δ values elsewhere in the batch or the station's record. */
export function checkRepeatedValues(s: QcSample, ctx: QcContext): CheckResult[] {
  const x = num(s.d18O);
  const y = num(s.d2H);
  if (x === null || y === null) return [];
  const out: CheckResult[] = [];
  const start = day(s.startDate);
  const end = day(s.endDate);
  for (const o of ctx.otherBatchSamples ?? []) {
    if (!o || num(o.d18O) !== x || num(o.d2H) !== y) continue;
    if (sameStation(s, o) && day(o.startDate) === start && day(o.endDate) === end && start !== null) continue; // reported as a duplicate period
    out.push(
      result(
        "duplicate",
        "warn",
        `δ18O ${fmt(x, 2)}‰ and δ2H ${fmt(y, 1)}‰ are exactly the same as ${nameOf(o)} in this batch. Two samples rarely agree to the last digit; check for a copied row.`,
        { d18O: x, d2H: y, other: nameOf(o) },
      ),
    );
    break;
  }
  for (const h of ctx.history ?? []) {
    if (!h || num(h.d18O) !== x || num(h.d2H) !== y) continue;
    if (day(h.startDate) === start && day(h.endDate) === end) continue;
    out.push(
      result(
        "duplicate",
        "warn",
        `δ18O ${fmt(x, 2)}‰ and δ2H ${fmt(y, 1)}‰ are exactly the same as the station's accepted sample ${h.startDate} to ${h.endDate}. Check for a copied row.`,
        { d18O: x, d2H: y, otherStart: h.startDate, otherEnd: h.endDate },
      ),
    );
    break;
  }
  return out;
}

function sameStation(a: QcSample, b: QcSample): boolean {
  // Without station ids, samples handed to one call are taken to be from one station.
  if (!a.stationId || !b.stationId) return true;
  return a.stationId === b.stationId;
}

function capital(text: string): string {
  return text.charAt(0).toUpperCase() + text.slice(1);
}
