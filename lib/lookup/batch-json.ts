import type { Estimate, SitePrediction } from "@/lib/editions/prediction";

// A batch answer's results written straight to JSON text (POST /api/v1/predict): the same content
// JSON.stringify gives for the documented BatchSitePrediction object (numbers via toFixed, so
// "−9.120" may keep a trailing zero), without building that object. Pure.

/** Stations listed per site in a batch answer (the single-site answer lists up to 12). */
export const BATCH_STATIONS = 5;

const NEG_ZERO = ["-0", "-0.0", "-0.00", "-0.000", "-0.0000"];

/** x to `d` decimals as JSON text (toFixed; −0 written as 0; non-finite → null). */
function n(x: number, d: number): string {
  if (!Number.isFinite(x)) return "null";
  const t = x.toFixed(d);
  return t === NEG_ZERO[d] ? "0" : t;
}

/** A number as JSON.stringify writes it (non-finite → null). */
const raw = (x: number) => (Number.isFinite(x) ? String(x) : "null");

function estJson(out: string[], e: Estimate): void {
  out.push('{"value":', n(e.value, 3), ',"sd":', n(e.sd, 3), ',"lower95":', n(e.lower95, 3), ',"upper95":', n(e.upper95, 3), "}");
}

function periodJson(out: string[], p: SitePrediction["annual"]): void {
  out.push('"d18O":');
  estJson(out, p.d18O);
  out.push(',"d2H":');
  estJson(out, p.d2H);
  out.push(',"dExcess":');
  estJson(out, p.dExcess);
  out.push(',"precipMm":');
  if (p.precipMm) estJson(out, p.precipMm);
  else out.push("null");
}

/** One result of a batch as JSON text pieces appended to `out` (the text JSON.stringify gives for the batchSitePredictionSchema object, up to trailing zeros). */
export function writeBatchItem(out: string[], p: SitePrediction, id: string, names: Map<string, string> = new Map()): void {
  const s = p.site;
  out.push(
    '{"edition":',
    JSON.stringify(p.edition),
    ',"site":{"id":',
    JSON.stringify(id),
    ',"lat":',
    raw(s.lat),
    ',"lon":',
    raw(s.lon),
    ',"elevationM":',
    s.elevationM === null ? "null" : raw(s.elevationM),
    ',"seaLevelEquivalent":',
    s.elevationM === null ? "true" : "false",
    ',"extrapolation":',
    s.extrapolation ? "true" : "false",
    ',"nearestStationKm":',
    n(s.nearestStationKm, 1),
    ',"extrapolationKm":',
    raw(s.extrapolationKm),
    '},"annual":{',
  );
  periodJson(out, p.annual);
  out.push('},"monthly":[');
  for (let i = 0; i < p.monthly.length; i++) {
    out.push(i ? ',{"month":' : '{"month":', String(p.monthly[i].month), ",");
    periodJson(out, p.monthly[i]);
    out.push("}");
  }
  const w = p.waterLine;
  out.push(
    '],"waterLine":{"slope":',
    n(w.slope, 4),
    ',"intercept":',
    n(w.intercept, 3),
    ',"slopeSE":',
    n(w.slopeSE, 4),
    ',"interceptSE":',
    n(w.interceptSE, 3),
    ',"r2":',
    n(w.r2, 4),
    ',"method":',
    JSON.stringify(w.method),
    '},"stations":[',
  );
  for (let i = 0; i < p.stations.length && i < BATCH_STATIONS; i++) {
    const st = p.stations[i];
    let head = names.get(st.code);
    if (head === undefined) names.set(st.code, (head = `{"code":${JSON.stringify(st.code)},"name":${JSON.stringify(st.name)}`));
    out.push(i ? "," : "", head, ',"distanceKm":', n(st.distanceKm, 1), ',"weight":', n(st.weight, 4), "}");
  }
  out.push("]}");
}

/** One result of a batch as JSON text. */
export function batchItemJson(p: SitePrediction, id: string, names?: Map<string, string>): string {
  const out: string[] = [];
  writeBatchItem(out, p, id, names);
  return out.join("");
}

