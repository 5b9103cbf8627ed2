// Rainprint's colour ramps (lib/tiles/ramps.ts): perceptual uniformity, lightness order,
// and what people with colour-vision deficiencies see.
//
// OKLab is Ottosson (2020), "A perceptual color space for image processing" [pub], as
// implemented by the culori package (the reference library here). Colour-vision deficiency
// is simulated with the severity-1.0 matrices of Machado, Oliveira & Fernandes (2009),
// IEEE TVCG 15(6):1291–1298 [pub], applied to linear sRGB as the paper prescribes. The matrix
// values below were written from memory [mem] and are checked against culori's copy of
// the authors' published table (culori applies them to gamma-encoded sRGB, so we compare
// matrices, not simulated colours).
import { converter, filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit, type Oklab } from "culori";
import { describe, expect, it } from "vitest";
import { EXTRAPOLATION_STYLE, LUT_SIZE, RAMPS, rampLut, rampStops, type RampId } from "@/lib/tiles/ramps";

const MACHADO_2009 = {
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
} as const;
type Deficiency = keyof typeof MACHADO_2009;

const toOklab = converter("oklab");
const toLrgb = converter("lrgb");

type Rgb8 = [number, number, number];

function lutColours(id: RampId, steps = LUT_SIZE): Rgb8[] {
  const lut = rampLut(id);
  const out: Rgb8[] = [];
  for (let k = 0; k < steps; k++) {
    const i = Math.round((k * (LUT_SIZE - 1)) / (steps - 1));
    out.push([lut[3 * i], lut[3 * i + 1], lut[3 * i + 2]]);
  }
  return out;
}

const lab = ([r, g, b]: Rgb8): Oklab => toOklab({ mode: "rgb", r: r / 255, g: g / 255, b: b / 255 });
const dE = (p: Oklab, q: Oklab) => Math.hypot(p.l - q.l, p.a - q.a, p.b - q.b);

/** Machado et al. (2009) simulation on linear sRGB, result clipped to the gamut. */
function simulate(c: Rgb8, d: Deficiency): Oklab {
  const lin = toLrgb({ mode: "rgb", r: c[0] / 255, g: c[1] / 255, b: c[2] / 255 });
  const m = MACHADO_2009[d];
  const v = [lin.r, lin.g, lin.b];
  const [r, g, b] = m.map((row) => Math.min(1, Math.max(0, row[0] * v[0] + row[1] * v[1] + row[2] * v[2])));
  return toOklab({ mode: "lrgb", r, g, b });
}

function expectUniform(c: Oklab[], tolerance = 0.06): void {
  const steps = c.slice(1).map((p, i) => dE(c[i], p));
  const mean = steps.reduce((a, b) => a + b, 0) / steps.length;
  for (const s of steps) expect(Math.abs(s - mean) / mean).toBeLessThan(tolerance);
  // Each step is well above a just-noticeable difference (~0.02 in OKLab [mem]).
  expect(Math.min(...steps)).toBeGreaterThan(0.035);
}

const SEQUENTIAL: RampId[] = ["meltwater", "haze", "rainfall"];
const ALL = Object.keys(RAMPS) as RampId[];

describe("the simulation matrices", () => {
  it("equal culori's copy of Machado et al. (2009), severity 1.0", () => {
    // Applying a filter to the unit vectors of (gamma) sRGB reads the matrix back column by column.
    const filters = { protanopia: filterDeficiencyProt(1), deuteranopia: filterDeficiencyDeuter(1), tritanopia: filterDeficiencyTrit(1) };
    for (const d of Object.keys(MACHADO_2009) as Deficiency[]) {
      const cols = [
        { r: 1, g: 0, b: 0 },
        { r: 0, g: 1, b: 0 },
        { r: 0, g: 0, b: 1 },
      ].map((c) => filters[d]({ mode: "rgb", ...c }) as { r: number; g: number; b: number });
      for (let j = 0; j < 3; j++) {
        expect(cols[j].r).toBeCloseTo(MACHADO_2009[d][0][j], 6);
        expect(cols[j].g).toBeCloseTo(MACHADO_2009[d][1][j], 6);
        expect(cols[j].b).toBeCloseTo(MACHADO_2009[d][2][j], 6);
      }
      // Rows sum to 1: white and greys stay neutral (a property of the published matrices).
      for (const row of MACHADO_2009[d]) expect(row[0] + row[1] + row[2]).toBeCloseTo(1, 5);
    }
  });
});

