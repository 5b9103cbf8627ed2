import { describe, expect, it } from "vitest";
import { normalizeTwoPoint, REFERENCE_WATERS, twoPointScale, VSMOW_RATIOS } from "@/lib/isotopes";

describe("two-point normalisation onto VSMOW–SLAP [trade; Coplen 1988 mem]", () => {
  const refs18 = [
    { measured: 0.42, assigned: REFERENCE_WATERS.VSMOW2.d18O },
    { measured: -54.1, assigned: REFERENCE_WATERS.SLAP2.d18O },
  ] as const;

  it("normalising the reference waters' own measurements returns their assigned values [pub assigned values]", () => {
    expect(normalizeTwoPoint(0.42, refs18)).toBeCloseTo(0, 12);
    expect(normalizeTwoPoint(-54.1, refs18)).toBeCloseTo(-55.5, 12);
    const refs2 = [
      { measured: 3.1, assigned: REFERENCE_WATERS.VSMOW2.d2H },
      { measured: -421.0, assigned: REFERENCE_WATERS.SLAP2.d2H },
    ] as const;
    expect(normalizeTwoPoint([3.1, -421.0], refs2)).toEqual([expect.closeTo(0, 10), expect.closeTo(-427.5, 10)]);
  });

  it("recovers GISP (−24.78‰, −189.5‰) measured on a stretched and shifted scale [pub assigned values]", () => {
    // A run whose scale is stretched by 0.98 and shifted by +0.4‰ (invented instrument behaviour).
    const meas = (v: number) => 0.98 * v + 0.4;
    const refs = [
      { measured: meas(0), assigned: 0 },
      { measured: meas(-55.5), assigned: -55.5 },
    ] as const;
    expect(normalizeTwoPoint(meas(REFERENCE_WATERS.GISP.d18O), refs)).toBeCloseTo(-24.78, 10);
    const { slope, intercept } = twoPointScale(refs);
    expect(slope).toBeCloseTo(1 / 0.98, 12);
    expect(intercept).toBeCloseTo(-0.4 / 0.98, 12);
  });

  it("SLAP defines the scale at −55.5‰ / −428‰ exactly — Coplen (1994) [pub]; VSMOW ratios from the IAEA sheet [pub]", () => {
    expect(REFERENCE_WATERS.SLAP.d18O).toBe(-55.5);
    expect(REFERENCE_WATERS.SLAP.d2H).toBe(-428);
    expect(VSMOW_RATIOS.r2H).toBe(155.76e-6);
    expect(VSMOW_RATIOS.r18O).toBe(2005.2e-6);
  });

  it("refuses reference waters that cannot define a scale", () => {
    expect(() => normalizeTwoPoint(-5, [{ measured: 0, assigned: 0 }, { measured: 0, assigned: -55.5 }])).toThrow(/same value/);
    expect(() => normalizeTwoPoint(-5, [{ measured: 0, assigned: 0 }, { measured: -50, assigned: 0 }])).toThrow(/same assigned/);
    expect(() => normalizeTwoPoint(Number.NaN, refs18)).toThrow(TypeError);
  });
});
