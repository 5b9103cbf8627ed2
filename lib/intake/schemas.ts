// The input shapes of the intake, shared by the forms, the route handlers and the CSV
// reader (one zod schema per shape, so the three never disagree). Client-safe.
import { z } from "zod";
import { INTAKE_LIMITS, SAMPLE_COLUMN_NAMES, type SampleColumnName, columnLabel } from "./columns";

// ───────────── stations ─────────────

export const COLLECTOR_TYPE_LABELS = {
  "bulk-oil": "Bulk totaliser with oil layer",
  "bulk-paraffin": "Bulk totaliser with paraffin layer",
  "bulk-tube-dip": "Bulk totaliser with dip tube (no oil)",
  "wet-only": "Wet-only collector",
  event: "Event sampler",
  snow: "Snow sampler",
  other: "Other",
} as const;
export type CollectorType = keyof typeof COLLECTOR_TYPE_LABELS;
export const COLLECTOR_TYPE_KEYS = Object.keys(COLLECTOR_TYPE_LABELS) as [CollectorType, ...CollectorType[]];

export const SAMPLING_INTERVAL_LABELS = {
  monthly: "Monthly",
  weekly: "Weekly",
  event: "Per rain event",
  daily: "Daily",
  other: "Other",
} as const;
export type SamplingInterval = keyof typeof SAMPLING_INTERVAL_LABELS;
export const SAMPLING_INTERVAL_KEYS = Object.keys(SAMPLING_INTERVAL_LABELS) as [SamplingInterval, ...SamplingInterval[]];

const trimmed = (max: number) => z.string().trim().max(max, `Keep it under ${max} characters.`);
const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `Keep it under ${max} characters.`)
    .nullish()
    .transform((v) => (v ? v : null));

/** A number typed into a form (text) or sent as a number. */
const numberField = (what: string, min: number, max: number) =>
  z.preprocess(
    (v) => (typeof v === "string" ? (v.trim() === "" ? undefined : Number(v.trim().replace(/^−/, "-"))) : v),
    z
      .number({ error: `Enter the ${what} as a number.` })
      .refine((n) => Number.isFinite(n), `Enter the ${what} as a number.`)
      .refine((n) => n >= min && n <= max, `The ${what} must be between ${min} and ${max}.`),
  );

export const STATION_CODE_RE = /^[A-Z0-9][A-Z0-9-]{2,23}$/;

export const stationInput = z
  .object({
    code: z
      .string()
      .trim()
      .transform((s) => s.toUpperCase())
      .pipe(z.string().regex(STATION_CODE_RE, "Use 3–24 capital letters, digits and hyphens, e.g. HILL-01.")),
    name: trimmed(120).min(2, "Give the station a name."),
    lat: numberField("latitude", -90, 90),
    lon: numberField("longitude", -180, 180),
    elevationM: numberField("elevation", -450, 8900),
    collectorType: z.enum(COLLECTOR_TYPE_KEYS, { error: "Choose the collector type." }),
    samplingInterval: z.enum(SAMPLING_INTERVAL_KEYS, { error: "Choose the sampling interval." }),
    operatingOrg: optionalText(160),
    startDate: z
      .string()
      .trim()
      .nullish()
      .transform((v) => (v ? v : null))
      .refine((v) => v === null || isRealIsoDate(v), "Enter the start date as YYYY-MM-DD."),
    notes: optionalText(2000),
  })
  .superRefine((s, ctx) => {
    if (s.lat === 0 && s.lon === 0)
      ctx.addIssue({
        code: "custom",
        path: ["lat"],
        message: "0, 0 is in the Gulf of Guinea and usually means the coordinates were not filled in. Enter the station's position.",
      });
  });
export type StationInput = z.output<typeof stationInput>;
/** A returned station corrected by its owner (same fields, and the row version the form was loaded with). */
export const stationCorrectionInput = z.intersection(stationInput, z.object({ rowVersion: z.number().int().positive() }));
export type StationFormValues = z.input<typeof stationInput>;

export const decisionReason = z.string().trim().max(1000, "Keep the reason under 1000 characters.");

export const stationDecisionInput = z
  .object({
    decision: z.enum(["approve", "return", "reject"]),
    reason: decisionReason.default(""),
    rowVersion: z.number().int().positive(),
  })
  .superRefine((d, ctx) => {
    if (d.decision !== "approve" && d.reason.length < 3)
      ctx.addIssue({ code: "custom", path: ["reason"], message: "Say why, so the contributor knows what to change." });
  });

