import type { Plan } from "@/db/schema";
import { planLimits } from "@/lib/billing/plans";

// Daily quotas of the public API, and the RateLimit header fields that tell
// callers where they stand. Pure (no database): lib/api/usage.ts counts.
//
// Headers follow draft-ietf-httpapi-ratelimit-headers-10/-11 (structured
// fields, RFC 8941 lists of items with parameters):
//   RateLimit-Policy: "daily";q=2000;w=86400
//   RateLimit: "daily";r=1873;t=41234
// q = quota per window, w = window in seconds, r = quota units left,
// t = seconds until the window ends (the quota renews at 00:00 UTC).
// Older drafts' RateLimit-Limit/-Remaining/-Reset fields are not sent.

/** What a request uses up: every v1 request counts on `requests`; site lookups also on `lookups` where the plan caps them. */
export type Meter = "requests" | "lookups";

/** Policy names as they appear in RateLimit and RateLimit-Policy. */
export const POLICY_NAME: Readonly<Record<Meter, string>> = { requests: "daily", lookups: "lookups" };

export const QUOTA_WINDOW_S = 86_400;

/** The quota of a plan on a meter per UTC day; null = no cap on that meter. */
export function meterLimit(plan: Plan, meter: Meter): number | null {
  const limits = planLimits(plan);
  return meter === "requests" ? limits.apiRequestsPerDay : limits.siteLookupsPerDay;
}

/** The UTC day a moment belongs to, `YYYY-MM-DD` (the api_usage.day value). */
export function utcDay(now: Date): string {
  return now.toISOString().slice(0, 10);
}

/** Whole seconds from `now` to the next 00:00 UTC (at least 1). */
export function secondsToUtcMidnight(now: Date): number {
  const next = Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate() + 1);
  return Math.max(1, Math.ceil((next - now.getTime()) / 1000));
}

/** Where a caller stands on one meter. */
export type MeterState = { meter: Meter; limit: number; used: number };

export function remaining(s: MeterState): number {
  return Math.max(0, s.limit - s.used);
}

/** The `RateLimit-Policy` and `RateLimit` header values for the capped meters of a request. */
export function rateLimitHeaders(states: readonly MeterState[], now: Date): Record<string, string> {
  if (!states.length) return {};
  const t = secondsToUtcMidnight(now);
  return {
    "RateLimit-Policy": states.map((s) => `"${POLICY_NAME[s.meter]}";q=${s.limit};w=${QUOTA_WINDOW_S}`).join(", "),
    RateLimit: states.map((s) => `"${POLICY_NAME[s.meter]}";r=${remaining(s)};t=${t}`).join(", "),
  };
}