describe("colour ramps", () => {
  it("OKLab of white is L = 1, a = b = 0 (Ottosson 2020's normalisation)", () => {
    const w = toOklab({ mode: "rgb", r: 1, g: 1, b: 1 });
    expect(w.l).toBeCloseTo(1, 4);
    expect(Math.abs(w.a) + Math.abs(w.b)).toBeLessThan(1e-4);
  });

  it.each(SEQUENTIAL)("%s: lightness rises or falls monotonically over all 256 entries", (id) => {
    const L = lutColours(id).map((c) => lab(c).l);
    const dir = Math.sign(L[L.length - 1] - L[0]);
    for (let i = 1; i < L.length; i++) expect(dir * (L[i] - L[i - 1])).toBeGreaterThan(-1e-3); // 8-bit rounding
    expect(Math.abs(L[L.length - 1] - L[0])).toBeGreaterThan(0.55);
  });

  it("moisture-source (diverging): lightness rises to a light neutral centre, then falls; the ends are about equally dark", () => {
    const colours = lutColours("moisture-source").map(lab);
    const mid = (LUT_SIZE - 1) / 2;
    for (let i = 1; i < LUT_SIZE; i++) {
      const step = colours[i].l - colours[i - 1].l;
      if (i <= Math.floor(mid)) expect(step).toBeGreaterThan(-1e-3);
      if (i > Math.ceil(mid)) expect(step).toBeLessThan(1e-3);
    }
    const centre = colours[Math.round(mid)];
    expect(centre.l).toBeGreaterThan(0.9);
    expect(Math.hypot(centre.a, centre.b)).toBeLessThan(0.03);
    expect(Math.abs(colours[0].l - colours[LUT_SIZE - 1].l)).toBeLessThan(0.03);
  });

  it.each(SEQUENTIAL)("%s: perceptually uniform — equal steps are equal OKLab distances (16-step legend)", (id) => {
    expectUniform(lutColours(id, 16).map(lab));
  });

  it("moisture-source: each arm is perceptually uniform, and the two arms are about equally long", () => {
    const lut = lutColours("moisture-source").map(lab);
    const low = [0, 17, 34, 51, 68, 85, 102, 119, 127].map((i) => lut[i]);
    const high = [128, 136, 153, 170, 187, 204, 221, 238, 255].map((i) => lut[i]);
    expectUniform(low.slice(0, -1), 0.08);
    expectUniform(high.slice(1), 0.08);
    const length = (arm: Oklab[]) => arm.slice(1).reduce((s, p, i) => s + dE(arm[i], p), 0);
    const [a, b] = [length(low), length(high)];
    expect(Math.abs(a - b) / Math.max(a, b)).toBeLessThan(0.15);
  });

  it.each(ALL.flatMap((id) => (Object.keys(MACHADO_2009) as Deficiency[]).map((d) => [id, d] as const)))(
    "%s under %s: adjacent legend steps stay distinguishable and the order of lightness survives",
    (id, d) => {
      const sim = lutColours(id, 12).map((c) => simulate(c, d));
      for (let i = 1; i < sim.length; i++) expect(dE(sim[i - 1], sim[i])).toBeGreaterThan(0.025);
      const L = sim.map((s) => s.l);
      if (RAMPS[id].kind === "sequential") {
        const dir = Math.sign(L[L.length - 1] - L[0]);
        for (let i = 1; i < L.length; i++) expect(dir * (L[i] - L[i - 1])).toBeGreaterThan(0);
      } else {
        // Diverging: the two arms (below and above +10‰) must not be confused — each colour
        // differs clearly from its mirror image on the other arm.
        for (let i = 0; i < sim.length / 2 - 1; i++) expect(dE(sim[i], sim[sim.length - 1 - i])).toBeGreaterThan(0.08);
      }
    },
  );

  it("the extrapolation hatch ink differs from every ramp colour, also under each deficiency", () => {
    const ink = [...EXTRAPOLATION_STYLE.ink] as Rgb8;
    for (const id of ALL)
      for (const c of lutColours(id, 64)) {
        expect(dE(lab(ink), lab(c))).toBeGreaterThan(0.07);
        for (const d of Object.keys(MACHADO_2009) as Deficiency[]) expect(dE(simulate(ink, d), simulate(c, d))).toBeGreaterThan(0.04);
      }
  });

  it("rampStops gives #rrggbb strings from the lookup table, ends included", () => {
    const stops = rampStops("meltwater", 5);
    expect(stops).toHaveLength(5);
    for (const s of stops) expect(s).toMatch(/^#[0-9a-f]{6}$/);
    const lut = rampLut("meltwater");
    expect(stops[0]).toBe(`#${[lut[0], lut[1], lut[2]].map((v) => v.toString(16).padStart(2, "0")).join("")}`);
  });
});
