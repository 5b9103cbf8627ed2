import { describe, expect, it } from "vitest";
import {
  cataloguePrice,
  cataloguePrices,
  clampSeats,
  describePlan,
  formatMoney,
  higherPlan,
  lowestPlanAllowing,
  PLAN_CATALOGUE,
  PLAN_ORDER,
  priceForLookupKey,
  totalCents,
} from "@/lib/billing/plans";

describe("the plan catalogue", () => {
  it("has one price per paid plan and interval, with unique lookup keys", () => {
    const prices = cataloguePrices();
    expect(prices).toHaveLength(4);
    expect(new Set(prices.map((p) => p.lookupKey)).size).toBe(4);
    for (const p of prices) {
      expect(priceForLookupKey(p.lookupKey)).toEqual(p);
      expect(Number.isInteger(p.unitAmountCents) && p.unitAmountCents > 0).toBe(true);
    }
    expect(priceForLookupKey("something_else")).toBeNull();
    expect(priceForLookupKey(null)).toBeNull();
  });

  it("never makes a yearly price dearer than twelve months", () => {
    for (const plan of ["researcher", "institution"] as const)
      expect(cataloguePrice(plan, "year").unitAmountCents).toBeLessThanOrEqual(12 * cataloguePrice(plan, "month").unitAmountCents);
  });

  it("orders plans so that each unlocks at least what the one below does", () => {
    for (let i = 1; i < PLAN_ORDER.length; i++) {
      const lo = PLAN_CATALOGUE[PLAN_ORDER[i - 1]].limits;
      const hi = PLAN_CATALOGUE[PLAN_ORDER[i]].limits;
      expect(hi.batchLookupMaxSites).toBeGreaterThanOrEqual(lo.batchLookupMaxSites);
      expect(hi.apiRequestsPerDay).toBeGreaterThanOrEqual(lo.apiRequestsPerDay);
      expect(hi.apiKeys).toBeGreaterThanOrEqual(lo.apiKeys);
      expect(!lo.surfaceDownloads || hi.surfaceDownloads).toBe(true);
      expect(!lo.stationDataDownloads || hi.stationDataDownloads).toBe(true);
    }
    expect(higherPlan("open", "institution")).toBe("institution");
    expect(higherPlan("researcher", "open")).toBe("researcher");
  });

  it("names the cheapest plan that unlocks a feature (for refusals)", () => {
    expect(lowestPlanAllowing((l) => l.surfaceDownloads)).toBe("researcher");
    expect(lowestPlanAllowing((l) => l.batchLookupMaxSites >= 5_000)).toBe("institution");
    expect(lowestPlanAllowing((l) => l.siteLookupsPerDay === null || l.siteLookupsPerDay > 0)).toBe("open");
    expect(lowestPlanAllowing((l) => l.apiKeys > 1_000)).toBeNull();
  });

  it("prices seats per seat and keeps them in range", () => {
    expect(totalCents("institution", "month", 5)).toBe(5 * cataloguePrice("institution", "month").unitAmountCents);
    expect(totalCents("researcher", "year", 5)).toBe(cataloguePrice("researcher", "year").unitAmountCents);
    expect(clampSeats("institution", 1)).toBe(PLAN_CATALOGUE.institution.seats!.minSeats);
    expect(clampSeats("institution", 10_000)).toBe(PLAN_CATALOGUE.institution.seats!.maxSeats);
    expect(clampSeats("researcher", 9)).toBe(1);
  });

  it("describes each plan from its limits", () => {
    expect(describePlan("open")).toEqual(expect.arrayContaining(["No batch lookups", "No surface downloads"]));
    expect(describePlan("researcher")).toEqual(
      expect.arrayContaining(["Batch lookups of up to 2,000 sites per file or API call", "Download edition surfaces as GeoTIFF and CSV"]),
    );
    expect(describePlan("institution").some((l) => l.startsWith("Seats for members: from 3 to 250"))).toBe(true);
    expect(formatMoney(1_900)).toBe("€19.00");
  });
});
