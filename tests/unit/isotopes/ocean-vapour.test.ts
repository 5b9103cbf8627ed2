import { describe, expect, it } from "vitest";
import { equilibriumAlpha, oceanVapourClosure, SEAWATER } from "@/lib/isotopes";

describe("ocean vapour under the closure assumption — Merlivat & Jouzel (1979) [pub form; k values mem]", () => {
  it("at ~80% humidity over a 25 °C sea the vapour has d ≈ +10‰ [trade] (smooth-regime k18 = 6‰, k2H = 0.88·k18 [mem])", () => {
    const v = oceanVapourClosure({ seaSurfaceTempC: 25, humidity: 0.8 });
    // computed: δ18O −10.5‰, δ2H −74.5‰, d = +9.4‰
    expect(v.dExcess).toBeGreaterThan(8);
    expect(v.dExcess).toBeLessThan(12);
    expect(v.d18O).toBeLessThan(-9);
    expect(v.d18O).toBeGreaterThan(-12);
  });

  it("d crosses +10‰ between 70% and 85% humidity for sea temperatures of 20–28 °C [trade]", () => {
    for (const sst of [20, 25, 28]) {
      expect(oceanVapourClosure({ seaSurfaceTempC: sst, humidity: 0.7 }).dExcess).toBeGreaterThan(10);
      expect(oceanVapourClosure({ seaSurfaceTempC: sst, humidity: 0.85 }).dExcess).toBeLessThan(10);
    }
  });

  it("d is higher at lower humidity [trade]", () => {
    let prev = -Infinity;
    for (const h of [0.95, 0.9, 0.8, 0.7, 0.6, 0.5]) {
      const d = oceanVapourClosure({ seaSurfaceTempC: 22, humidity: h }).dExcess;
      expect(d).toBeGreaterThan(prev);
      prev = d;
    }
  });

  it("at saturation (h = 1) the vapour is in equilibrium with the sea: R = R_oc/α [identity]", () => {
    const v = oceanVapourClosure({ seaSurfaceTempC: 20, humidity: 1 });
    expect(v.d18O).toBeCloseTo((1 / equilibriumAlpha(20, "18O", "majoube1971") - 1) * 1000, 10);
    expect(v.d2H).toBeCloseTo((1 / equilibriumAlpha(20, "2H", "majoube1971") - 1) * 1000, 10);
  });

  it("seawater is 0‰/0‰ by default [trade] and humidity must be a fraction", () => {
    expect(SEAWATER).toEqual({ d18O: 0, d2H: 0 });
    expect(() => oceanVapourClosure({ seaSurfaceTempC: 20, humidity: 80 })).toThrow(/fraction/);
  });
});
