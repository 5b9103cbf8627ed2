import { describe, expect, it } from "vitest";
import { fitWaterLine, GMWL, type WaterLineSample } from "@/lib/isotopes";
import { DIAMOND_2022_MONTHLY, DIAMOND_2022_PUBLISHED as PUB } from "@/tests/fixtures/diamond-2022-exercise1";

const samples: WaterLineSample[] = DIAMOND_2022_MONTHLY.map((m) => ({ d18O: m.d18O, d2H: m.d2H, amountMm: m.amountMm }));

describe("water lines — Diamond (2022) Exercise 1, one station's 2010 monthly data [pub]", () => {
  const rma = fitWaterLine(samples, "rma");
  const ols = fitWaterLine(samples, "ols");

  it("sums and means as published: ΣP = 1150, mean δ18O −2.19, mean δ2H −8.82 [pub]", () => {
    const sumP = DIAMOND_2022_MONTHLY.reduce((a, m) => a + m.amountMm, 0);
    expect(sumP).toBe(PUB.sumPrecipMm);
    expect(rma.meanD18O).toBeCloseTo(PUB.meanD18O, 2);
    expect(rma.meanD2H).toBeCloseTo(PUB.meanD2H, 2);
  });

  it("SSx = 25.56, SSy = 1602.30, SPxy = 180.74 as published [pub]", () => {
    expect(rma.ssx).toBeCloseTo(PUB.ssx, 2);
    expect(rma.ssy).toBeCloseTo(PUB.ssy, 1);
    expect(rma.spxy).toBeCloseTo(PUB.spxy, 2);
  });

  it("reduced-major-axis slope 7.92, intercept 8.49 and r = 0.893 as published [pub]", () => {
    expect(rma.slope).toBeCloseTo(PUB.rmaSlope, 2);
    expect(rma.intercept).toBeCloseTo(PUB.rmaIntercept, 2);
    expect(rma.r).toBeCloseTo(PUB.r, 3);
    expect(rma.r2).toBeCloseTo(PUB.r * PUB.r, 3);
    expect(rma.n).toBe(12);
  });

  it("OLS slope = SPxy/SSx and intercept = ȳ − slope·x̄ from the published sums [trade formula on pub sums]", () => {
    expect(ols.slope).toBeCloseTo(PUB.spxy / PUB.ssx, 2); // 7.07
    expect(ols.intercept).toBeCloseTo(PUB.meanD2H - (PUB.spxy / PUB.ssx) * PUB.meanD18O, 1); // ≈ 6.66 from rounded means
    // OLS and RMA share the centre and r; RMA slope = OLS slope / |r| [trade identity]
    expect(rma.slope).toBeCloseTo(ols.slope / Math.abs(ols.r), 10);
  });

  it("OLS standard errors match the textbook formulas computed by hand [trade]", () => {
    const n = samples.length;
    const resid = samples.map((s) => (s.d2H as number) - ols.slope * (s.d18O as number) - ols.intercept);
    const s2 = resid.reduce((a, e) => a + e * e, 0) / (n - 2);
    expect(ols.residualSD).toBeCloseTo(Math.sqrt(s2), 10);
    expect(ols.slopeSE).toBeCloseTo(Math.sqrt(s2 / ols.ssx), 10);
    expect(ols.interceptSE).toBeCloseTo(Math.sqrt(s2 * (1 / n + (ols.meanD18O * ols.meanD18O) / ols.ssx)), 10);
  });

  it("PWLSR equals Hughes & Crawford (2012) eqs 9–13 written with raw sums [pub formula]", () => {
    // Independent implementation of the published equations (raw-sum form).
    const p = DIAMOND_2022_MONTHLY.map((m) => m.amountMm);
    const x = DIAMOND_2022_MONTHLY.map((m) => m.d18O);
    const y = DIAMOND_2022_MONTHLY.map((m) => m.d2H);
    const n = p.length;
    const S = (f: (i: number) => number) => p.reduce((a, _, i) => a + f(i), 0);
    const Sp = S((i) => p[i]);
    const Spx = S((i) => p[i] * x[i]);
    const Spy = S((i) => p[i] * y[i]);
    const Spxy = S((i) => p[i] * x[i] * y[i]);
    const Spxx = S((i) => p[i] * x[i] * x[i]);
    const a = (Spxy - (Spx * Spy) / Sp) / (Spxx - (Spx * Spx) / Sp); // eq 9
    const b = (Spy - a * Spx) / Sp; // eq 10
    // eqs 12–13: weighted least squares with wᵢ = n·pᵢ/Σp
    const Sres = S((i) => p[i] * (y[i] - a * x[i] - b) ** 2);
    const sigmaA = Math.sqrt((n * Sres) / (Sp * (n - 2)) / ((n / Sp) * (Spxx - (Spx * Spx) / Sp)));
    const sigmaB = Math.sqrt(((n * Sres) / (Sp * (n - 2))) * ((n / Sp) * Spxx) / (n * (n / Sp) * (Spxx - (Spx * Spx) / Sp)));

    const fit = fitWaterLine(samples, "pwlsr");
    expect(fit.slope).toBeCloseTo(a, 10);
    expect(fit.intercept).toBeCloseTo(b, 10);
    expect(fit.slopeSE).toBeCloseTo(sigmaA, 10);
    expect(fit.interceptSE).toBeCloseTo(sigmaB, 10);
    expect(fit.sumAmountMm).toBe(1150);
    // Weighting by amount moves the line towards the wet-season months (Hughes & Crawford 2012) [pub, qualitative]
    expect(fit.slope).not.toBeCloseTo(ols.slope, 1);
  });

  it("PWRMA [formula mem: Crawford, Hughes & Lykoudis 2014] is the RMA of the amount-weighted sums", () => {
    const fit = fitWaterLine(samples, "pwrma");
    const pw = fitWaterLine(samples, "pwlsr");
    // Same weighted centre and r as PWLSR; slope = sign(r)·√(SSy_w/SSx_w) = PWLSR slope / |r_w|.
    expect(fit.meanD18O).toBeCloseTo(pw.meanD18O, 12);
    expect(fit.slope).toBeCloseTo(pw.slope / Math.abs(pw.r), 10);
    expect(fit.intercept).toBeCloseTo(fit.meanD2H - fit.slope * fit.meanD18O, 10);
  });

  it("PWRMA reduces to RMA and PWLSR to OLS when all amounts are equal [mem formula, identity]", () => {
    const equal = samples.map((s) => ({ ...s, amountMm: 50 }));
    const a = fitWaterLine(equal, "pwrma");
    const b = fitWaterLine(equal, "pwlsr");
    for (const k of ["slope", "intercept", "slopeSE", "interceptSE", "r2", "residualSD"] as const) {
      expect(a[k]).toBeCloseTo(rma[k], 10);
      expect(b[k]).toBeCloseTo(ols[k], 10);
    }
  });
});

