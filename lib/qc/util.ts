// Small helpers for the checks: tolerant number reading, number formatting, result building.
import { parseIsoDay } from "../isotopes/dates";
import type { CheckCode, CheckResult, QcSample, Severity } from "./types";

/** The value if it is a finite number, else null (strings, NaN, undefined → null). */
export function num(v: unknown): number | null {
  return typeof v === "number" && Number.isFinite(v) ? v : null;
}

/** Whether a field was given at all (not null/undefined/empty string). */
export function given(v: unknown): boolean {
  return v !== null && v !== undefined && !(typeof v === "string" && v.trim() === "");
}

/** A number for a message, e.g. fmt(-8.123, 1) → "-8.1". */
export function fmt(v: number | null, digits = 1): string {
  if (v === null || !Number.isFinite(v)) return "—";
  const s = v.toFixed(digits);
  return s === `-${(0).toFixed(digits)}` ? (0).toFixed(digits) : s;
}

/** How an odd value looked, for a message. */
export function shown(v: unknown): string {
  if (v === undefined || v === null) return "empty";
  if (typeof v === "number") return String(v);
  if (typeof v === "string") return `"${v.slice(0, 40)}"`;
  return typeof v;
}

/** The day number of an ISO date field, or null. */
export function day(v: unknown): number | null {
  return parseIsoDay(v);
}

/** Words naming a sample in a message: its label, or its period. */
export function nameOf(s: QcSample): string {
  if (typeof s.ref === "string" && s.ref.trim()) return s.ref.trim();
  if (typeof s.startDate === "string" && typeof s.endDate === "string") return `the sample ${s.startDate} to ${s.endDate}`;
  return "another sample";
}

export function result(
  code: CheckCode,
  severity: Severity,
  message: string,
  values: Record<string, number | string | null> = {},
): CheckResult {
  return { code, severity, message, values };
}

const RANK: Record<Severity, number> = { note: 1, warn: 2, fail: 3 };

/** The more serious of two severities. */
export function worse(a: Severity, b: Severity): Severity {
  return RANK[a] >= RANK[b] ? a : b;
}

/** Order of severities, note < warn < fail. */
export function severityRank(s: Severity): number {
  return RANK[s];
}
