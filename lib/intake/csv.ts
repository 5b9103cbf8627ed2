// Reading a sample file: bytes → rows of cells keyed by Rainprint's column names, or one
// file-level message. Pure and client-safe (papaparse), so the page, the route handler,
// the corpus test and the benchmark all read files the same way.
//
// Tolerated without comment: a UTF-8 byte-order mark, UTF-16 with its byte-order mark,
// `,` `;` or tab as the delimiter, quoted fields, CRLF or LF line ends, blank lines and
// column names in any letter case. Everything else is reported, per file or per row.
import Papa from "papaparse";
import { INTAKE_LIMITS, REQUIRED_COLUMNS, SAMPLE_COLUMNS, SAMPLE_COLUMN_NAMES, type SampleColumnName } from "./columns";
import type { CellError } from "./schemas";
import { csvRow } from "@/lib/downloads/csv";

export type CsvRow = {
  /** Line of the file this row came from (the header is line 1). */
  line: number;
  cells: Partial<Record<SampleColumnName, string>>;
  /** Problems found while reading (wrong number of cells, duplicate row). */
  errors: CellError[];
};

export type CsvReadResult =
  | { ok: true; delimiter: string; rows: CsvRow[]; sizeBytes: number }
  | { ok: false; message: string; sizeBytes: number };

const MB = 1024 * 1024;
const fmtMb = (n: number) => `${(n / MB).toFixed(1)} MB`;
const DELIMITER_NAMES: Record<string, string> = { ",": "comma", ";": "semicolon", "\t": "tab" };

