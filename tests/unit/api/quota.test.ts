import { describe, expect, it } from "vitest";
import { meterLimit, rateLimitHeaders, secondsToUtcMidnight, utcDay } from "@/lib/api/quota";
import { PLAN_CATALOGUE } from "@/lib/billing/plans";

describe("daily quotas and RateLimit headers", () => {
  it("takes the limits from the plan catalogue", () => {
    expect(meterLimit("open", "requests")).toBe(PLAN_CATALOGUE.open.limits.apiRequestsPerDay);
    expect(meterLimit("open", "lookups")).toBe(PLAN_CATALOGUE.open.limits.siteLookupsPerDay);
    expect(meterLimit("researcher", "lookups")).toBeNull();
    expect(meterLimit("institution", "requests")).toBe(PLAN_CATALOGUE.institution.limits.apiRequestsPerDay);
  });

  it("counts days in UTC and the seconds left until 00:00 UTC", () => {
    expect(utcDay(new Date("2026-12-02T23:59:59.500Z"))).toBe("2026-12-02");
    expect(utcDay(new Date("2026-12-03T00:00:00.000Z"))).toBe("2026-12-03");
    expect(secondsToUtcMidnight(new Date("2026-12-02T23:59:59.500Z"))).toBe(1);
    expect(secondsToUtcMidnight(new Date("2026-12-02T00:00:00.000Z"))).toBe(86_400);
    expect(secondsToUtcMidnight(new Date("2026-12-31T12:00:00.000Z"))).toBe(43_200);
  });

  it("writes the structured-field form of draft-ietf-httpapi-ratelimit-headers", () => {
    const h = rateLimitHeaders(
      [
        { meter: "requests", limit: 50, used: 12 },
        { meter: "lookups", limit: 20, used: 25 },
      ],
      new Date("2026-12-02T18:00:00Z"),
    );
    // Syntax of the draft's section 3.2 and 4.2 examples, e.g. `"default";q=100;w=10` and `"default";r=50;t=30`.
    expect(h["RateLimit-Policy"]).toBe('"daily";q=50;w=86400, "lookups";q=20;w=86400');
    expect(h.RateLimit).toBe('"daily";r=38;t=21600, "lookups";r=0;t=21600');
    expect(rateLimitHeaders([], new Date())).toEqual({});
  });
});
