import Papa from "papaparse";
import { dExcess, fitWaterLine, lcExcess, sourceWaterFromEvaporationLine, type SourceWaterResult, type WaterLineFit } from "@/lib/isotopes";

// The user's own water samples on the site report: read from pasted text or a
// CSV, placed against the predicted local meteoric water line (d-excess,
// lc-excess, inside or outside the line's band), and — when they plot below
// the line — an evaporation-line fit and the source-water estimate where it
// meets the line. Pure (lib/isotopes does the science); runs in the browser.

/** 97.5% standard-normal quantile [trade]. */
const Z95 = 1.959964;
/** Typical analytical 1σ of δ2H, ‰ [trade] (check-values: 1–2 ‰). */
export const ANALYTICAL_D2H_SD = 2;
export const MAX_SAMPLES = 500;

export interface UserSample {
  label: string;
  d18O: number;
  d2H: number;
  /** Line of the text (1-based). */
  line: number;
}

/** A predicted water line with what is needed for its band. */
export interface PredictedLine {
  slope: number;
  intercept: number;
  slopeSE: number;
  interceptSE: number;
  /** Weighted mean δ18O of the points the line was fitted through (Cov(a, b) = −x̄·SE(a)² for a least-squares line [trade]). */
  meanD18O: number;
}

/** SD of the line's δ2H at δ18O = x: Var(a·x + b) = x²·SE(a)² + SE(b)² + 2x·Cov(a, b), Cov(a, b) = −x̄·SE(a)² [trade]. */
export function lineSd(line: PredictedLine, x: number): number {
  const v = x * x * line.slopeSE ** 2 + line.interceptSE ** 2 - 2 * x * line.meanD18O * line.slopeSE ** 2;
  return Math.sqrt(Math.max(0, v));
}

/** Precipitation-weighted mean δ18O of the monthly predictions (the centre of a PWLSR fit). */
export function lineCentre(monthly: { d18O: { value: number }; precipMm: { value: number } | null }[]): number {
  let sw = 0;
  let sx = 0;
  for (const m of monthly) {
    const w = m.precipMm ? m.precipMm.value : 1;
    sw += w;
    sx += w * m.d18O.value;
  }
  return sw > 0 ? sx / sw : 0;
}

/**
 * Samples from text: a CSV with a header naming the δ18O and δ2H columns (d18O, d18O_permil, δ18O, o18 …; an optional id
 * or label column), or bare lines of "δ18O δ2H" / "label, δ18O, δ2H". Throws an Error listing every bad line.
 */
export function parseSamplesText(text: string): UserSample[] {
  const body = text.replace(/^\uFEFF/, "").trim();
  if (!body) throw new Error("Paste or upload at least one sample: δ18O and δ2H in ‰, one sample per line.");
  const rows = Papa.parse<string[]>(body, { skipEmptyLines: "greedy", delimiter: "" }).data.map((r) => (r.length === 1 ? r[0].trim().split(/[\s;]+/) : r.map((c) => c.trim())));
  const norm = (h: string) => h.toLowerCase().replace(/[δ\s_‰()-]/g, "").replace("permil", "");
  const head = rows[0].map(norm);
  const xi = head.findIndex((h) => ["d18o", "18o", "o18", "delta18o"].includes(h));
  const yi = head.findIndex((h) => ["d2h", "2h", "h2", "dd", "deltad", "delta2h", "dd2h"].includes(h));
  const hasHeader = xi >= 0 && yi >= 0;
  const li = hasHeader ? head.findIndex((h) => ["id", "label", "sample", "name"].includes(h)) : -1;
  const out: UserSample[] = [];
  const problems: string[] = [];
  const start = hasHeader ? 1 : 0;
  if (rows.length - start > MAX_SAMPLES) throw new Error(`At most ${MAX_SAMPLES} samples at a time; this has ${rows.length - start}.`);
  for (let r = start; r < rows.length; r++) {
    const row = rows[r];
    const line = r + 1;
    let label: string;
    let xs: string;
    let ys: string;
    if (hasHeader) {
      xs = row[xi] ?? "";
      ys = row[yi] ?? "";
      label = li >= 0 && row[li] ? row[li] : `#${out.length + 1}`;
    } else if (row.length === 2) {
      [xs, ys] = row;
      label = `#${out.length + 1}`;
    } else if (row.length === 3) {
      [label, xs, ys] = row;
    } else {
      problems.push(`line ${line}: expected δ18O and δ2H (optionally a label first); found ${row.length} fields.`);
      continue;
    }
    const x = Number(xs.replace("−", "-"));
    const y = Number(ys.replace("−", "-"));
    if (!xs || !Number.isFinite(x)) problems.push(`line ${line}: δ18O "${xs}" is not a number.`);
    else if (!ys || !Number.isFinite(y)) problems.push(`line ${line}: δ2H "${ys}" is not a number.`);
    // plausible natural waters, check-values [trade]: δ18O −60…+30 ‰ (evaporated waters reach above +10), δ2H −480…+150 ‰
    else if (x < -60 || x > 30) problems.push(`line ${line}: δ18O ${x} ‰ is outside −60…+30 ‰; are the columns in ‰ and in the right order?`);
    else if (y < -480 || y > 150) problems.push(`line ${line}: δ2H ${y} ‰ is outside −480…+150 ‰; are the columns in ‰ and in the right order?`);
    else out.push({ label: label.slice(0, 60), d18O: x, d2H: y, line });
  }
  if (problems.length) throw new Error(problems.slice(0, 20).join(" ") + (problems.length > 20 ? ` … and ${problems.length - 20} more.` : ""));
  if (!out.length) throw new Error("No samples found: give δ18O and δ2H in ‰, one sample per line.");
  return out;
}

