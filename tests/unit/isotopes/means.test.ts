import { describe, expect, it } from "vitest";
import {
  aggregateStationMeans,
  amountWeightedMean,
  defaultStationMeanRules,
  STATION_MEAN_RULES,
  type StationSample,
} from "@/lib/isotopes";
import { DIAMOND_2022_MONTHLY } from "@/tests/fixtures/diamond-2022-exercise1";

const P = DIAMOND_2022_MONTHLY.map((m) => m.amountMm);
const X = DIAMOND_2022_MONTHLY.map((m) => m.d18O);
const Y = DIAMOND_2022_MONTHLY.map((m) => m.d2H);

describe("amount-weighted mean δ̄ = ΣP·δ/ΣP [trade]", () => {
  it("on Diamond's (2022) 2010 data: ΣP = 1150 mm [pub]; δ̄18O = −2.727‰, δ̄2H = −9.994‰ (computed by the formula, not printed there)", () => {
    const o = amountWeightedMean(X, P);
    const h = amountWeightedMean(Y, P);
    expect(o.sumAmountMm).toBe(1150);
    expect(o.mean).toBeCloseTo(-3136.29 / 1150, 10); // Σ P·δ18O = −3136.29
    expect(h.mean).toBeCloseTo(-11493.1 / 1150, 10); // Σ P·δ2H = −11493.1
    expect(o.n).toBe(12);
  });

  it("a month without an isotope value is left out of ΣP too — as Diamond (2022) instructs [pub]", () => {
    const withGap = X.map((x, i) => (i === 4 ? null : x)); // May (277 mm) not analysed
    const r = amountWeightedMean(withGap, P);
    expect(r.sumAmountMm).toBe(1150 - 277);
    expect(r.n).toBe(11);
    expect(r.leftOut).toBe(1);
    expect(r.mean).toBeCloseTo((-3136.29 - 277 * -2.78) / (1150 - 277), 10);
    // and a missing amount leaves its value out
    const noAmount = P.map((p, i) => (i === 0 ? null : p));
    expect(amountWeightedMean(X, noAmount).sumAmountMm).toBe(1141);
  });

  it("is unchanged when every amount is scaled", () => {
    expect(amountWeightedMean(X, P.map((p) => p * 25.4)).mean).toBeCloseTo(amountWeightedMean(X, P).mean as number, 12);
  });

  it("gives null (not NaN) with nothing to weigh, and refuses bad input", () => {
    expect(amountWeightedMean([null, -5], [10, null]).mean).toBeNull();
    expect(amountWeightedMean([-5, -6], [0, 0]).mean).toBeNull();
    expect(() => amountWeightedMean([-5], [1, 2])).toThrow(/same length/);
    expect(() => amountWeightedMean([-5], [-1])).toThrow(/negative/);
  });
});

// ── station aggregation ──

const iso = (y: number, m: number, d = 1) => `${y}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}`;
const nextMonth = (y: number, m: number) => (m === 12 ? iso(y + 1, 1) : iso(y, m + 1));
function monthly(y: number, m: number, d18O: number | null, d2H: number | null, amountMm: number | null): StationSample {
  return { startDate: iso(y, m), endDate: nextMonth(y, m), d18O, d2H, amountMm };
}
/** Diamond's 2010 months replayed for several years, with a per-year shift of δ18O (invented). */
function replay(years: number[], shift = 0): StationSample[] {
  return years.flatMap((y, k) =>
    DIAMOND_2022_MONTHLY.map((r) => monthly(y, r.month, r.d18O + k * shift, r.d2H + 8 * k * shift, r.amountMm)),
  );
}

