import { describe, expect, it } from "vitest";
import { craigGordon, equilibriumAlpha, equilibriumVapour, kineticEnrichment } from "@/lib/isotopes";

// A temperate lake fed by rain of −8‰/−54‰ (on the global line, d = +10), air vapour in
// equilibrium with that rain. Invented inputs for identities; no outside value.
const rain = { d18O: -8, d2H: -54 };
const base = { tempC: 20, humidity: 0.75, atmosphere: equilibriumVapour(rain, 20), lake: rain };

describe("Craig–Gordon evaporation model — Gonfiantini (1986), Gat (1996) [pub forms]", () => {
  it("δE follows (α*⁻¹δL − hδA − ε)/(1 − h + 10⁻³ε_K) with ε* = (1 − 1/α*)·1000", () => {
    const r = craigGordon(base);
    const a = equilibriumAlpha(20, "18O");
    const epsK = kineticEnrichment(0.75, "18O");
    const eps = (1 - 1 / a) * 1000 + epsK;
    const expected = (rain.d18O / a - 0.75 * base.atmosphere.d18O - eps) / (1 - 0.75 + epsK / 1000);
    expect(r.d18O.deltaE).toBeCloseTo(expected, 12);
    expect(r.d18O.epsilonKPermil).toBeCloseTo(14.2 * 0.25, 12);
  });

  it("the same δE from the ratio form of the model, R_E = (R_L/α* − h·R_A)/(1 − h + 10⁻³ε_K) [identity]", () => {
    const r = craigGordon(base);
    for (const [key, iso] of [
      ["d18O", "18O"],
      ["d2H", "2H"],
    ] as const) {
      const a = equilibriumAlpha(20, iso);
      const epsK = kineticEnrichment(0.75, iso);
      const RL = 1 + base.lake[key] / 1000;
      const RA = 1 + base.atmosphere[key] / 1000;
      const RE = (RL / a - 0.75 * RA) / (1 - 0.75 + epsK / 1000);
      expect(r[key].deltaE).toBeCloseTo((RE - 1) * 1000, 9);
    }
  });

  it("evaporating water is lighter than the lake, and the evaporation line is shallower than 8 [trade]", () => {
    const r = craigGordon(base);
    expect(r.d18O.deltaE).toBeLessThan(rain.d18O);
    expect(r.d2H.deltaE).toBeLessThan(rain.d2H);
    expect(r.evaporationLineSlope).toBeGreaterThan(3);
    expect(r.evaporationLineSlope).toBeLessThan(8);
  });

  it("the evaporation line stays below slope 8, and within 3.5–6 for temperate lakes [trade: commonly 4–6]", () => {
    const atm = { d18O: -16, d2H: -120 }; // air vapour not in equilibrium with the lake (invented)
    const slope = (tC: number, h: number) =>
      craigGordon({ tempC: tC, humidity: h, atmosphere: atm, lake: rain }).evaporationLineSlope as number;
    for (const tC of [5, 15, 30]) for (const h of [0.3, 0.5, 0.7, 0.85, 0.95]) expect(slope(tC, h)).toBeLessThan(8);
    for (const tC of [5, 15]) {
      for (const h of [0.3, 0.5, 0.7, 0.85]) {
        expect(slope(tC, h)).toBeGreaterThan(3.5);
        expect(slope(tC, h)).toBeLessThan(6);
      }
    }
  });

  it("for a lake at 0‰ the slope equals Gat's (1996) approximation [h(δA − δL) + ε]₂/[h(δA − δL) + ε]₁₈ within 1%", () => {
    const p = { tempC: 15, humidity: 0.7, atmosphere: { d18O: -14, d2H: -100 }, lake: { d18O: 0, d2H: 0 } };
    const r = craigGordon(p);
    const approx =
      (0.7 * (-100 - 0) + r.d2H.epsilonPermil) / (0.7 * (-14 - 0) + r.d18O.epsilonPermil);
    expect(Math.abs((r.evaporationLineSlope as number) / approx - 1)).toBeLessThan(0.01);
  });

  it("δ* is where the evaporate equals the lake: a lake at δ* evaporates with δE = δ* [identity]", () => {
    const r = craigGordon(base);
    const atStar = craigGordon({ ...base, lake: { d18O: r.d18O.deltaStar, d2H: r.d2H.deltaStar } });
    expect(atStar.d18O.deltaE).toBeCloseTo(r.d18O.deltaStar, 9);
    expect(atStar.d2H.deltaE).toBeCloseTo(r.d2H.deltaStar, 8);
  });

  it("a drying lake: δL(1) = δ0, δL rises towards δ* as f falls, dδL/d ln f = δE − δL [identity]", () => {
    expect(craigGordon({ ...base, remainingFraction: 1 }).d18O.deltaLAtF).toBeCloseTo(rain.d18O, 12);
    let prev = -Infinity;
    for (const f of [1, 0.8, 0.5, 0.2, 0.05, 1e-6]) {
      const v = craigGordon({ ...base, remainingFraction: f }).d18O.deltaLAtF as number;
      expect(v).toBeGreaterThanOrEqual(prev);
      prev = v;
    }
    const r = craigGordon(base);
    expect(prev).toBeCloseTo(r.d18O.deltaStar, 3);
    // Numerical derivative at f = 1 equals the flux difference δE − δL (Rayleigh-type balance).
    const h = 1e-6;
    const v1 = craigGordon({ ...base, remainingFraction: 1 - h }).d2H.deltaLAtF as number;
    const slope = (rain.d2H - v1) / (Math.log(1) - Math.log(1 - h));
    expect(slope).toBeCloseTo(r.d2H.deltaE - rain.d2H, 3);
  });

  it("a through-flow lake with no evaporation (E/I = 0) equals its inflow", () => {
    const inflow = { d18O: -6.3, d2H: -41 };
    const r = craigGordon({ ...base, inflow, evaporationToInflow: 0 });
    expect(r.d18O.deltaLSteadyState).toBeCloseTo(inflow.d18O, 12);
    expect(r.d2H.deltaLSteadyState).toBeCloseTo(inflow.d2H, 12);
  });

  it("a steady through-flow lake satisfies the mass balance I·δI = Q·δL + E·δE (Gat 1996) [identity]", () => {
    const inflow = { d18O: -6.3, d2H: -41 };
    for (const x of [0.1, 0.4, 0.9]) {
      const r = craigGordon({ tempC: 18, humidity: 0.65, atmosphere: { d18O: -15, d2H: -110 }, inflow, evaporationToInflow: x });
      // lake omitted → computed at the steady state, so δE here belongs to the steady lake
      expect((1 - x) * r.lake.d18O + x * r.d18O.deltaE).toBeCloseTo(inflow.d18O, 9);
      expect((1 - x) * r.lake.d2H + x * r.d2H.deltaE).toBeCloseTo(inflow.d2H, 8);
      expect(r.lake.d18O).toBeGreaterThan(inflow.d18O); // evaporation enriches the lake
    }
  });

  it("says what is wrong with bad parameters", () => {
    expect(() => craigGordon({ ...base, humidity: 75 })).toThrow(/fraction/);
    expect(() => craigGordon({ ...base, humidity: 1 })).toThrow(RangeError);
    expect(() => craigGordon({ ...base, humidity: 0.005 })).toThrow(/no finite limiting composition/);
    expect(() => craigGordon({ ...base, remainingFraction: 0 })).toThrow(/remaining fraction/);
    expect(() => craigGordon({ ...base, remainingFraction: 1.2 })).toThrow(RangeError);
    expect(() => craigGordon({ ...base, inflow: rain })).toThrow(/evaporationToInflow/);
    expect(() => craigGordon({ ...base, tempC: 150, equilibrium: "majoube1971" })).toThrow(/0–100 °C/);
    expect(() => craigGordon({ ...base, atmosphere: { d18O: Number.NaN, d2H: -100 } })).toThrow(/atmosphere.d18O/);
    const { lake: _lake, ...noLake } = base;
    expect(() => craigGordon(noLake)).toThrow(/lake composition/);
  });
});

describe("vapour in equilibrium with a liquid", () => {
  it("R_vapour = R_liquid/α*, so vapour over 0‰ water at 20 °C is (1/α − 1)·1000 [definition of α]", () => {
    const v = equilibriumVapour({ d18O: 0, d2H: 0 }, 20, "majoube1971");
    expect(v.d18O).toBeCloseTo((1 / equilibriumAlpha(20, "18O", "majoube1971") - 1) * 1000, 12);
    expect(v.d18O).toBeCloseTo(-9.7, 1); // ≈ −ε from Majoube's table at 20 °C (9.8‰) [pub]
  });
});