export interface PlacedSample extends UserSample {
  /** d = δ2H − 8·δ18O — Dansgaard (1964). */
  dExcess: number;
  /** δ2H − a·δ18O − b against the predicted line — Landwehr & Coplen (2006). */
  lcExcess: number;
  /** Half-width of the 95% band around the line at this δ18O, analytical δ2H uncertainty included, ‰. */
  band95: number;
  position: "on the line" | "above the line" | "below the line";
}

export interface SampleAnalysis {
  samples: PlacedSample[];
  /** Samples below the band (evaporation or another source). */
  below: number;
  above: number;
  evaporation:
    | { kind: "fitted"; line: WaterLineFit; sourceWater: SourceWaterResult }
    | { kind: "not-applicable"; reason: string }
    | { kind: "failed"; reason: string; line: WaterLineFit | null };
}

export function analyseSamples(samples: readonly UserSample[], line: PredictedLine): SampleAnalysis {
  const placed: PlacedSample[] = samples.map((s) => {
    const lc = lcExcess(s.d18O, s.d2H, line);
    const band95 = Z95 * Math.sqrt(lineSd(line, s.d18O) ** 2 + ANALYTICAL_D2H_SD ** 2);
    return { ...s, dExcess: dExcess(s.d18O, s.d2H), lcExcess: lc, band95, position: lc < -band95 ? "below the line" : lc > band95 ? "above the line" : "on the line" };
  });
  const below = placed.filter((p) => p.position === "below the line").length;
  const above = placed.filter((p) => p.position === "above the line").length;
  let evaporation: SampleAnalysis["evaporation"];
  if (placed.length < 3) evaporation = { kind: "not-applicable", reason: "An evaporation line needs at least three samples." };
  else if (below * 2 < placed.length) evaporation = { kind: "not-applicable", reason: "Most samples plot on or above the predicted line, so there is no evaporation trend to follow back to a source." };
  else {
    let fit: WaterLineFit | null = null;
    try {
      fit = fitWaterLine(placed, "ols");
      const sourceWater = sourceWaterFromEvaporationLine(placed, { slope: line.slope, intercept: line.intercept, slopeSE: line.slopeSE, interceptSE: line.interceptSE, slopeInterceptCov: -line.meanD18O * line.slopeSE ** 2 });
      evaporation = { kind: "fitted", line: fit, sourceWater };
    } catch (e) {
      evaporation = { kind: "failed", reason: e instanceof Error ? e.message : String(e), line: fit };
    }
  }
  return { samples: placed, below, above, evaporation };
}
