// ISO calendar dates (YYYY-MM-DD, UTC) as whole day numbers, for collection periods [start, end).

const ISO_DATE = /^(\d{4})-(\d{2})-(\d{2})$/;
const MS_PER_DAY = 86_400_000;

/** Days since 1970-01-01 for a valid ISO date `YYYY-MM-DD`, or null (wrong form or no such day). */
export function parseIsoDay(text: unknown): number | null {
  if (typeof text !== "string") return null;
  const m = ISO_DATE.exec(text.trim());
  if (!m) return null;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  if (mo < 1 || mo > 12 || d < 1 || d > 31) return null;
  const ms = Date.UTC(y, mo - 1, d);
  const back = new Date(ms);
  // Date.UTC rolls 2021-02-30 over to March: reject such days. (Years 0–99 are mapped to 19xx by Date.UTC.)
  if (back.getUTCFullYear() !== y || back.getUTCMonth() !== mo - 1 || back.getUTCDate() !== d) return null;
  return Math.round(ms / MS_PER_DAY);
}

/** ISO `YYYY-MM-DD` for a day number. */
export function isoFromDay(day: number): string {
  return new Date(day * MS_PER_DAY).toISOString().slice(0, 10);
}

/** Calendar year and month (1–12) containing a (possibly fractional) day number. */
export function yearMonthOfDay(day: number): { year: number; month: number } {
  const dt = new Date(Math.floor(day) * MS_PER_DAY);
  return { year: dt.getUTCFullYear(), month: dt.getUTCMonth() + 1 };
}

/** Number of days in a calendar month (month 1–12). */
export function daysInMonth(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}
