// Small formatters for billing pages (pure, client-safe).

/** "12 March 2027" (UTC, so the date does not shift with the server's zone). */
export function longDate(d: Date | null | undefined): string {
  return d ? d.toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }) : "—";
}

export const INTERVAL_WORD = { month: "monthly", year: "yearly" } as const;
