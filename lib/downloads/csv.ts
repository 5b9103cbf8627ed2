// CSV for downloads: RFC 4180 quoting (comma separator, CRLF line ends,
// fields with a comma, quote or line break in double quotes, quotes doubled)
// and formula neutralisation for text cells. Pure.
//
// Formula neutralisation follows OWASP's "CSV Injection" guidance [trade]: a
// text cell that begins with =, +, -, @, a tab or a carriage return is
// prefixed with a single quote, so a spreadsheet shows it as text instead of
// running it. Numbers are written from numbers and never touched (a negative
// δ18O stays −8.1, not '−8.1).

export type CsvValue = string | number | boolean | null | undefined;

const FORMULA_START = /^[=+\-@\t\r]/;
const NEEDS_QUOTES = /[",\r\n]|^\s|\s$/;

/** A text cell made safe for spreadsheets. */
export function neutraliseFormula(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/** One cell: numbers as written (non-finite → empty), text neutralised and quoted when needed. */
export function csvCell(v: CsvValue): string {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  if (typeof v === "boolean") return v ? "yes" : "no";
  const text = neutraliseFormula(v);
  return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvRow(cells: readonly CsvValue[]): string {
  return `${cells.map(csvCell).join(",")}\r\n`;
}

/** A number rounded to `digits` significant digits (Float32 values carry about 7). */
export function sig(v: number | null | undefined, digits = 7): number | null {
  if (v === null || v === undefined || !Number.isFinite(v)) return null;
  return Number(v.toPrecision(digits));
}

/** A number rounded to `decimals` places (coordinates, δ values). */
export function fixed(v: number | null | undefined, decimals: number): number | null {
  if (v === null || v === undefined || !Number.isFinite(v)) return null;
  return Number(v.toFixed(decimals));
}
