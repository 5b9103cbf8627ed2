// The toy physical model behind the synthetic demo samples. Simple on purpose: it has
// the large-scale patterns an isoscape should recover (latitude, altitude, continental
// and seasonal effects, an amount effect in the tropics, regional d-excess) and a
// spatially correlated residual so kriging has real structure to find. It is not a
// climate model and its numbers are not measurements.

import { greatCircleKm } from "@/lib/geo";
import { Rng } from "./prng";

// ── coefficients ──────────────────────────────────────────────────────────────────
/** δ18O = A·LAT² + B·|LAT| + C·ALT + D — form of Bowen & Wilkinson (2002), Geology 30:315; A, B, D as recalled [mem]. */
export const BW_A = -0.0051;
export const BW_B = 0.1805;
export const BW_D = -5.247;
/** Altitude effect −0.28‰ per 100 m — Poage & Chamberlain (2001), Am. J. Sci. 301:1 [mem]. Used as C. */
export const LAPSE_PERMIL_PER_M = -0.0028;
/** Continental effect, ‰ per 1000 km from the coast (order of magnitude of Rozanski et al. 1993 [mem]); toy value. */
export const CONTINENTAL_PERMIL_PER_1000KM = -1.5;
/** Amount effect ≈ −1.5‰ per 100 mm of monthly rain at tropical stations — Dansgaard (1964), Tellus 16:436 [mem]. */
export const AMOUNT_PERMIL_PER_MM = -0.015;
/** Mean d-excess of precipitation ≈ +10‰ [trade]; δ2H = 8·δ18O + d (Dansgaard 1964 definition [pub]). */
export const D_EXCESS_MEAN = 10;

/** Sea-level annual δ18O (‰) of the latitude term alone. */
export function latitudeTermPermil(lat: number): number {
  const a = Math.abs(lat);
  return BW_A * a * a + BW_B * a + BW_D;
}

// ── smooth random fields ──────────────────────────────────────────────────────────
/** A sum of Gaussian bumps on the sphere: smooth, spatially correlated over 500–2000 km. */
export interface Field {
  at(lon: number, lat: number): number;
}

export function bumpField(
  seed: number,
  name: string,
  opts: { count: number; scaleKm: [number, number]; amplitude: number },
): Field {
  const rng = Rng.derive(seed, `field:${name}`);
  const bumps = Array.from({ length: opts.count }, () => ({
    lon: rng.uniform(-180, 180),
    lat: (Math.asin(rng.uniform(-1, 1)) * 180) / Math.PI,
    scaleKm: rng.uniform(opts.scaleKm[0], opts.scaleKm[1]),
    amp: rng.normal(0, opts.amplitude),
  }));
  return {
    at(lon, lat) {
      let v = 0;
      for (const b of bumps) {
        const d = greatCircleKm(lon, lat, b.lon, b.lat);
        if (d < 4 * b.scaleKm) v += b.amp * Math.exp(-0.5 * (d / b.scaleKm) ** 2);
      }
      return v;
    },
  };
}

// ── per-station climate ───────────────────────────────────────────────────────────
export interface StationClimate {
  /** Long-term annual δ18O before amount weighting, ‰. */
  annualD18O: number;
  /** Half the seasonal swing of δ18O from temperature, ‰. */
  seasonalAmplitude: number;
  /** Month (1–12, fractional) of the δ18O maximum: local summer. */
  peakMonth: number;
  /** Weight of tropical behaviour (amount effect, wet/dry seasons), 0–1. */
  tropical: number;
  /** Station mean d-excess, ‰, and half its seasonal swing (maximum in local winter). */
  dExcess: number;
  dExcessAmplitude: number;
  /** Mean annual precipitation (mm) and its seasonal cycle. */
  annualPrecipMm: number;
  precipStrength: number;
  precipPeakMonth: number;
  /** Month-to-month δ18O noise (1σ), ‰. */
  noiseD18O: number;
}

export interface ClimateFields {
  d18OResidual: Field;
  dExcessResidual: Field;
  precipLog: Field;
  precipPhase: Field;
}

export function makeFields(seed: number): ClimateFields {
  return {
    // Residual δ18O: ±~1‰ over 500–2000 km, the structure kriging should find.
    d18OResidual: bumpField(seed, "d18o", { count: 120, scaleKm: [500, 2000], amplitude: 0.9 }),
    dExcessResidual: bumpField(seed, "dexcess", { count: 90, scaleKm: [600, 2000], amplitude: 1.3 }),
    precipLog: bumpField(seed, "precip", { count: 90, scaleKm: [500, 1800], amplitude: 0.25 }),
    precipPhase: bumpField(seed, "precip-phase", { count: 60, scaleKm: [800, 2000], amplitude: 1.0 }),
  };
}

const clamp = (x: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, x));

/** Regions whose moisture comes from dry air masses have higher d-excess (e.g. ≈ +20‰ in the eastern Mediterranean, Gat & Carmi 1970 [mem]). */
const HIGH_D_SOURCES = [
  { lon: 36, lat: 33, scaleKm: 900, add: 9 },
  { lon: 62, lat: 40, scaleKm: 1000, add: 4 },
  { lon: 105, lat: 38, scaleKm: 900, add: 3 },
];