// ───────────── samples ─────────────

/** A validated sample row (strings parsed). */
export type ParsedSample = {
  stationCode: string;
  startDate: string;
  endDate: string;
  d18O: number;
  d2H: number;
  amountMm: number | null;
  d18OSd: number | null;
  d2HSd: number | null;
  method: string | null;
  laboratory: string | null;
  scale: string | null;
  referenceWaters: string | null;
  notes: string | null;
};

export type CellError = { column: SampleColumnName | "row"; message: string };

const NUMBER_RE = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const FORMULA_RE = /^[=@]|^[+-][A-Za-z(]/;

/** One number cell → number, null (empty optional) or a message. Exported for tests. */
export function parseNumberCell(raw: string | undefined, column: SampleColumnName, required: boolean): number | null | { error: string } {
  const label = columnLabel(column);
  const s = (raw ?? "").trim().replace(/^\u2212/, "-");
  if (s === "") return required ? { error: `${label} is required.` } : null;
  if (FORMULA_RE.test(s)) return { error: `“${clip(s)}” looks like a spreadsheet formula; enter the number itself.` };
  if (/‰|per ?mil/i.test(s)) return { error: `Remove the ‰ sign: enter the number only (values are read as ‰).` };
  if (/^[+-]?\d+,\d+$/.test(s)) return { error: `“${s}” uses a decimal comma; write ${s.replace(",", ".")} with a decimal point.` };
  if (/%$/.test(s)) return { error: `“${clip(s)}” is a percentage; enter the value in ‰ as a number.` };
  if (!NUMBER_RE.test(s)) return { error: `“${clip(s)}” is not a number; ${label} needs a number.` };
  const n = Number(s);
  if (!Number.isFinite(n)) return { error: `“${clip(s)}” is not a usable number.` };
  return n;
}

/** One date cell → ISO date or a message. */
export function parseDateCell(raw: string | undefined, column: SampleColumnName): string | { error: string } {
  const label = columnLabel(column);
  const s = (raw ?? "").trim();
  if (s === "") return { error: `${label} is required.` };
  if (/^\d{4}-\d{2}-\d{2}$/.test(s)) {
    return isRealIsoDate(s) ? s : { error: `${s} is not a real calendar date.` };
  }
  return { error: `“${clip(s)}” is not a date in the YYYY-MM-DD form (for example 2026-06-01).` };
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}…` : s;
}

export function isRealIsoDate(s: string): boolean {
  if (s.length !== 10 || !/^\d{4}-\d{2}-\d{2}$/.test(s)) return false;
  const y = Number(s.slice(0, 4));
  const m = Number(s.slice(5, 7));
  const d = Number(s.slice(8, 10));
  if (m < 1 || m > 12 || d < 1) return false;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  return d <= [31, leap ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][m - 1];
}

let tomorrowOf: { today: string; tomorrow: string } = { today: "", tomorrow: "" };
function addOneDay(iso: string): string {
  if (tomorrowOf.today !== iso) {
    const d = new Date(`${iso}T00:00:00Z`);
    d.setUTCDate(d.getUTCDate() + 1);
    tomorrowOf = { today: iso, tomorrow: d.toISOString().slice(0, 10) };
  }
  return tomorrowOf.tomorrow;
}

/**
 * Validate one row of cells (from the form or a CSV line). `today` is injected (ISO date)
 * so results are reproducible. Returns the parsed sample or the cell errors.
 */
export function validateSampleRow(cells: Record<string, string | undefined>, today: string): { sample: ParsedSample | null; errors: CellError[] } {
  const errors: CellError[] = [];
  const num = (c: SampleColumnName, required: boolean) => {
    const r = parseNumberCell(cells[c], c, required);
    if (r !== null && typeof r === "object") {
      errors.push({ column: c, message: r.error });
      return null;
    }
    return r;
  };
  const date = (c: SampleColumnName) => {
    const r = parseDateCell(cells[c], c);
    if (typeof r === "object") {
      errors.push({ column: c, message: r.error });
      return null;
    }
    return r;
  };
  const text = (c: SampleColumnName) => {
    const s = (cells[c] ?? "").trim();
    if (!s) return null;
    if (s.length > INTAKE_LIMITS.maxTextLength) {
      errors.push({ column: c, message: `${columnLabel(c)} is ${s.length} characters long; keep it under ${INTAKE_LIMITS.maxTextLength}.` });
      return null;
    }
    if (/[\u0000-\u0008\u000b\u000c\u000e-\u001f]/.test(s)) {
      errors.push({ column: c, message: `${columnLabel(c)} contains control characters; remove them.` });
      return null;
    }
    return s;
  };
  const code = (cells.station_code ?? "").trim().toUpperCase();
  if (!code) errors.push({ column: "station_code", message: "Station code is required." });
  else if (!STATION_CODE_RE.test(code)) errors.push({ column: "station_code", message: `“${clip(code)}” is not a station code (3–24 capital letters, digits and hyphens).` });
  const startDate = date("collected_from");
  const endDate = date("collected_until");
  const d18O = num("d18O_permil", true);
  const d2H = num("d2H_permil", true);
  const amountMm = num("amount_mm", false);
  const d18OSd = num("d18O_sd_permil", false);
  const d2HSd = num("d2H_sd_permil", false);
  if (d18OSd !== null && d18OSd < 0) errors.push({ column: "d18O_sd_permil", message: "An uncertainty cannot be negative." });
  if (d2HSd !== null && d2HSd < 0) errors.push({ column: "d2H_sd_permil", message: "An uncertainty cannot be negative." });
  if (startDate && endDate) {
    if (endDate < startDate) errors.push({ column: "collected_until", message: `Collected until (${endDate}) is before collected from (${startDate}); check the order of the dates.` });
    else if (endDate === startDate) errors.push({ column: "collected_until", message: `Collected until is the same day as collected from (${startDate}); the period runs up to, not including, the until day.` });
  }
  const tomorrow = addOneDay(today);
  if (startDate && startDate > today) errors.push({ column: "collected_from", message: `Collected from (${startDate}) is in the future (today is ${today}).` });
  else if (endDate && endDate > tomorrow) errors.push({ column: "collected_until", message: `Collected until (${endDate}) is in the future (today is ${today}).` });
  const sample: ParsedSample = {
    stationCode: code,
    startDate: startDate ?? "",
    endDate: endDate ?? "",
    d18O: d18O ?? NaN,
    d2H: d2H ?? NaN,
    amountMm,
    d18OSd,
    d2HSd,
    method: text("method"),
    laboratory: text("laboratory"),
    scale: text("scale"),
    referenceWaters: text("reference_waters"),
    notes: text("notes"),
  };
  return errors.length ? { sample: null, errors } : { sample, errors };
}

/** Cells as the form and the JSON routes send them (every column a string). */
export const sampleRowCells = z.object(
  Object.fromEntries(SAMPLE_COLUMN_NAMES.map((c) => [c, z.string().max(2000).optional()])) as Record<SampleColumnName, z.ZodOptional<z.ZodString>>,
);

/** Rows typed into the multi-row form (or loaded from a file and edited). */
export const sampleRowsInput = z.object({
  rows: z.array(sampleRowCells).min(1, "Add at least one sample.").max(INTAKE_LIMITS.maxRows, `A batch holds at most ${INTAKE_LIMITS.maxRows.toLocaleString("en-GB")} samples.`),
});

/** What the submit route takes: the rows, and the uploaded file they came from (if any). */
export const submitBatchInput = sampleRowsInput.extend({
  note: z.string().trim().max(1000).optional(),
  file: z
    .object({
      name: z.string().trim().min(1).max(200),
      contentBase64: z.string().max(Math.ceil((INTAKE_LIMITS.maxFileBytes * 4) / 3) + 8, "The file is larger than the upload limit."),
    })
    .optional(),
});
export type SubmitBatchInput = z.infer<typeof submitBatchInput>;

export const resubmitInput = z.object({ cells: sampleRowCells, rowVersion: z.number().int().positive() });

export const sampleDecisionInput = z
  .object({
    decision: z.enum(["accept", "reject", "return"]),
    reason: decisionReason.default(""),
    samples: z.array(z.object({ id: z.string().min(1).max(64), rowVersion: z.number().int().positive() })).min(1).max(INTAKE_LIMITS.maxRows),
  })
  .superRefine((d, ctx) => {
    if (d.decision !== "accept" && d.reason.length < 3)
      ctx.addIssue({ code: "custom", path: ["reason"], message: "Say why, so the contributor knows what to do." });
  });
export type SampleDecisionInput = z.infer<typeof sampleDecisionInput>;

export const acceptCleanInput = z.object({
  samples: z.array(z.object({ id: z.string().min(1).max(64), rowVersion: z.number().int().positive() })).min(1).max(INTAKE_LIMITS.maxRows),
});
