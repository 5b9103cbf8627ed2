import { describe, expect, it } from "vitest";
import { dExcess, GMWL, GMWL_AMOUNT_WEIGHTED_1993, lcExcess, REFERENCE_WATERS } from "@/lib/isotopes";

describe("deuterium excess and lc-excess", () => {
  it("d = δ2H − 8·δ18O — Dansgaard (1964) [pub]", () => {
    expect(dExcess(-8, -54)).toBeCloseTo(10, 12);
    expect(dExcess(-10.5, -74.2)).toBeCloseTo(9.8, 12);
  });

  it("seawater ≈ 0‰/0‰ has d ≈ 0 [trade]", () => {
    expect(dExcess(0, 0)).toBe(0);
  });

  it("every point on the global meteoric water line δ2H = 8·δ18O + 10 has d = +10‰ — Craig (1961) [pub]", () => {
    for (const x of [-50, -25, -10, -3, 0, 4]) expect(dExcess(x, GMWL.slope * x + GMWL.intercept)).toBeCloseTo(10, 10);
  });

  it("reference waters' d-excess follows from their assigned values — IAEA sheets, Coplen (1994) [pub]", () => {
    // VSMOW2 0/0 → d = 0; SLAP2 −55.50/−427.5 → 16.5; SLAP −55.5/−428 → 16.0; GISP −24.78/−189.5 → 8.74
    expect(dExcess(REFERENCE_WATERS.VSMOW2.d18O, REFERENCE_WATERS.VSMOW2.d2H)).toBeCloseTo(0, 10);
    expect(dExcess(REFERENCE_WATERS.SLAP2.d18O, REFERENCE_WATERS.SLAP2.d2H)).toBeCloseTo(16.5, 10);
    expect(dExcess(REFERENCE_WATERS.SLAP.d18O, REFERENCE_WATERS.SLAP.d2H)).toBeCloseTo(16.0, 10);
    expect(dExcess(REFERENCE_WATERS.GISP.d18O, REFERENCE_WATERS.GISP.d2H)).toBeCloseTo(8.74, 10);
  });

  it("lc-excess = δ2H − a·δ18O − b — Landwehr & Coplen (2006) [pub]; against the GMWL it is d − 10", () => {
    expect(lcExcess(-8, -54, GMWL)).toBeCloseTo(0, 12);
    for (const [x, y] of [
      [-12.3, -85.1],
      [-2.2, -4.9],
      [-55.5, -427.5],
    ]) {
      expect(lcExcess(x, y, GMWL)).toBeCloseTo(dExcess(x, y) - 10, 10);
    }
    expect(lcExcess(-5, -30, { slope: 7.5, intercept: 6 })).toBeCloseTo(-30 + 37.5 - 6, 12);
  });

  it("points on a local line have lc-excess 0 whatever its slope", () => {
    const line = { slope: 7.2, intercept: 3.1 };
    for (const x of [-20, -7, 1]) expect(lcExcess(x, line.slope * x + line.intercept, line)).toBeCloseTo(0, 10);
  });

  it("the amount-weighted global line is kept as recalled: 8.17·δ18O + 11.27 — Rozanski et al. (1993) [mem]", () => {
    // [mem] recalled, not confirmed; some texts quote 8.13/10.8. Only shown for comparison.
    expect(GMWL_AMOUNT_WEIGHTED_1993.slope).toBe(8.17);
    expect(GMWL_AMOUNT_WEIGHTED_1993.intercept).toBe(11.27);
  });

  it("refuses NaN and missing values with a message naming the value", () => {
    expect(() => dExcess(Number.NaN, -50)).toThrow(TypeError);
    expect(() => dExcess(-8, Number.POSITIVE_INFINITY)).toThrow(/δ2H must be a finite number/);
    // @ts-expect-error — a missing line is refused at run time
    expect(() => lcExcess(-8, -50, undefined)).toThrow(/slope, intercept/);
    expect(() => lcExcess(-8, -50, { slope: Number.NaN, intercept: 10 })).toThrow(/line.slope/);
  });
});
