// Coordinates typed by people: decimal degrees or degrees-minutes-seconds, one
// parser for the site-lookup form, batch files and the API. Pure; safe in
// client components.
//
//   46.5042        -7.25        46.5042 N       7.2083°E
//   46°30'15"N     46°30′15″N   46 30 15 N      N 46 30 15     46°30.25'N
//
// A hemisphere letter (N/S for latitude, E/W for longitude) or a sign gives the
// direction, not both. Minutes and seconds are below 60. Latitude −90…90,
// longitude −180…180 (WGS84).

export type Axis = "lat" | "lon";

export class CoordinateError extends Error {
  readonly field: Axis | "elevation" | "site";
  constructor(field: Axis | "elevation" | "site", message: string) {
    super(message);
    this.name = "CoordinateError";
    this.field = field;
  }
}

const NAME: Record<Axis, string> = { lat: "Latitude", lon: "Longitude" };
const LIMIT: Record<Axis, number> = { lat: 90, lon: 180 };
const HEMI: Record<Axis, { pos: string; neg: string }> = { lat: { pos: "N", neg: "S" }, lon: { pos: "E", neg: "W" } };

const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)$/;

/** One latitude or longitude from text; throws CoordinateError with a message for the person. */
export function parseCoordinate(input: string | number, axis: Axis): number {
  const name = NAME[axis];
  if (typeof input === "number") return checkRange(input, axis);
  let s = String(input ?? "").trim();
  if (!s) throw new CoordinateError(axis, `${name} is missing.`);
  if (s.length > 40) throw new CoordinateError(axis, `${name} "${s.slice(0, 40)}…" is too long to be a coordinate.`);
  s = s
    .replace(/[′’‘`´]/g, "'")
    .replace(/[″”“]|''/g, '"')
    .replace(/[º˚]/g, "°")
    .replace(/−/g, "-")
    .toUpperCase();
  // hemisphere letter at either end
  let sign = 1;
  let letter: string | null = null;
  const m = /^([NSEW])\s*(.*)$/.exec(s) ?? /^(.*?)\s*([NSEW])$/.exec(s);
  if (m) {
    const [body, l] = /^[NSEW]$/.test(m[1]) ? [m[2], m[1]] : [m[1], m[2]];
    letter = l;
    s = body.trim();
    const h = HEMI[axis];
    if (l !== h.pos && l !== h.neg) {
      throw new CoordinateError(axis, `${name} "${String(input).trim()}" has the letter ${l}; a ${axis === "lat" ? "latitude takes N or S" : "longitude takes E or W"}.`);
    }
    if (l === h.neg) sign = -1;
  }
  if (/^[+-]/.test(s)) {
    if (letter) throw new CoordinateError(axis, `${name} "${String(input).trim()}" has both a sign and a hemisphere letter; give one of them.`);
    if (s[0] === "-") sign = -sign;
    s = s.slice(1).trim();
  }
  // split into degrees [minutes [seconds]] on the symbols or spaces
  const parts = s
    .replace(/[°'"]/g, " ")
    .trim()
    .split(/\s+/)
    .filter(Boolean);
  if (parts.length === 0 || parts.length > 3 || !parts.every((p) => NUMBER.test(p))) {
    throw new CoordinateError(
      axis,
      `${name} "${String(input).trim()}" is not a number. Use decimal degrees (46.5042) or degrees, minutes and seconds (46°30'15"N or 46 30 15 N).`,
    );
  }
  const nums = parts.map(Number);
  for (let i = 0; i < nums.length - 1; i++) {
    if (!Number.isInteger(nums[i])) throw new CoordinateError(axis, `${name} "${String(input).trim()}": only the last part (degrees, minutes or seconds) may have decimals.`);
  }
  if (nums.length >= 2 && nums[1] >= 60) throw new CoordinateError(axis, `${name} "${String(input).trim()}": minutes must be below 60.`);
  if (nums.length === 3 && nums[2] >= 60) throw new CoordinateError(axis, `${name} "${String(input).trim()}": seconds must be below 60.`);
  const deg = nums[0] + (nums[1] ?? 0) / 60 + (nums[2] ?? 0) / 3600;
  return checkRange(sign * deg, axis, String(input).trim());
}

function checkRange(v: number, axis: Axis, text?: string): number {
  const name = NAME[axis];
  if (!Number.isFinite(v)) throw new CoordinateError(axis, `${name} must be a number.`);
  const lim = LIMIT[axis];
  if (v < -lim || v > lim) {
    throw new CoordinateError(axis, `${name} ${text ?? v} is outside −${lim}…${lim}°${axis === "lat" ? " (south pole to north pole)" : ""}.`);
  }
  return v === 0 ? 0 : v; // no −0
}

/** An optional elevation in metres ("", null → null); −500…9000 m. */
export function parseElevation(input: string | number | null | undefined): number | null {
  if (input === null || input === undefined) return null;
  let s = typeof input === "number" ? String(input) : input.trim();
  if (!s) return null;
  s = s.replace(/−/g, "-").replace(/\s*m(?:etres|eters)?$/i, "");
  if (!NUMBER.test(s)) throw new CoordinateError("elevation", `Elevation "${String(input).trim()}" is not a number of metres.`);
  const v = Number(s);
  if (v < -500 || v > 9000) throw new CoordinateError("elevation", `Elevation ${v} m is outside −500…9000 m.`);
  return v;
}

/**
 * Both coordinates from one string, latitude first: "46.5042, 7.2083", "46.5042 7.2083",
 * `46°30'15"N 7°12'30"E`, "46 30 15 N 7 12 30 E", "N 46 30 15 E 7 12 30".
 */
export function parseCoordinatePair(input: string): { lat: number; lon: number } {
  const raw = String(input ?? "").trim();
  if (!raw) throw new CoordinateError("site", "Enter a latitude and a longitude.");
  const s = raw.toUpperCase();
  let a: string | undefined;
  let b: string | undefined;
  const comma = s.split(/[,;]/);
  if (comma.length === 2) [a, b] = comma;
  else if (comma.length > 2) throw new CoordinateError("site", `"${raw}" has more than two parts; write latitude, longitude (decimal points, not commas).`);
  else {
    const after = /^(.*?[NS])\s+(.+)$/.exec(s); // "… N  7 …"
    const before = /^([NS].*?)\s+([EW].*)$/.exec(s); // "N 46 … E 7 …"
    if (before) [, a, b] = before;
    else if (after) [, a, b] = after;
    else {
      const tokens = s.split(/\s+/);
      if (tokens.length === 2) [a, b] = tokens;
    }
  }
  if (a === undefined || b === undefined) {
    throw new CoordinateError("site", `"${raw}" is not a latitude and a longitude. Write e.g. 46.5042, 7.2083 or 46°30'15"N 7°12'30"E.`);
  }
  return { lat: parseCoordinate(a, "lat"), lon: parseCoordinate(b, "lon") };
}

/** Decimal degrees as degrees-minutes-seconds with a hemisphere letter: 46°30′15.1″N. */
export function formatDms(v: number, axis: Axis, secondsDecimals = 1): string {
  const h = HEMI[axis];
  const a = Math.abs(v);
  let d = Math.floor(a);
  let m = Math.floor((a - d) * 60);
  let sec = Number(((a - d - m / 60) * 3600).toFixed(secondsDecimals));
  if (sec >= 60) {
    sec -= 60;
    m += 1;
  }
  if (m >= 60) {
    m -= 60;
    d += 1;
  }
  return `${d}°${String(m).padStart(2, "0")}′${sec.toFixed(secondsDecimals).padStart(secondsDecimals ? 3 + secondsDecimals : 2, "0")}″${v < 0 ? h.neg : h.pos}`;
}
