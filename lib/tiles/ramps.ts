import { clampChroma, converter, formatHex, interpolate, type Oklab, type Oklch } from "culori";

// Rainprint's colour ramps. Each ramp is defined by a few control colours in
// OKLCH (Ottosson 2020, "A perceptual color space for image processing"),
// interpolated in OKLab, brought into the sRGB gamut by lowering chroma only
// (lightness and hue kept), and then re-spaced so that equal steps along the
// ramp are equal distances in OKLab (arc-length resampling): a perceptually
// uniform ramp. Lightness runs monotonically (sequential) or rises to a light
// neutral centre and falls again (diverging), so the order of values survives
// colour-vision deficiencies and greyscale printing (tests/unit/tiles/ramps.test.ts
// checks this with the simulation of Machado, Oliveira & Fernandes 2009).
//
// The ramps are our own; their names follow the product's vocabulary.

export type RampId = "meltwater" | "moisture-source" | "haze" | "rainfall";

export interface RampDefinition {
  id: RampId;
  /** Name shown beside the legend. */
  name: string;
  kind: "sequential" | "diverging";
  /** What it is for. */
  use: string;
  /** Control colours from the low end to the high end of the ramp. */
  controls: { l: number; c: number; h: number }[];
}

export const RAMPS: Record<RampId, RampDefinition> = {
  meltwater: {
    id: "meltwater",
    name: "Meltwater",
    kind: "sequential",
    use: "δ18O and δ2H: dark indigo for depleted (cold, inland, high) rain through teal to pale straw for enriched rain",
    controls: [
      { l: 0.27, c: 0.11, h: 285 },
      { l: 0.45, c: 0.1, h: 245 },
      { l: 0.62, c: 0.1, h: 195 },
      { l: 0.78, c: 0.13, h: 140 },
      { l: 0.94, c: 0.13, h: 100 },
    ],
  },
  "moisture-source": {
    id: "moisture-source",
    name: "Moisture source",
    kind: "diverging",
    use: "d-excess, centred on +10‰: rust for low d-excess (humid source or evaporation), a light neutral at +10‰, blue-violet for high d-excess (dry source)",
    controls: [
      { l: 0.4, c: 0.12, h: 40 },
      { l: 0.68, c: 0.12, h: 60 },
      { l: 0.96, c: 0.01, h: 90 },
      { l: 0.68, c: 0.1, h: 255 },
      { l: 0.4, c: 0.13, h: 275 },
    ],
  },
  haze: {
    id: "haze",
    name: "Haze",
    kind: "sequential",
    use: "uncertainty (standard deviation): pale cream where the surface is well constrained, deep plum where it is not",
    controls: [
      { l: 0.96, c: 0.04, h: 95 },
      { l: 0.8, c: 0.08, h: 40 },
      { l: 0.6, c: 0.12, h: 0 },
      { l: 0.42, c: 0.12, h: 330 },
      { l: 0.28, c: 0.09, h: 310 },
    ],
  },
  rainfall: {
    id: "rainfall",
    name: "Rainfall",
    kind: "sequential",
    use: "precipitation amount: pale sand for dry through green to deep blue for wet",
    controls: [
      { l: 0.95, c: 0.05, h: 95 },
      { l: 0.78, c: 0.1, h: 135 },
      { l: 0.6, c: 0.1, h: 180 },
      { l: 0.43, c: 0.1, h: 235 },
      { l: 0.3, c: 0.1, h: 265 },
    ],
  },
};

/** Entries of a lookup table (colour i stands for t = i / (LUT_SIZE − 1)). */
export const LUT_SIZE = 256;

/**
 * Cells farther than the edition's stated distance from the nearest station
 * (extrapolation) are drawn with the ramp colour washed toward white and
 * crossed by thin diagonal lines in this ink, so they read as "less certain"
 * in every ramp and under colour-vision deficiencies.
 */
export const EXTRAPOLATION_STYLE = {
  /** Fraction of the way from the ramp colour to white. */
  veil: 0.35,
  /** The hatch lines' colour (a dark neutral, OKLCH L 0.33). */
  ink: [62, 62, 66] as const,
  /** A hatch line every `spacing` pixels along the diagonal x + y (tile pixels, continuous across tiles). */
  spacing: 6,
  /** Line width in pixels. */
  width: 1,
};

/** Bumped whenever ramps or tile drawing change: part of every tile's ETag. */
export const RENDER_VERSION = 1;

