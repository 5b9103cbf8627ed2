// Rainprint's sample columns: one list used by the CSV reader, the template, the
// multi-row form and the documentation on the page. Client-safe (no server imports).

export type ColumnKind = "code" | "date" | "number" | "text";

export type SampleColumn = {
  /** Column name in files and form field name. */
  name: SampleColumnName;
  label: string;
  required: boolean;
  kind: ColumnKind;
  /** Plain words for the page and the template's notes. */
  help: string;
  example: string;
};

export const SAMPLE_COLUMN_NAMES = [
  "station_code",
  "collected_from",
  "collected_until",
  "d18O_permil",
  "d2H_permil",
  "amount_mm",
  "d18O_sd_permil",
  "d2H_sd_permil",
  "method",
  "laboratory",
  "scale",
  "reference_waters",
  "notes",
] as const;
export type SampleColumnName = (typeof SAMPLE_COLUMN_NAMES)[number];

export const SAMPLE_COLUMNS: readonly SampleColumn[] = [
  { name: "station_code", label: "Station code", required: true, kind: "code", help: "The code of one of your approved stations.", example: "RP-EUR-001" },
  { name: "collected_from", label: "Collected from", required: true, kind: "date", help: "First day of the collection period, YYYY-MM-DD.", example: "2026-06-01" },
  { name: "collected_until", label: "Collected until", required: true, kind: "date", help: "Day the collector was emptied, YYYY-MM-DD; the period runs up to this day, not including it (a June sample is 2026-06-01 to 2026-07-01).", example: "2026-07-01" },
  { name: "d18O_permil", label: "δ18O (‰)", required: true, kind: "number", help: "δ18O in ‰ vs VSMOW, the number only (no ‰ sign), decimal point.", example: "-7.42" },
  { name: "d2H_permil", label: "δ2H (‰)", required: true, kind: "number", help: "δ2H in ‰ vs VSMOW, the number only, decimal point.", example: "-49.8" },
  { name: "amount_mm", label: "Amount (mm)", required: false, kind: "number", help: "Precipitation amount of the period in mm (0 for a dry period).", example: "83.5" },
  { name: "d18O_sd_permil", label: "δ18O uncertainty (‰, 1σ)", required: false, kind: "number", help: "Analytical uncertainty of δ18O, one standard deviation.", example: "0.1" },
  { name: "d2H_sd_permil", label: "δ2H uncertainty (‰, 1σ)", required: false, kind: "number", help: "Analytical uncertainty of δ2H, one standard deviation.", example: "1.0" },
  { name: "method", label: "Method", required: false, kind: "text", help: "How the sample was measured, e.g. laser spectroscopy or IRMS.", example: "laser spectroscopy" },
  { name: "laboratory", label: "Laboratory", required: false, kind: "text", help: "The laboratory that measured the sample.", example: "Example Isotope Laboratory" },
  { name: "scale", label: "Scale", required: false, kind: "text", help: "Normalisation scale; Rainprint expects VSMOW-SLAP.", example: "VSMOW-SLAP" },
  { name: "reference_waters", label: "Reference waters", required: false, kind: "text", help: "Reference materials used for normalisation, e.g. VSMOW2; SLAP2.", example: "VSMOW2; SLAP2" },
  { name: "notes", label: "Notes", required: false, kind: "text", help: "Anything a reviewer should know (up to 500 characters).", example: "" },
];

export const REQUIRED_COLUMNS = SAMPLE_COLUMNS.filter((c) => c.required).map((c) => c.name);

/** Upload limits, stated on the page and enforced by the server. */
export const INTAKE_LIMITS = {
  maxFileBytes: 5 * 1024 * 1024,
  maxRows: 10_000,
  maxFormRows: 200,
  maxTextLength: 500,
} as const;

export type SampleRowInput = Partial<Record<SampleColumnName, string>>;

export function columnLabel(name: string): string {
  return SAMPLE_COLUMNS.find((c) => c.name === name)?.label ?? name;
}
