import { describe, expect, it } from "vitest";
import {
  equilibriumAlpha,
  equilibriumEpsilonPermil,
  GONFIANTINI_KINETIC_CONSTANTS_PERMIL,
  kineticConstantFromDiffusivity,
  kineticEnrichment,
  MERLIVAT_DIFFUSIVITY_RATIOS,
  OCEAN_KINETIC_FACTORS_PERMIL,
} from "@/lib/isotopes";

describe("equilibrium liquid–vapour fractionation", () => {
  // Majoube (1971) tabulated as ε = α − 1 [pub, secondary]: 0 °C 11.7‰ / 112.3‰,
  // 10 °C 10.7‰ / 97.7‰, 20 °C 9.8‰ / 85.0‰ (18O / 2H).
  const table: [number, number, number][] = [
    [0, 11.7, 112.3],
    [10, 10.7, 97.7],
    [20, 9.8, 85.0],
  ];
  it.each(table)("Majoube (1971) at %i °C gives ε18 = %f‰ and ε2 = %f‰ to the table's rounding [pub]", (tC, e18, e2) => {
    expect(Math.abs(equilibriumEpsilonPermil(tC, "18O", "majoube1971") - e18)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(equilibriumEpsilonPermil(tC, "2H", "majoube1971") - e2)).toBeLessThanOrEqual(0.05);
  });

  it("Horita & Wesolowski (1994) equations, evaluated from the published coefficients [pub]", () => {
    for (const tC of [0, 25, 50, 100, 200, 350]) {
      const T = tC + 273.15;
      const ln18 = (-7.685 + 6.7123e3 / T - 1.6664e6 / T ** 2 + 0.35041e9 / T ** 3) / 1000;
      const ln2 = ((1158.8 * T ** 3) / 1e9 - (1620.1 * T ** 2) / 1e6 + (794.84 * T) / 1e3 - 161.04 + 2.9992e9 / T ** 3) / 1000;
      expect(Math.log(equilibriumAlpha(tC, "18O", "horita-wesolowski1994"))).toBeCloseTo(ln18, 12);
      expect(Math.log(equilibriumAlpha(tC, "2H", "horita-wesolowski1994"))).toBeCloseTo(ln2, 12);
    }
  });

  it("Horita & Wesolowski (1994) agrees with Majoube (1971) at ambient temperatures within ~0.1‰ (18O) and ~1‰ (2H) [trade]", () => {
    for (const tC of [0, 10, 20, 30, 40]) {
      const d18 = equilibriumEpsilonPermil(tC, "18O", "horita-wesolowski1994") - equilibriumEpsilonPermil(tC, "18O", "majoube1971");
      const d2 = equilibriumEpsilonPermil(tC, "2H", "horita-wesolowski1994") - equilibriumEpsilonPermil(tC, "2H", "majoube1971");
      expect(Math.abs(d18)).toBeLessThan(0.15);
      expect(Math.abs(d2)).toBeLessThan(1.0);
    }
  });

  it("α > 1 and falls with temperature (liquid is heavier; fractionation weakens when warm) [trade]", () => {
    for (const src of ["majoube1971", "horita-wesolowski1994"] as const) {
      let prev = Infinity;
      for (let tC = 0; tC <= 100; tC += 10) {
        const a = equilibriumAlpha(tC, "18O", src);
        expect(a).toBeGreaterThan(1);
        expect(a).toBeLessThan(prev);
        prev = a;
      }
    }
  });

  it("refuses temperatures outside the equations' published ranges, saying which range", () => {
    expect(() => equilibriumAlpha(-5, "18O", "majoube1971")).toThrow(RangeError);
    expect(() => equilibriumAlpha(120, "2H", "majoube1971")).toThrow(/0–100 °C/);
    expect(() => equilibriumAlpha(400, "18O", "horita-wesolowski1994")).toThrow(/374.1/);
    expect(() => equilibriumAlpha(Number.NaN, "18O")).toThrow(TypeError);
    // @ts-expect-error — unknown isotope
    expect(() => equilibriumAlpha(10, "17O")).toThrow(/"18O" or "2H"/);
  });
});

describe("kinetic enrichment", () => {
  it("Merlivat's (1978) diffusivity ratios 0.9723 and 0.9755 [pub] are what we use", () => {
    expect(MERLIVAT_DIFFUSIVITY_RATIOS["18O"]).toBe(0.9723);
    expect(MERLIVAT_DIFFUSIVITY_RATIOS["2H"]).toBe(0.9755);
  });

  it("Merlivat's ratios with n = 1/2 reproduce Gonfiantini's (1986) 14.2‰ and 12.5‰ [mem] within their rounding", () => {
    // C_K = n·(D/D_i − 1)·1000: 0.5·28.49 = 14.24‰ and 0.5·25.12 = 12.56‰ — one unit in the last
    // quoted digit (±0.1‰) of Gonfiantini's constants.
    expect(Math.abs(kineticConstantFromDiffusivity("18O", 0.5) - GONFIANTINI_KINETIC_CONSTANTS_PERMIL["18O"])).toBeLessThan(0.1);
    expect(Math.abs(kineticConstantFromDiffusivity("2H", 0.5) - GONFIANTINI_KINETIC_CONSTANTS_PERMIL["2H"])).toBeLessThan(0.1);
  });

  it("the ratio of the diffusivity constants, 25.1/28.5 = 0.88, matches k2H ≈ 0.88·k18 of Merlivat & Jouzel (1979) [pub ratios; mem factor]", () => {
    const ratio = kineticConstantFromDiffusivity("2H") / kineticConstantFromDiffusivity("18O");
    expect(ratio).toBeCloseTo(0.88, 2);
    expect(OCEAN_KINETIC_FACTORS_PERMIL.k2H / OCEAN_KINETIC_FACTORS_PERMIL.k18).toBeCloseTo(0.88, 10);
  });

  it("ε_K = C_K·(1 − h): zero at saturation, C_K in dry air — Gonfiantini (1986) [mem constants]", () => {
    expect(kineticEnrichment(1, "18O")).toBe(0);
    expect(kineticEnrichment(0, "18O")).toBeCloseTo(14.2, 12);
    expect(kineticEnrichment(0.75, "2H")).toBeCloseTo(12.5 * 0.25, 12);
    expect(kineticEnrichment(0.6, "18O", { method: "diffusivity", n: 1 })).toBeCloseTo(0.4 * (1 / 0.9723 - 1) * 1000, 10);
  });

  it("refuses humidity given in percent and other bad arguments", () => {
    expect(() => kineticEnrichment(75, "18O")).toThrow(/fraction/);
    expect(() => kineticEnrichment(-0.1, "18O")).toThrow(RangeError);
    expect(() => kineticConstantFromDiffusivity("18O", 2)).toThrow(/1\/2/);
  });
});
