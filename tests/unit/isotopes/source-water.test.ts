import { describe, expect, it } from "vitest";
import { craigGordon, equilibriumVapour, GMWL, mulberry32, sourceWaterFromEvaporationLine } from "@/lib/isotopes";

const source = { d18O: -8, d2H: -54 }; // on the global line (d = +10), invented

/** Invented evaporated samples around a slope-5 line from the source, with seeded noise. */
function noisySamples(seed: number, n = 15) {
  const rand = mulberry32(seed);
  const gauss = () => Math.sqrt(-2 * Math.log(Math.max(rand(), 1e-300))) * Math.cos(2 * Math.PI * rand());
  return Array.from({ length: n }, (_, i) => {
    const k = 0.5 + i * 0.4;
    return { d18O: source.d18O + k + 0.1 * gauss(), d2H: source.d2H + 5 * k + 1.0 * gauss() };
  });
}

describe("source water from an evaporation line [trade method, e.g. Gat 1996]", () => {
  it("samples exactly on a line through a point of the GMWL give back that point with zero uncertainty", () => {
    const pts = [1, 2, 3, 4, 5].map((k) => ({ d18O: source.d18O + k, d2H: source.d2H + 5 * k }));
    const r = sourceWaterFromEvaporationLine(pts, GMWL);
    expect(r.d18O).toBeCloseTo(-8, 10);
    expect(r.d2H).toBeCloseTo(-54, 9);
    expect(r.d18OSE).toBeLessThan(1e-8);
    expect(r.evaporationLine.slope).toBeCloseTo(5, 10);
    expect(r.uncertaintyMethod).toBe("delta-method propagation");
  });

  it("lake water drying by the Craig–Gordon model points back to its source within 0.25‰ δ18O and 2‰ δ2H", () => {
    // The model's path is slightly curved, so a straight line through it misses the start a little.
    for (const h of [0.5, 0.7, 0.85]) {
      const atmosphere = equilibriumVapour(source, 15);
      const pts = [0.95, 0.8, 0.65, 0.5, 0.35].map((f) => {
        const r = craigGordon({ tempC: 15, humidity: h, atmosphere, lake: source, remainingFraction: f });
        return { d18O: r.d18O.deltaLAtF as number, d2H: r.d2H.deltaLAtF as number };
      });
      const r = sourceWaterFromEvaporationLine(pts, GMWL);
      expect(Math.abs(r.d18O - source.d18O)).toBeLessThan(0.25);
      expect(Math.abs(r.d2H - source.d2H)).toBeLessThan(2);
      expect(r.evaporationLine.slope).toBeLessThan(6); // evaporation slope below 8 [trade]
    }
  });

  it("delta-method and bootstrap uncertainties agree within 40% on noisy data, and the truth lies in both intervals", () => {
    const pts = noisySamples(42);
    const a = sourceWaterFromEvaporationLine(pts, GMWL);
    const b = sourceWaterFromEvaporationLine(pts, GMWL, { uncertainty: "bootstrap", draws: 2000, seed: 7 });
    expect(b.uncertaintyMethod).toBe("bootstrap");
    expect(b.d18O).toBe(a.d18O); // the estimate itself does not depend on the uncertainty method
    expect(b.d18OSE / a.d18OSE).toBeGreaterThan(0.6);
    expect(b.d18OSE / a.d18OSE).toBeLessThan(1.4);
    expect(b.d2HSE / a.d2HSE).toBeGreaterThan(0.6);
    expect(b.d2HSE / a.d2HSE).toBeLessThan(1.4);
    for (const r of [a, b]) {
      expect(r.interval95.d18O[0]).toBeLessThan(source.d18O);
      expect(r.interval95.d18O[1]).toBeGreaterThan(source.d18O);
      expect(r.interval95.d2H[0]).toBeLessThan(source.d2H);
      expect(r.interval95.d2H[1]).toBeGreaterThan(source.d2H);
    }
  });

  it("the bootstrap is deterministic for a seed", () => {
    const pts = noisySamples(3);
    const a = sourceWaterFromEvaporationLine(pts, GMWL, { uncertainty: "bootstrap", seed: 11, draws: 500 });
    const b = sourceWaterFromEvaporationLine(pts, GMWL, { uncertainty: "bootstrap", seed: 11, draws: 500 });
    const c = sourceWaterFromEvaporationLine(pts, GMWL, { uncertainty: "bootstrap", seed: 12, draws: 500 });
    expect(b.d18OSE).toBe(a.d18OSE);
    expect(b.interval95).toEqual(a.interval95);
    expect(c.d18OSE).not.toBe(a.d18OSE);
  });

  it("the delta method matches a brute-force numerical propagation of the line parameters", () => {
    const pts = noisySamples(5);
    const r = sourceWaterFromEvaporationLine(pts, GMWL);
    const e = r.evaporationLine;
    // Covariance of (slope, intercept) of OLS, then finite-difference gradients of the intersection.
    const s2 = e.residualSD ** 2;
    const cov = [
      [s2 / e.ssx, (-e.meanD18O * s2) / e.ssx],
      [(-e.meanD18O * s2) / e.ssx, s2 * (1 / e.n + e.meanD18O ** 2 / e.ssx)],
    ];
    const x = (a: number, b: number) => (b - GMWL.intercept) / (GMWL.slope - a);
    const h = 1e-6;
    const g = [(x(e.slope + h, e.intercept) - x(e.slope - h, e.intercept)) / (2 * h), (x(e.slope, e.intercept + h) - x(e.slope, e.intercept - h)) / (2 * h)];
    const v = g[0] * g[0] * cov[0][0] + 2 * g[0] * g[1] * cov[0][1] + g[1] * g[1] * cov[1][1];
    expect(r.d18OSE).toBeCloseTo(Math.sqrt(v), 6);
  });

  it("uncertainty of the meteoric line, when given, widens the estimate", () => {
    const pts = noisySamples(9);
    const a = sourceWaterFromEvaporationLine(pts, GMWL);
    const b = sourceWaterFromEvaporationLine(pts, { ...GMWL, slopeSE: 0.1, interceptSE: 1 });
    expect(b.d18OSE).toBeGreaterThan(a.d18OSE);
    expect(b.d2HSE).toBeGreaterThan(a.d2HSE);
  });

  it("warns when the line is steep or scattered, and refuses samples with no evaporation trend", () => {
    const steep = [1, 2, 3, 4].map((k) => ({ d18O: -8 + k, d2H: -54 + 7.5 * k + (k % 2 ? 0.3 : -0.3) }));
    const w = sourceWaterFromEvaporationLine(steep, GMWL).warnings.join(" ");
    expect(w).toMatch(/steep/);
    expect(w).toMatch(/Only 4 samples/);
    const meteoric = [1, 2, 3, 4].map((k) => ({ d18O: -8 + k, d2H: -54 + 8.2 * k }));
    expect(() => sourceWaterFromEvaporationLine(meteoric, GMWL)).toThrow(/no evaporation trend/);
    expect(() => sourceWaterFromEvaporationLine(meteoric.slice(0, 2), GMWL)).toThrow(/at least 3/);
    expect(() => sourceWaterFromEvaporationLine(noisySamples(1), GMWL, { uncertainty: "bootstrap", draws: 10 })).toThrow(/100 draws/);
  });
});