describe("station aggregation — monthly and annual amount-weighted means with coverage", () => {
  it("three identical years: monthly means are the months, annual mean is the year's weighted mean", () => {
    const r = aggregateStationMeans(replay([2010, 2011, 2012]));
    expect(r.monthly).toHaveLength(12);
    for (const m of r.monthly) {
      const src = DIAMOND_2022_MONTHLY[m.period - 1];
      expect(m.d18O).toBeCloseTo(src.d18O, 12);
      expect(m.d2H).toBeCloseTo(src.d2H, 12);
      expect(m.dExcess).toBeCloseTo(src.d2H - 8 * src.d18O, 12);
      expect(m.precipMm).toBeCloseTo(src.amountMm, 12);
      expect(m.included).toBe(true);
      expect(m.coverage.yearsCounted).toBe(3);
      expect(m.coverage.flags).toEqual([]);
    }
    expect(r.annual.period).toBe(0);
    expect(r.annual.d18O).toBeCloseTo(-3136.29 / 1150, 10);
    expect(r.annual.d2H).toBeCloseTo(-11493.1 / 1150, 10);
    // d-excess of the weighted means (check-values: weighted d̄ = δ̄2H − 8·δ̄18O)
    expect(r.annual.dExcess).toBeCloseTo(-11493.1 / 1150 - (8 * -3136.29) / 1150, 10);
    expect(r.annual.precipMm).toBeCloseTo(1150, 10);
    expect(r.annual.included).toBe(true);
    expect(r.annual.coverage).toMatchObject({ yearsCounted: 3, monthsCounted: 36, samplesUsed: 36, sampledPrecipFraction: 1 });
    expect(r.years.every((y) => y.counted)).toBe(true);
  });

  it("wetter years weigh more in the annual mean (samples pooled over counted years)", () => {
    const dry = replay([2010]);
    const wet = replay([2011], 0).map((s) => ({ ...s, d18O: (s.d18O as number) - 2, amountMm: (s.amountMm as number) * 3 }));
    const r = aggregateStationMeans([...dry, ...wet]);
    const yearly = -3136.29 / 1150;
    expect(r.annual.d18O).toBeCloseTo((yearly * 1 + (yearly - 2) * 3) / 4, 10);
  });

  it("means do not change when every amount is scaled; precipitation does", () => {
    const a = aggregateStationMeans(replay([2010, 2011], 0.3));
    const b = aggregateStationMeans(replay([2010, 2011], 0.3).map((s) => ({ ...s, amountMm: (s.amountMm as number) * 2 })));
    expect(b.annual.d18O).toBeCloseTo(a.annual.d18O as number, 12);
    expect(b.monthly[5].d2H).toBeCloseTo(a.monthly[5].d2H as number, 12);
    expect(b.annual.precipMm).toBeCloseTo(2 * (a.annual.precipMm as number), 10);
  });

  it(`a year needs ≥ ${STATION_MEAN_RULES.minMonthsPerYear.value} months covered [trade]`, () => {
    const eightMonths = replay([2011]).filter((s) => Number(s.startDate.slice(5, 7)) <= 8);
    const r = aggregateStationMeans([...replay([2010]), ...eightMonths]);
    const y2011 = r.years.find((y) => y.year === 2011);
    expect(y2011?.monthsCovered).toBe(8);
    expect(y2011?.counted).toBe(false);
    expect(y2011?.reasons.join(" ")).toMatch(/8 months covered, fewer than 9/);
    expect(r.annual.coverage.yearsCounted).toBe(1);
    expect(r.annual.included).toBe(false); // needs ≥ 2 counted years
    expect(r.annual.coverage.flags).toContain("too-few-years");
    // months 1–8 still have two years and stay included
    expect(r.monthly[0].included).toBe(true);
    expect(r.monthly[11].included).toBe(false);
    expect(r.monthly[11].coverage.flags).toContain("too-few-years");
  });

  it("a month recorded as dry (0 mm, no sample) counts as covered", () => {
    const year = replay([2011]).filter((s) => Number(s.startDate.slice(5, 7)) <= 8);
    const dry = [9, 10].map((m) => monthly(2011, m, null, null, 0));
    const r = aggregateStationMeans([...replay([2010]), ...year, ...dry]);
    expect(r.years.find((y) => y.year === 2011)?.monthsCovered).toBe(10);
    expect(r.years.find((y) => y.year === 2011)?.counted).toBe(true);
  });

  it(`a year needs ≥ ${STATION_MEAN_RULES.minYearSampledFraction.value * 100}% of its precipitation sampled [trade]`, () => {
    // 2011: May–July (665 mm of 1150) recorded as rain without isotope values → 42% unsampled.
    const y2011 = replay([2011]).map((s) => {
      const m = Number(s.startDate.slice(5, 7));
      return m >= 5 && m <= 7 ? { ...s, d18O: null, d2H: null } : s;
    });
    const r = aggregateStationMeans([...replay([2010, 2012]), ...y2011]);
    const y = r.years.find((q) => q.year === 2011);
    expect(y?.sampledPrecipFraction).toBeCloseTo(485 / 1150, 10);
    expect(y?.counted).toBe(false);
    expect(y?.monthsCovered).toBe(9);
    expect(y?.reasons.join(" ")).toMatch(/42% of the year's precipitation sampled/);
    expect(r.annual.coverage.yearsCounted).toBe(2);
    // the unsampled rain still counts in mean monthly precipitation
    expect(r.monthly[4].precipMm).toBeCloseTo(277, 10);
    expect(r.monthly[4].coverage.yearsCounted).toBe(2);
    expect(r.monthly[4].coverage.sampledPrecipFraction).toBeCloseTo(2 / 3, 10); // May sampled in 2 of 3 equal years
  });

  it("weekly samples are pooled into the month of their midpoint; a sample is placed by its midpoint", () => {
    const weeks: StationSample[] = [
      { startDate: "2015-03-01", endDate: "2015-03-08", d18O: -4, d2H: -22, amountMm: 10 },
      { startDate: "2015-03-08", endDate: "2015-03-15", d18O: -6, d2H: -38, amountMm: 30 },
      { startDate: "2015-03-15", endDate: "2015-03-22", d18O: -5, d2H: -30, amountMm: 0 },
      { startDate: "2015-03-22", endDate: "2015-03-29", d18O: null, d2H: null, amountMm: 0 },
      // [Mar 29, Apr 5): midpoint 1 April 12:00 → April
      { startDate: "2015-03-29", endDate: "2015-04-05", d18O: -9, d2H: -60, amountMm: 5 },
      // [Mar 28, Apr 4): midpoint 31 March 12:00 → March
      { startDate: "2015-03-28", endDate: "2015-04-04", d18O: -8, d2H: -55, amountMm: 20 },
    ];
    const r = aggregateStationMeans(weeks, { minYearsPerMonth: 1 });
    const march = r.monthly[2];
    expect(march.d18O).toBeCloseTo((10 * -4 + 30 * -6 + 20 * -8) / 60, 12);
    expect(march.precipMm).toBeCloseTo(60, 12);
    expect(march.coverage.samplesUsed).toBe(5);
    expect(r.monthly[3].d18O).toBeCloseTo(-9, 12);
    expect(r.monthly[3].coverage.flags).toContain("short-coverage"); // 7 days of April
  });

  it(`a sample longer than ${STATION_MEAN_RULES.maxSampleDays.value} days is left out; one of 36–62 days is flagged`, () => {
    const r = aggregateStationMeans(
      [
        { startDate: "2016-01-01", endDate: "2016-04-01", d18O: -7, d2H: -45, amountMm: 200 }, // 91 days
        { startDate: "2016-04-01", endDate: "2016-05-15", d18O: -6, d2H: -40, amountMm: 90 }, // 44 days → April 22
      ],
      { minYearsPerMonth: 1 },
    );
    expect(r.excluded).toEqual([{ index: 0, reason: "period of 91 days is longer than 62 days" }]);
    expect(r.monthly[3].d18O).toBeCloseTo(-6, 12);
    expect(r.monthly[3].coverage.flags).toContain("long-samples");
  });

  it("samples with an isotope value but no amount are reported, not weighted", () => {
    const samples = [...replay([2010, 2011]), monthly(2012, 6, -20, -150, null)];
    const r = aggregateStationMeans(samples);
    expect(r.monthly[5].d18O).toBeCloseTo(-3.31, 12);
    expect(r.monthly[5].coverage.flags).toContain("amounts-missing");
    expect(r.monthly[5].precipMm).toBeCloseTo(222, 12); // the 2012 June record has no amount
  });

  it("bad records are listed with a reason and change nothing else", () => {
    const r = aggregateStationMeans([
      ...replay([2010, 2011]),
      { startDate: "2012-02-30", endDate: "2012-03-01", d18O: -1, d2H: -1, amountMm: 1 },
      { startDate: "2012-03-01", endDate: "2012-03-01", d18O: -1, d2H: -1, amountMm: 1 },
      { startDate: "2012-04-01", endDate: "2012-05-01", d18O: -1, d2H: -1, amountMm: -4 },
    ]);
    expect(r.excluded.map((e) => e.reason)).toEqual([
      "start or end date is not a valid YYYY-MM-DD date",
      "end date is not after the start date",
      "negative precipitation amount (-4 mm)",
    ]);
    expect(r.annual.d18O).toBeCloseTo(-3136.29 / 1150, 10);
  });

  it("an empty record gives null means, included false and a no-data flag", () => {
    const r = aggregateStationMeans([]);
    expect(r.annual).toMatchObject({ d18O: null, d2H: null, dExcess: null, precipMm: null, included: false });
    expect(r.annual.coverage.flags).toContain("no-data");
    expect(r.monthly[0].coverage.flags).toContain("no-data");
  });

  it("rules can be overridden per call and are listed with their sources", () => {
    const r = aggregateStationMeans(replay([2010]), { minYearsAnnual: 1, minYearsPerMonth: 1 });
    expect(r.annual.included).toBe(true);
    expect(r.rules.minYearsAnnual).toBe(1);
    expect(defaultStationMeanRules().minYearsAnnual).toBe(2);
    for (const rule of Object.values(STATION_MEAN_RULES)) {
      expect(rule.source).toMatch(/\[(trade|pub|mem)\]/);
      expect(rule.rule.length).toBeGreaterThan(20);
    }
    expect(() => aggregateStationMeans([], { minYearsAnnual: -1 })).toThrow(RangeError);
    // @ts-expect-error — unknown rule names are refused
    expect(() => aggregateStationMeans([], { minMonths: 3 })).toThrow(/Unknown station-mean rule/);
  });
});