/** Read a sample file. `limits` can be raised by the benchmark; the routes use INTAKE_LIMITS. */
export function readSampleCsv(bytes: Uint8Array, limits: { maxFileBytes: number; maxRows: number } = INTAKE_LIMITS): CsvReadResult {
  const sizeBytes = bytes.byteLength;
  const fail = (message: string): CsvReadResult => ({ ok: false, message, sizeBytes });
  if (sizeBytes > limits.maxFileBytes)
    return fail(`The file is ${fmtMb(sizeBytes)}; an upload can be at most ${fmtMb(limits.maxFileBytes)}. Split it into several batches. Nothing was saved.`);
  if (sizeBytes === 0) return fail("The file is empty. Nothing was saved.");

  const kind = sniffBinary(bytes);
  if (kind) return fail(`This is not a CSV text file (${kind}). Save your sheet as “CSV UTF-8” and upload that. Nothing was saved.`);

  let text: string;
  try {
    text = decode(bytes);
  } catch {
    return fail(
      "The file is not UTF-8 text (it looks like an older encoding such as Windows-1252 or Latin-1). Save it as “CSV UTF-8” and upload it again. Nothing was saved.",
    );
  }
  if (/\u0000/.test(text)) return fail("The file contains binary data (NUL bytes), so it cannot be a CSV text file. Nothing was saved.");
  if (text.trim() === "") return fail("The file holds only blank lines. Nothing was saved.");

  const parsed = Papa.parse<string[]>(text, { delimiter: "", delimitersToGuess: [",", ";", "\t"], skipEmptyLines: "greedy" });
  const data = parsed.data;
  const header = (data[0] ?? []).map((h) => h.trim());
  const delimiter = parsed.meta.delimiter || ",";

  // ── header ──
  const byLower = new Map(SAMPLE_COLUMN_NAMES.map((c) => [c.toLowerCase(), c]));
  const columns: (SampleColumnName | null)[] = [];
  const unknown: string[] = [];
  const seen = new Set<string>();
  for (const h of header) {
    const c = byLower.get(h.toLowerCase()) ?? null;
    if (c && seen.has(c)) return fail(`The column “${c}” appears twice in the first line. Keep one. Nothing was saved.`);
    if (c) seen.add(c);
    else if (h !== "") unknown.push(h);
    columns.push(c);
  }
  if (seen.size === 0)
    return fail(
      `The first line must name the columns (${REQUIRED_COLUMNS.join(", ")}, …); none of Rainprint's column names were found. Download the template to see them. Nothing was saved.`,
    );
  if (unknown.length)
    return fail(
      `${unknown.length === 1 ? "The column" : "The columns"} ${unknown.map((u) => `“${clip(u)}”`).join(", ")} ${unknown.length === 1 ? "is" : "are"} not one of Rainprint's columns. Rename or remove ${unknown.length === 1 ? "it" : "them"}; the template lists the columns. Nothing was saved.`,
    );
  const missing = REQUIRED_COLUMNS.filter((c) => !seen.has(c));
  if (missing.length)
    return fail(
      `The file has no ${missing.map((m) => `“${m}” (${SAMPLE_COLUMNS.find((c) => c.name === m)!.label})`).join(", ")} column. Required columns: ${REQUIRED_COLUMNS.join(", ")}. Nothing was saved.`,
    );

  const body = data.slice(1);
  if (body.length === 0) return fail("The file has the column names but no sample rows. Nothing was saved.");
  if (body.length > limits.maxRows)
    return fail(`The file has ${body.length.toLocaleString("en-GB")} sample rows; a batch can hold at most ${limits.maxRows.toLocaleString("en-GB")}. Split it into several files. Nothing was saved.`);

  // papaparse's row-level problems (unclosed quotes and the like), by data row index.
  const parseErrors = new Map<number, string>();
  for (const e of parsed.errors) {
    if (e.row === undefined || e.row === null) continue;
    if (e.code === "UndetectableDelimiter") continue;
    const msg = e.code === "MissingQuotes" || e.code === "InvalidQuotes" ? "A quoted cell is not closed properly (a \" is missing or misplaced)." : e.message;
    parseErrors.set(e.row - 1, msg);
  }

  const rows: CsvRow[] = [];
  const firstSeen = new Map<string, number>();
  for (let i = 0; i < body.length; i++) {
    const raw = body[i];
    const line = i + 2;
    const errors: CellError[] = [];
    const pe = parseErrors.get(i);
    if (pe) errors.push({ column: "row", message: pe });
    if (raw.length !== header.length && !(raw.length > header.length && raw.slice(header.length).every((c) => c.trim() === "")))
      errors.push({
        column: "row",
        message: `This line has ${raw.length} cells but the first line names ${header.length} columns (the file's delimiter is the ${DELIMITER_NAMES[delimiter] ?? delimiter}).`,
      });
    const cells: Partial<Record<SampleColumnName, string>> = {};
    for (let j = 0; j < columns.length; j++) {
      const c = columns[j];
      if (c) cells[c] = raw[j] ?? "";
    }
    const key = SAMPLE_COLUMN_NAMES.map((c) => (cells[c] ?? "").trim()).join("\u0001");
    const prev = firstSeen.get(key);
    if (prev !== undefined) errors.push({ column: "row", message: `This line repeats line ${prev} exactly; remove one of them.` });
    else firstSeen.set(key, line);
    rows.push({ line, cells, errors });
  }
  return { ok: true, delimiter, rows, sizeBytes };
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}…` : s;
}

/** A name for common non-text files, or null. */
function sniffBinary(b: Uint8Array): string | null {
  const starts = (...sig: number[]) => sig.every((v, i) => b[i] === v);
  if (starts(0x50, 0x4b, 0x03, 0x04)) return "it looks like an Excel workbook or another ZIP archive";
  if (starts(0xd0, 0xcf, 0x11, 0xe0)) return "it looks like an old Excel .xls workbook";
  if (starts(0x25, 0x50, 0x44, 0x46)) return "it looks like a PDF";
  if (starts(0x1f, 0x8b)) return "it looks like a gzip archive";
  if (starts(0x89, 0x50, 0x4e, 0x47)) return "it looks like a PNG image";
  if (starts(0xff, 0xd8, 0xff)) return "it looks like a JPEG image";
  return null;
}

function decode(b: Uint8Array): string {
  if (b[0] === 0xff && b[1] === 0xfe) return new TextDecoder("utf-16le", { fatal: true }).decode(b.subarray(2));
  if (b[0] === 0xfe && b[1] === 0xff) return new TextDecoder("utf-16be", { fatal: true }).decode(b.subarray(2));
  const start = b[0] === 0xef && b[1] === 0xbb && b[2] === 0xbf ? 3 : 0;
  return new TextDecoder("utf-8", { fatal: true }).decode(b.subarray(start));
}

/** The template to download: the header, one example row and nothing else. */
export function templateCsv(): string {
  // Written like every CSV Rainprint makes: numbers as numbers, text neutralised against formulas.
  const example = SAMPLE_COLUMNS.map((c) => (c.kind === "number" ? Number(c.example) : c.example));
  return csvRow(SAMPLE_COLUMNS.map((c) => c.name)) + csvRow(example);
}