const toOklab = converter("oklab");
const toRgb = converter("rgb");

const luts = new Map<RampId, Uint8Array>();

/** The ramp as LUT_SIZE sRGB colours, 3 bytes each (r, g, b). Built once per process. */
export function rampLut(id: RampId): Uint8Array {
  let lut = luts.get(id);
  if (!lut) {
    lut = buildLut(RAMPS[id]);
    luts.set(id, lut);
  }
  return lut;
}

/** The colour at t ∈ [0, 1] (clamped) as [r, g, b] bytes. */
export function rampColor(id: RampId, t: number): [number, number, number] {
  const lut = rampLut(id);
  const i = Math.round(Math.min(1, Math.max(0, Number.isFinite(t) ? t : 0)) * (LUT_SIZE - 1));
  return [lut[3 * i], lut[3 * i + 1], lut[3 * i + 2]];
}

/** `n` evenly spaced colours of the ramp as #rrggbb (for legends and station markers). */
export function rampStops(id: RampId, n = 32): string[] {
  const out: string[] = [];
  for (let k = 0; k < n; k++) {
    const [r, g, b] = rampColor(id, n === 1 ? 0.5 : k / (n - 1));
    out.push(`#${[r, g, b].map((v) => v.toString(16).padStart(2, "0")).join("")}`);
  }
  return out;
}

function buildLut(def: RampDefinition): Uint8Array {
  const controls: Oklab[] = def.controls.map((c) => toOklab({ mode: "oklch", l: c.l, c: c.c, h: c.h } satisfies Oklch));
  const dense = densePath(controls);
  const lut = new Uint8Array(LUT_SIZE * 3);
  if (def.kind === "sequential") {
    resample(dense, lut, 0, LUT_SIZE);
  } else {
    // Diverging: the middle control colour is the centre value (t = 0.5). Each arm is
    // re-spaced on its own, so the centre stays at the middle of the table.
    const mid = (controls.length - 1) / 2;
    if (!Number.isInteger(mid)) throw new RangeError(`diverging ramp "${def.id}" needs an odd number of control colours`);
    const half = Math.floor(dense.length / 2);
    resample(dense.slice(0, half + 1), lut, 0, LUT_SIZE / 2);
    resample(dense.slice(half), lut, LUT_SIZE / 2, LUT_SIZE / 2);
  }
  return lut;
}

/** Dense samples along the OKLab polyline, each brought into gamut by lowering chroma (hue and lightness kept). */
function densePath(controls: Oklab[]): Oklab[] {
  const along = interpolate(controls, "oklab");
  // An odd count puts a sample exactly on the middle control colour.
  const DENSE = 4097;
  const dense: Oklab[] = [];
  for (let i = 0; i < DENSE; i++) dense.push(toOklab(clampChroma(along(i / (DENSE - 1)), "oklch")));
  return dense;
}

/** Write `count` colours, equally spaced in OKLab distance along `path`, into lut[offset…]. */
function resample(path: Oklab[], lut: Uint8Array, offset: number, count: number): void {
  const cum = new Float64Array(path.length);
  for (let i = 1; i < path.length; i++) cum[i] = cum[i - 1] + distance(path[i - 1], path[i]);
  const total = cum[path.length - 1];
  let j = 0;
  for (let k = 0; k < count; k++) {
    const target = (total * k) / (count - 1);
    while (j < path.length - 2 && cum[j + 1] < target) j++;
    const span = cum[j + 1] - cum[j];
    const f = span > 0 ? Math.min(1, Math.max(0, (target - cum[j]) / span)) : 0;
    const a = path[j];
    const b = path[j + 1];
    const mixed: Oklab = { mode: "oklab", l: a.l + f * (b.l - a.l), a: a.a + f * (b.a - a.a), b: a.b + f * (b.b - a.b) };
    const hex = formatHex(toRgb(mixed)) as string;
    const at = 3 * (offset + k);
    lut[at] = parseInt(hex.slice(1, 3), 16);
    lut[at + 1] = parseInt(hex.slice(3, 5), 16);
    lut[at + 2] = parseInt(hex.slice(5, 7), 16);
  }
}

/** Euclidean distance in OKLab (ΔE_OK). */
function distance(p: Oklab, q: Oklab): number {
  return Math.hypot(p.l - q.l, p.a - q.a, p.b - q.b);
}
