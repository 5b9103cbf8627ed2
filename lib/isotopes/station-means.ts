// Long-term monthly and annual amount-weighted means for one station, with coverage.
// δ in ‰ vs VSMOW, amounts in mm, dates ISO YYYY-MM-DD with periods [start, end).
import { daysInMonth, parseIsoDay, yearMonthOfDay } from "./dates";
import { D_EXCESS_SLOPE } from "./excess";
import { isFiniteNumber } from "./validate";

/**
 * The coverage rules, in one table so the editions code and the interface can show them.
 * Each value can be overridden per call (`aggregateStationMeans(samples, { minYearsAnnual: 3 })`).
 * All are choices of common practice [trade], not published constants.
 */
export const STATION_MEAN_RULES = Object.freeze({
  maxSampleDays: {
    value: 62,
    unit: "days",
    rule: "A sample is placed in the calendar month that holds the midpoint of its period [start, end). A sample longer than this cannot stand for one month and is left out.",
    source: "[trade]",
  },
  minCellSampledFraction: {
    value: 0.7,
    unit: "fraction",
    rule: "Within one month of one year, at least this share of the recorded precipitation must have isotope values for that month's value to count.",
    source: "[trade]",
  },
  minMonthsPerYear: {
    value: 9,
    unit: "months",
    rule: "A year counts towards the annual mean only with at least this many months covered (a month with an isotope value, or a month recorded as dry with 0 mm).",
    source: "[trade]",
  },
  minYearSampledFraction: {
    value: 0.7,
    unit: "fraction",
    rule: "A year counts towards the annual mean only when at least this share of the year's recorded precipitation has isotope values.",
    source: "[trade]",
  },
  minYearsPerMonth: {
    value: 2,
    unit: "years",
    rule: "A calendar month's long-term mean is included only with values from at least this many different years.",
    source: "[trade]",
  },
  minYearsAnnual: {
    value: 2,
    unit: "years",
    rule: "The annual mean is included only with at least this many counted years.",
    source: "[trade]",
  },
} as const);

export type StationMeanRuleKey = keyof typeof STATION_MEAN_RULES;
export type StationMeanRuleValues = Record<StationMeanRuleKey, number>;

/** The rule values with their defaults (handy for storing with an edition). */
export function defaultStationMeanRules(): StationMeanRuleValues {
  const out = {} as StationMeanRuleValues;
  for (const k of Object.keys(STATION_MEAN_RULES) as StationMeanRuleKey[]) out[k] = STATION_MEAN_RULES[k].value;
  return out;
}

/** One collection record of a station. A record with no δ values still counts as precipitation. */
export interface StationSample {
  /** ISO YYYY-MM-DD, first day of the collection period (inclusive). */
  startDate: string;
  /** ISO YYYY-MM-DD, day after the last day of the period (exclusive). */
  endDate: string;
  d18O: number | null | undefined;
  d2H: number | null | undefined;
  amountMm?: number | null;
}

/** Flags a period's coverage may carry (plain words for the interface in `COVERAGE_FLAG_TEXT`). */
export type CoverageFlag =
  | "no-data"
  | "too-few-years"
  | "amounts-missing"
  | "long-samples"
  | "short-coverage"
  | "precipitation-incomplete";

export const COVERAGE_FLAG_TEXT: Readonly<Record<CoverageFlag, string>> = Object.freeze({
  "no-data": "No usable samples for this period.",
  "too-few-years": "Fewer years than the rules require.",
  "amounts-missing": "Some samples have no precipitation amount and could not be weighted.",
  "long-samples": "Some samples span more than 35 days and were placed by their midpoint.",
  "short-coverage": "Some months' samples cover less than three quarters of the month's days.",
  "precipitation-incomplete": "Mean precipitation could not be computed for every month.",
});

export interface PeriodCoverage {
  /** Years whose values entered this mean. */
  yearsCounted: number;
  /** Years with any record for this period. */
  yearsWithData: number;
  /** Months (year-months) whose values entered this mean. */
  monthsCounted: number;
  /** Samples with δ values and an amount that entered this mean. */
  samplesUsed: number;
  /**
   * Share of the recorded precipitation that has isotope values (0–1), or null without rain:
   * over every year of that calendar month for a monthly mean, over the counted years for the annual.
   */
  sampledPrecipFraction: number | null;
  firstYear: number | null;
  lastYear: number | null;
  flags: CoverageFlag[];
}