export function stationClimate(
  f: ClimateFields,
  s: { lon: number; lat: number; elevationM: number; coastKm: number },
): StationClimate {
  const absLat = Math.abs(s.lat);
  const inland = Math.min(s.coastKm, 2500);
  const annualD18O =
    latitudeTermPermil(s.lat) +
    LAPSE_PERMIL_PER_M * s.elevationM +
    (CONTINENTAL_PERMIL_PER_1000KM * inland) / 1000 +
    f.d18OResidual.at(s.lon, s.lat);
  // Temperature-driven seasonality grows with latitude and continentality (toy).
  const seasonalAmplitude = 0.5 + 0.075 * Math.min(absLat, 70) + (1.2 * inland) / 1000;
  const north = s.lat >= 0;
  const tropical = clamp((25 - absLat) / 12, 0, 1);

  let dExcess = D_EXCESS_MEAN + f.dExcessResidual.at(s.lon, s.lat);
  for (const h of HIGH_D_SOURCES) {
    const d = greatCircleKm(s.lon, s.lat, h.lon, h.lat);
    dExcess += h.add * Math.exp(-0.5 * (d / h.scaleKm) ** 2);
  }
  const dExcessAmplitude = 1 + 2.5 * (1 - tropical) * Math.min(absLat, 60) / 60;

  // Annual precipitation (mm): wet tropics, dry subtropics, moderate mid-latitudes,
  // dry polar regions; drier inland, wetter uphill (toy shape).
  const zonal =
    650 +
    1400 * Math.exp(-((s.lat / 12) ** 2)) -
    400 * Math.exp(-(((absLat - 25) / 8) ** 2)) +
    300 * Math.exp(-(((absLat - 50) / 12) ** 2)) -
    250 * clamp((absLat - 55) / 20, 0, 1);
  const annualPrecipMm = clamp(
    zonal * Math.exp(-inland / 2000) * (1 + Math.min(s.elevationM, 3000) / 3000) * Math.exp(f.precipLog.at(s.lon, s.lat)),
    80,
    4000,
  );
  // Seasonal cycle of rain: monsoon-like in the tropics (summer wet season, dry months),
  // summer maximum far inland, winter maximum near the coast in the subtropics.
  const phaseJitter = f.precipPhase.at(s.lon, s.lat);
  const summer = north ? 7 : 1;
  const winter = north ? 1 : 7;
  let precipStrength: number;
  let precipPeakMonth: number;
  if (tropical > 0.5) {
    precipStrength = 1.0 + 0.4 * tropical + 0.2 * phaseJitter;
    precipPeakMonth = summer + 0.8 * phaseJitter;
  } else if (absLat < 42 && s.coastKm < 600) {
    precipStrength = 0.9 + 0.3 * phaseJitter;
    precipPeakMonth = winter + 0.8 * phaseJitter;
  } else {
    precipStrength = 0.35 + 0.15 * phaseJitter + Math.min(inland, 2000) / 4000;
    precipPeakMonth = (s.coastKm > 500 ? summer : winter + 3) + phaseJitter;
  }
  return {
    annualD18O,
    seasonalAmplitude,
    peakMonth: north ? 7 : 1,
    tropical,
    dExcess,
    dExcessAmplitude,
    annualPrecipMm,
    precipStrength: clamp(precipStrength, 0.1, 1.7),
    precipPeakMonth,
    noiseD18O: 0.7 + 0.12 * seasonalAmplitude,
  };
}

/** Mean of max(0, 1 + s·cos θ) over a year, to keep the annual total when dry months are cut off. */
function seasonalNorm(strength: number): number {
  let sum = 0;
  for (let m = 0; m < 12; m++) sum += Math.max(0, 1 + strength * Math.cos((2 * Math.PI * m) / 12));
  return sum / 12;
}

/** Amount-weighted mean of the seasonal shape, mean(shape²)/mean(shape). */
function weightedShape(strength: number): number {
  let s1 = 0;
  let s2 = 0;
  for (let m = 0; m < 12; m++) {
    const v = Math.max(0, 1 + strength * Math.cos((2 * Math.PI * m) / 12));
    s1 += v;
    s2 += v * v;
  }
  return s2 / s1;
}

export interface MonthValues {
  amountMm: number;
  d18O: number;
  d2H: number;
}

/**
 * Monthly precipitation amount and composition for calendar month `month` (1–12).
 * `yearAnomaly` is a per-station-year δ18O offset; `rng` supplies the weather noise.
 */
export function monthValues(c: StationClimate, month: number, yearAnomaly: number, rng: Rng): MonthValues {
  const phase = (m0: number) => Math.cos((2 * Math.PI * (month - m0)) / 12);
  const meanMonthly = c.annualPrecipMm / 12;
  const shape = Math.max(0, 1 + c.precipStrength * phase(c.precipPeakMonth)) / seasonalNorm(c.precipStrength);
  // Month-to-month variability of rain: lognormal, σ(ln) = 0.45 (toy).
  const amountMm = meanMonthly * shape * Math.exp(rng.normal(-0.1, 0.45));

  const temperature = (1 - 0.7 * c.tropical) * c.seasonalAmplitude * phase(c.peakMonth);
  // Amount effect around the amount-weighted mean monthly rain, so it leaves the
  // amount-weighted annual mean (what the latitude form describes) about unchanged.
  const weightedMonthly = meanMonthly * weightedShape(c.precipStrength) / seasonalNorm(c.precipStrength);
  const amount = c.tropical * clamp(AMOUNT_PERMIL_PER_MM * (amountMm - weightedMonthly), -4, 4);
  const d18O = c.annualD18O + temperature + amount + yearAnomaly + rng.normal(0, c.noiseD18O);

  // d-excess: highest in local winter (winter peak = summer peak + 6 months) [trade],
  // lowered in very dry months by evaporation of falling rain [trade].
  let d = c.dExcess - c.dExcessAmplitude * phase(c.peakMonth);
  if (amountMm < 15) d -= 3 * (1 - amountMm / 15);
  d += rng.normal(0, 1.3);
  const d2H = 8 * d18O + d;
  return { amountMm, d18O, d2H };
}
