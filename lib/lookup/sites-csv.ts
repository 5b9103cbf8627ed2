import Papa from "papaparse";
import { CoordinateError, parseCoordinate, parseElevation } from "./coordinates";

// A file of sites for a batch lookup (the batch page and POST /api/v1/predict
// with a CSV body): a header row, then one site per row. Columns, in any order
// and case: `id` (optional; the line number when absent), `latitude`,
// `longitude` (decimal degrees or degrees-minutes-seconds) and optional
// `elevation_m`. Every problem is reported with its line number; a file with
// any problem gives no sites. Pure: safe in client components.

export const SITE_COLUMNS = {
  id: ["id", "site", "site_id", "name"],
  lat: ["latitude", "lat"],
  lon: ["longitude", "lon", "lng", "long"],
  elevation: ["elevation_m", "elevation", "elev", "altitude_m", "altitude"],
} as const;

export interface SiteRow {
  id: string;
  lat: number;
  lon: number;
  elevationM: number | null;
  /** Line of the file (the header is line 1). */
  line: number;
}

export interface RowError {
  /** Line of the file (header = 1); 0 for the file as a whole. */
  line: number;
  column: string | null;
  message: string;
}

export interface SitesCsvResult {
  sites: SiteRow[];
  errors: RowError[];
}

/** Errors listed at most (the rest are counted). */
export const MAX_LISTED_ERRORS = 200;

const norm = (h: string) => h.trim().toLowerCase().replace(/[\s-]+/g, "_");

export function parseSitesCsv(text: string, opts: { maxSites: number }): SitesCsvResult {
  const errors: RowError[] = [];
  const body = text.replace(/^\uFEFF/, "");
  if (!body.trim()) return { sites: [], errors: [{ line: 0, column: null, message: "The file is empty. The first row names the columns: id, latitude, longitude, elevation_m." }] };
  // every physical row kept, so row r is line r + 1 (a quoted field spanning lines is rare in site files)
  const parsed = Papa.parse<string[]>(body, { skipEmptyLines: false });
  const rows = parsed.data;
  const isEmpty = (r: string[] | undefined) => !r || r.every((c) => c.trim() === "");
  const header = (rows[0] ?? []).map(norm);
  const col = (names: readonly string[]) => header.findIndex((h) => names.includes(h));
  const idx = { id: col(SITE_COLUMNS.id), lat: col(SITE_COLUMNS.lat), lon: col(SITE_COLUMNS.lon), elevation: col(SITE_COLUMNS.elevation) };
  if (idx.lat < 0 || idx.lon < 0) {
    const missing = [idx.lat < 0 ? "latitude" : null, idx.lon < 0 ? "longitude" : null].filter(Boolean).join(" and ");
    return {
      sites: [],
      errors: [{ line: 1, column: null, message: `The first row must name the columns; ${missing} ${missing.includes("and") ? "are" : "is"} missing (found: ${header.join(", ") || "nothing"}). Expected: id, latitude, longitude, elevation_m.` }],
    };
  }
  let dataRows = 0;
  for (let r = 1; r < rows.length; r++) if (!isEmpty(rows[r])) dataRows++;
  if (dataRows > opts.maxSites) {
    return { sites: [], errors: [{ line: 0, column: null, message: `The file has ${dataRows.toLocaleString("en")} sites; at most ${opts.maxSites.toLocaleString("en")} are allowed in one batch.` }] };
  }
  const quoteTrouble = new Set<number>();
  for (const e of parsed.errors) {
    if (e.code === "UndetectableDelimiter" || e.type === "FieldMismatch") continue; // field counts are checked below
    const line = typeof e.row === "number" ? e.row + 1 : 0;
    quoteTrouble.add(line);
    errors.push({ line, column: null, message: e.code === "MissingQuotes" ? "A quoted field is not closed (a \" without its partner)." : e.message });
  }
  const sites: SiteRow[] = [];
  const seen = new Map<string, number>();
  for (let r = 1; r < rows.length; r++) {
    const row = rows[r];
    const line = r + 1;
    if (isEmpty(row) || quoteTrouble.has(line)) continue;
    if (row.length !== header.length) {
      errors.push({ line, column: null, message: `This row has ${row.length} fields; the header has ${header.length}.` });
      continue;
    }
    const cell = (i: number) => (i >= 0 ? (row[i] ?? "").trim() : "");
    let ok = true;
    const fail = (column: string, e: unknown) => {
      ok = false;
      errors.push({ line, column, message: e instanceof CoordinateError ? e.message : String(e) });
    };
    let lat = 0;
    let lon = 0;
    let elevationM: number | null = null;
    try {
      lat = parseCoordinate(cell(idx.lat), "lat");
    } catch (e) {
      fail("latitude", e);
    }
    try {
      lon = parseCoordinate(cell(idx.lon), "lon");
    } catch (e) {
      fail("longitude", e);
    }
    try {
      elevationM = parseElevation(cell(idx.elevation));
    } catch (e) {
      fail("elevation_m", e);
    }
    const id = idx.id >= 0 && cell(idx.id) ? cell(idx.id) : String(line);
    if (id.length > 100) {
      ok = false;
      errors.push({ line, column: "id", message: "An id can have at most 100 characters." });
    }
    const before = seen.get(id);
    if (before !== undefined) {
      ok = false;
      errors.push({ line, column: "id", message: `The id "${id.slice(0, 100)}" is used on line ${before} already; every site needs its own id.` });
    } else seen.set(id, line);
    if (ok) sites.push({ id, lat, lon, elevationM, line });
  }
  if (sites.length === 0 && errors.length === 0) errors.push({ line: 0, column: null, message: "The file has a header but no sites." });
  errors.sort((a, b) => a.line - b.line);
  return { sites: errors.length ? [] : sites, errors };
}

/** The errors as lines of text ("line 3, latitude: Latitude 91 is outside −90…90°."), at most MAX_LISTED_ERRORS. */
export function describeRowErrors(errors: readonly RowError[]): string[] {
  const out = errors.slice(0, MAX_LISTED_ERRORS).map((e) => `${e.line ? `line ${e.line}` : "file"}${e.column ? `, ${e.column}` : ""}: ${e.message}`);
  if (errors.length > MAX_LISTED_ERRORS) out.push(`… and ${errors.length - MAX_LISTED_ERRORS} more problems.`);
  return out;
}