export interface PeriodMean {
  /** 0 = annual, 1–12 = calendar month. */
  period: number;
  /** Amount-weighted mean δ18O, ‰ (null without data). */
  d18O: number | null;
  /** Amount-weighted mean δ2H, ‰. */
  d2H: number | null;
  /** d-excess of the weighted means, δ̄2H − 8·δ̄18O, ‰. */
  dExcess: number | null;
  /** Mean precipitation of the period, mm (per month; per year for the annual row). */
  precipMm: number | null;
  /** Whether the coverage rules let this mean into an edition. */
  included: boolean;
  coverage: PeriodCoverage;
}

export interface YearCoverage {
  year: number;
  /** Months with an isotope value that counts, or recorded as dry. */
  monthsCovered: number;
  precipMm: number;
  sampledPrecipMm: number;
  sampledPrecipFraction: number | null;
  counted: boolean;
  /** Why the year does not count (empty when it counts). */
  reasons: string[];
}

export interface StationMeans {
  /** Index 0 … 11 = January … December. */
  monthly: PeriodMean[];
  annual: PeriodMean;
  years: YearCoverage[];
  /** Samples that could not be used at all, with the reason. */
  excluded: { index: number; reason: string }[];
  rules: StationMeanRuleValues;
}

interface Cell {
  year: number;
  month: number;
  samples: number;
  days: number;
  precipMm: number;
  precipComplete: boolean;
  sampledPrecipMm: number;
  sumP18: number;
  sumP2: number;
  isotopeNoAmount: number;
  longSample: boolean;
}

/**
 * Long-term amount-weighted monthly (1–12) and annual station means, each with its coverage
 * and an `included` verdict from `STATION_MEAN_RULES`.
 *
 * Method: δ̄ = Σ Pᵢ·δᵢ / Σ Pᵢ over the samples used [trade], d-excess of the weighted
 * means d̄ = δ̄2H − 8·δ̄18O (Dansgaard 1964). Each record goes to the calendar month holding
 * the midpoint of its period, so weekly or event samples are pooled into their month and a
 * sample of up to `maxSampleDays` is placed whole in one month. A monthly mean pools every
 * year's counting month (a month counts when ≥ `minCellSampledFraction` of its recorded
 * precipitation was sampled); the annual mean pools the samples of every counted year, so
 * wetter years weigh more. Mean monthly precipitation averages the year-months whose every
 * record has an amount; mean annual precipitation is the sum of the twelve monthly means.
 * A sample needs both δ18O and δ2H to enter a mean (so d-excess stays consistent); a record
 * with an amount but no δ values still counts as precipitation that was not sampled.
 */
