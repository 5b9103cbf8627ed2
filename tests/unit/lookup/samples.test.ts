import { describe, expect, it } from "vitest";
import { analyseSamples, lineCentre, lineSd, parseSamplesText } from "@/lib/lookup/samples";

// Samples on the site report. Expected values worked by hand from the definitions:
// d = δ2H − 8·δ18O (Dansgaard 1964) [pub]; lc-excess = δ2H − a·δ18O − b (Landwehr & Coplen 2006) [pub];
// the source water is where the evaporation line meets the meteoric line [trade].

const GMWL_EXACT = { slope: 8, intercept: 10, slopeSE: 0, interceptSE: 0, meanD18O: -8 };

describe("parseSamplesText", () => {
  it("reads bare pairs, labelled rows, whitespace and CSV with a header", () => {
    expect(parseSamplesText("-9.8, -70.1\n-8.9 -66")).toEqual([
      { label: "#1", d18O: -9.8, d2H: -70.1, line: 1 },
      { label: "#2", d18O: -8.9, d2H: -66, line: 2 },
    ]);
    expect(parseSamplesText("spring-1\t-9.8\t-70.1")[0]).toMatchObject({ label: "spring-1", d18O: -9.8 });
    const csv = parseSamplesText("id,d2H_permil,d18O_permil\nw1,-66,-8.9\nw2,-60,-8\n");
    expect(csv.map((s) => [s.label, s.d18O, s.d2H])).toEqual([
      ["w1", -8.9, -66],
      ["w2", -8, -60],
    ]);
  });

  it("names every bad line", () => {
    expect(() => parseSamplesText("")).toThrow(/at least one sample/);
    expect(() => parseSamplesText("-9.8, abc\n-8, -60, 1, 2")).toThrow(/line 1: δ2H "abc" is not a number\. line 2: expected δ18O and δ2H/);
    expect(() => parseSamplesText("-0.0098, -0.0701\n-70, -9.8")).toThrow(/line 2: δ18O -70 ‰ is outside/);
  });
});

describe("analyseSamples", () => {
  it("gives d-excess and lc-excess and places samples against the band (analytical 2 ‰ only on an exact line: ±3.92 ‰)", () => {
    const a = analyseSamples(parseSamplesText("a, -9, -65\nb, -8, -53"), GMWL_EXACT);
    expect(a.samples[0]).toMatchObject({ dExcess: 7, lcExcess: -3, position: "on the line" });
    expect(a.samples[0].band95).toBeCloseTo(1.959964 * 2, 9);
    expect(a.samples[1]).toMatchObject({ dExcess: 11, lcExcess: 1, position: "on the line" });
    expect(a.evaporation.kind).toBe("not-applicable");
  });

  it("fits the evaporation line and recovers the source water where it meets the line", () => {
    // four samples on δ2H = 5·δ18O − 20, which meets δ2H = 8·δ18O + 10 at (−10, −70)
    const a = analyseSamples(parseSamplesText("-9, -65\n-8, -60\n-7, -55\n-6, -50"), GMWL_EXACT);
    expect(a.below).toBe(3);
    expect(a.evaporation.kind).toBe("fitted");
    if (a.evaporation.kind !== "fitted") return;
    expect(a.evaporation.line.slope).toBeCloseTo(5, 9);
    expect(a.evaporation.sourceWater.d18O).toBeCloseTo(-10, 9);
    expect(a.evaporation.sourceWater.d2H).toBeCloseTo(-70, 9);
  });

  it("the line's band: Var(a·x + b) with Cov(a, b) = −x̄·SE(a)² is smallest at the centre", () => {
    const line = { slope: 7.5, intercept: 5, slopeSE: 0.2, interceptSE: 1.8, meanD18O: -8 };
    expect(lineSd(line, -8)).toBeCloseTo(Math.sqrt(1.8 ** 2 - 64 * 0.04), 12);
    expect(lineSd(line, -2)).toBeGreaterThan(lineSd(line, -8));
    expect(lineSd(line, -14)).toBeGreaterThan(lineSd(line, -8));
    expect(lineCentre([
      { d18O: { value: -10 }, precipMm: { value: 30 } },
      { d18O: { value: -4 }, precipMm: { value: 10 } },
    ])).toBeCloseTo(-8.5, 12);
  });
});
