import { describe, expect, it } from "vitest";
import { rayleigh } from "@/lib/isotopes";

describe("Rayleigh distillation [trade]", () => {
  it("with f = 1 returns the start, and the first product is α times the start", () => {
    const r = rayleigh({ delta0: -12, alpha: 1.0098, f: 1 });
    expect(r.reservoir).toBeCloseTo(-12, 12);
    expect(r.instantaneous).toBeCloseTo((1.0098 * (1 - 0.012) - 1) * 1000, 10);
    expect(r.accumulated).toBeCloseTo(r.instantaneous, 10);
  });

  it("R/R0 = f^(α−1): half the vapour rained out at α = 1.0098 leaves it 6.77‰ lighter", () => {
    const r = rayleigh({ delta0: 0, alpha: 1.0098, f: 0.5 });
    expect(r.reservoir).toBeCloseTo((Math.pow(0.5, 0.0098) - 1) * 1000, 12);
    expect(r.reservoir).toBeCloseTo(-6.77, 2);
  });

  it("mass balance: f·δ_reservoir + (1 − f)·δ_accumulated = δ0 (in ratios)", () => {
    for (const f of [0.9, 0.5, 0.1]) {
      const r = rayleigh({ delta0: -10, alpha: 1.085, f });
      const R = (d: number) => 1 + d / 1000;
      expect(f * R(r.reservoir) + (1 - f) * R(r.accumulated)).toBeCloseTo(R(-10), 12);
    }
  });

  it("refuses f outside (0, 1] and α given in per mil", () => {
    expect(() => rayleigh({ delta0: 0, alpha: 1.01, f: 0 })).toThrow(/remaining fraction/);
    expect(() => rayleigh({ delta0: 0, alpha: 1.01, f: 1.5 })).toThrow(RangeError);
    expect(() => rayleigh({ delta0: 0, alpha: 9.8, f: 0.5 })).toThrow(/ratio of isotope ratios/);
    expect(() => rayleigh({ delta0: Number.NaN, alpha: 1.01, f: 0.5 })).toThrow(TypeError);
  });
});