export function aggregateStationMeans(
  samples: readonly StationSample[],
  ruleOverrides: Partial<StationMeanRuleValues> = {},
): StationMeans {
  if (!Array.isArray(samples)) throw new TypeError("samples must be an array of station samples.");
  const rules = { ...defaultStationMeanRules() };
  for (const [k, v] of Object.entries(ruleOverrides) as [StationMeanRuleKey, number | undefined][]) {
    if (v === undefined) continue;
    if (!(k in STATION_MEAN_RULES)) throw new TypeError(`Unknown station-mean rule "${k}".`);
    if (!isFiniteNumber(v) || v < 0) throw new RangeError(`Rule ${k} must be a number ≥ 0; got ${String(v)}.`);
    rules[k] = v;
  }

  const excluded: { index: number; reason: string }[] = [];
  const cells = new Map<string, Cell>();

  samples.forEach((s, index) => {
    if (!s || typeof s !== "object") {
      excluded.push({ index, reason: "not a sample record" });
      return;
    }
    const start = parseIsoDay(s.startDate);
    const end = parseIsoDay(s.endDate);
    if (start === null || end === null) {
      excluded.push({ index, reason: "start or end date is not a valid YYYY-MM-DD date" });
      return;
    }
    const days = end - start;
    if (days < 1) {
      excluded.push({ index, reason: "end date is not after the start date" });
      return;
    }
    if (days > rules.maxSampleDays) {
      excluded.push({ index, reason: `period of ${days} days is longer than ${rules.maxSampleDays} days` });
      return;
    }
    const amount = s.amountMm;
    const hasAmount = isFiniteNumber(amount);
    if (hasAmount && amount < 0) {
      excluded.push({ index, reason: `negative precipitation amount (${amount} mm)` });
      return;
    }
    const hasIsotopes = isFiniteNumber(s.d18O) && isFiniteNumber(s.d2H);
    const { year, month } = yearMonthOfDay(start + days / 2);
    const key = `${year}-${month}`;
    let c = cells.get(key);
    if (!c) {
      c = {
        year,
        month,
        samples: 0,
        days: 0,
        precipMm: 0,
        precipComplete: true,
        sampledPrecipMm: 0,
        sumP18: 0,
        sumP2: 0,
        isotopeNoAmount: 0,
        longSample: false,
      };
      cells.set(key, c);
    }
    c.samples++;
    c.days += days;
    if (days > 35) c.longSample = true;
    if (hasAmount) c.precipMm += amount;
    else c.precipComplete = false;
    if (hasIsotopes) {
      if (hasAmount) {
        c.sampledPrecipMm += amount;
        c.sumP18 += amount * (s.d18O as number);
        c.sumP2 += amount * (s.d2H as number);
      } else {
        c.isotopeNoAmount++;
      }
    }
  });

  const cellList = [...cells.values()].sort((a, b) => a.year - b.year || a.month - b.month);
  // A month's isotope value counts when enough of its recorded precipitation was sampled.
  const cellCounts = (c: Cell) =>
    c.sampledPrecipMm > 0 && c.sampledPrecipMm / c.precipMm >= rules.minCellSampledFraction - 1e-12;
  const cellDry = (c: Cell) => c.precipComplete && c.precipMm === 0;
  const shortCoverage = (c: Cell) => c.days < 0.75 * daysInMonth(c.year, c.month);

  // ── years ──
  const yearsMap = new Map<number, Cell[]>();
  for (const c of cellList) {
    const list = yearsMap.get(c.year) ?? [];
    list.push(c);
    yearsMap.set(c.year, list);
  }
  const years: YearCoverage[] = [];
  for (const [year, list] of [...yearsMap.entries()].sort((a, b) => a[0] - b[0])) {
    const covered = list.filter((c) => cellCounts(c) || cellDry(c)).length;
    const precipMm = list.reduce((a, c) => a + c.precipMm, 0);
    const sampledPrecipMm = list.filter(cellCounts).reduce((a, c) => a + c.sampledPrecipMm, 0);
    const fraction = precipMm > 0 ? sampledPrecipMm / precipMm : null;
    const reasons: string[] = [];
    if (covered < rules.minMonthsPerYear) reasons.push(`${covered} months covered, fewer than ${rules.minMonthsPerYear}`);
    if (fraction === null) reasons.push("no precipitation recorded");
    else if (fraction < rules.minYearSampledFraction - 1e-12)
      reasons.push(
        `${Math.round(fraction * 100)}% of the year's precipitation sampled, less than ${Math.round(rules.minYearSampledFraction * 100)}%`,
      );
    years.push({
      year,
      monthsCovered: covered,
      precipMm,
      sampledPrecipMm,
      sampledPrecipFraction: fraction,
      counted: reasons.length === 0,
      reasons,
    });
  }

  // ── monthly ──
  const monthly: PeriodMean[] = [];
  const monthlyPrecip: (number | null)[] = [];
  for (let m = 1; m <= 12; m++) {
    const list = cellList.filter((c) => c.month === m);
    const used = list.filter(cellCounts);
    const withPrecip = list.filter((c) => c.precipComplete);
    const precipMm = withPrecip.length ? withPrecip.reduce((a, c) => a + c.precipMm, 0) / withPrecip.length : null;
    monthlyPrecip.push(precipMm);
    const flags = commonFlags(list, used, shortCoverage);
    if (used.length < rules.minYearsPerMonth) flags.unshift("too-few-years");
    if (list.length === 0) flags.unshift("no-data");
    const means = pooledMeans(used);
    const listPrecip = list.reduce((a, c) => a + c.precipMm, 0);
    monthly.push({
      period: m,
      ...means,
      precipMm,
      included: used.length >= rules.minYearsPerMonth && means.d18O !== null,
      coverage: {
        yearsCounted: used.length,
        yearsWithData: new Set(list.map((c) => c.year)).size,
        monthsCounted: used.length,
        samplesUsed: used.reduce((a, c) => a + c.samples - c.isotopeNoAmount, 0),
        sampledPrecipFraction: listPrecip > 0 ? list.reduce((a, c) => a + c.sampledPrecipMm, 0) / listPrecip : null,
        firstYear: used.length ? used[0].year : null,
        lastYear: used.length ? used[used.length - 1].year : null,
        flags: dedupe(flags),
      },
    });
  }

  // ── annual ──
  const countedYears = years.filter((y) => y.counted).map((y) => y.year);
  const annualCells = cellList.filter((c) => countedYears.includes(c.year) && cellCounts(c));
  const annualAll = cellList.filter((c) => countedYears.includes(c.year));
  const annualFlags = commonFlags(annualAll, annualCells, shortCoverage);
  const precipKnown = monthlyPrecip.every((p) => p !== null);
  if (!precipKnown) annualFlags.push("precipitation-incomplete");
  if (countedYears.length < rules.minYearsAnnual) annualFlags.unshift("too-few-years");
  if (cellList.length === 0) annualFlags.unshift("no-data");
  const annualMeans = pooledMeans(annualCells);
  const countedPrecip = years.filter((y) => y.counted).reduce((a, y) => a + y.precipMm, 0);
  const countedSampled = years.filter((y) => y.counted).reduce((a, y) => a + y.sampledPrecipMm, 0);
  const annual: PeriodMean = {
    period: 0,
    ...annualMeans,
    precipMm: precipKnown ? (monthlyPrecip as number[]).reduce((a, b) => a + b, 0) : null,
    included: countedYears.length >= rules.minYearsAnnual && annualMeans.d18O !== null,
    coverage: {
      yearsCounted: countedYears.length,
      yearsWithData: years.length,
      monthsCounted: years.filter((y) => y.counted).reduce((a, y) => a + y.monthsCovered, 0),
      samplesUsed: annualCells.reduce((a, c) => a + c.samples - c.isotopeNoAmount, 0),
      sampledPrecipFraction: countedPrecip > 0 ? countedSampled / countedPrecip : null,
      firstYear: countedYears.length ? countedYears[0] : null,
      lastYear: countedYears.length ? countedYears[countedYears.length - 1] : null,
      flags: dedupe(annualFlags),
    },
  };

  return { monthly, annual, years, excluded, rules };
}

function pooledMeans(cells: readonly Cell[]): { d18O: number | null; d2H: number | null; dExcess: number | null } {
  const p = cells.reduce((a, c) => a + c.sampledPrecipMm, 0);
  if (!(p > 0)) return { d18O: null, d2H: null, dExcess: null };
  // Amount-weighted mean Σ P·δ / Σ P [trade]
  const d18O = cells.reduce((a, c) => a + c.sumP18, 0) / p;
  const d2H = cells.reduce((a, c) => a + c.sumP2, 0) / p;
  // d-excess of the weighted means — Dansgaard (1964)
  return { d18O, d2H, dExcess: d2H - D_EXCESS_SLOPE * d18O };
}

function commonFlags(all: readonly Cell[], used: readonly Cell[], short: (c: Cell) => boolean): CoverageFlag[] {
  const flags: CoverageFlag[] = [];
  if (all.some((c) => c.isotopeNoAmount > 0)) flags.push("amounts-missing");
  if (used.some((c) => c.longSample)) flags.push("long-samples");
  if (used.some(short)) flags.push("short-coverage");
  return flags;
}

function dedupe<T>(xs: T[]): T[] {
  return [...new Set(xs)];
}