describe("water lines — properties that hold for any data", () => {
  const onLine = [-20, -14.5, -9, -3.3, 0.4].map((x, i) => ({ d18O: x, d2H: 7.6 * x + 4.2, amountMm: 10 + 17 * i }));

  it("a fit through points exactly on a line returns that line, by every method", () => {
    for (const m of ["ols", "rma", "pwlsr", "pwrma"] as const) {
      const fit = fitWaterLine(onLine, m);
      expect(fit.slope).toBeCloseTo(7.6, 10);
      expect(fit.intercept).toBeCloseTo(4.2, 9);
      expect(fit.r2).toBeCloseTo(1, 12);
      expect(fit.residualSD).toBeLessThan(1e-9);
      expect(fit.slopeSE).toBeLessThan(1e-9);
    }
  });

  it("the global meteoric water line is recovered from points on it — Craig (1961) [pub]", () => {
    const pts = [-30, -15, -5, 2].map((x) => ({ d18O: x, d2H: GMWL.slope * x + GMWL.intercept }));
    const fit = fitWaterLine(pts, "rma");
    expect(fit.slope).toBeCloseTo(8, 10);
    expect(fit.intercept).toBeCloseTo(10, 9);
  });

  it("weighted fits do not change when all amounts are scaled", () => {
    for (const m of ["pwlsr", "pwrma"] as const) {
      const a = fitWaterLine(samples, m);
      const b = fitWaterLine(samples.map((s) => ({ ...s, amountMm: (s.amountMm as number) * 37.5 })), m);
      for (const k of ["slope", "intercept", "slopeSE", "interceptSE", "r2", "residualSD"] as const) {
        expect(b[k]).toBeCloseTo(a[k], 10);
      }
    }
  });

  it("leaves out samples with a missing δ value, and (weighted) with a missing or zero amount", () => {
    const withGaps: WaterLineSample[] = [...samples, { d18O: null, d2H: -20, amountMm: 30 }, { d18O: -4, d2H: -25, amountMm: null }, { d18O: -4, d2H: -25, amountMm: 0 }];
    expect(fitWaterLine(withGaps, "ols").n).toBe(14);
    expect(fitWaterLine(withGaps, "ols").nLeftOut).toBe(1);
    const w = fitWaterLine(withGaps, "pwlsr");
    expect(w.n).toBe(12);
    expect(w.nLeftOut).toBe(3);
    expect(w.slope).toBeCloseTo(fitWaterLine(samples, "pwlsr").slope, 12);
  });

  it("says clearly what is wrong with unusable input", () => {
    expect(() => fitWaterLine(samples.slice(0, 2), "ols")).toThrow(RangeError);
    expect(() => fitWaterLine(samples.slice(0, 2), "ols")).toThrow(/at least 3 usable samples/);
    expect(() => fitWaterLine([1, 2, 3].map((i) => ({ d18O: -5, d2H: -30 - i })), "rma")).toThrow(/same δ18O/);
    expect(() => fitWaterLine([1, 2, 3].map((i) => ({ d18O: -5 - i, d2H: -30 })), "rma")).toThrow(/same δ2H/);
    const noAmounts = samples.map((s) => ({ d18O: s.d18O, d2H: s.d2H }));
    expect(() => fitWaterLine(noAmounts, "pwlsr")).toThrow(/no sample has an amount/);
    expect(() => fitWaterLine(noAmounts, "pwrma")).toThrow(/use "rma"/);
    expect(() => fitWaterLine(samples.map((s, i) => ({ ...s, amountMm: i === 0 ? -3 : s.amountMm })), "pwlsr")).toThrow(/negative/);
    // @ts-expect-error — an unknown method is refused at run time too
    expect(() => fitWaterLine(samples, "deming")).toThrow(TypeError);
  });
});
