// isRealIsoDate against the JavaScript calendar (brute force over 1899–2101, every day and some impossible ones).
import { describe, expect, it } from "vitest";
import { isRealIsoDate } from "@/lib/intake/schemas";

describe("isRealIsoDate", () => {
  it("agrees with Date for every day 1899–2101 and rejects impossible dates", () => {
    for (let t = Date.UTC(1899, 0, 1); t <= Date.UTC(2101, 11, 31); t += 86_400_000) expect(isRealIsoDate(new Date(t).toISOString().slice(0, 10))).toBe(true);
    for (const bad of ["2026-02-29", "2100-02-29", "2026-04-31", "2026-13-01", "2026-00-10", "2026-01-00", "2026-1-01", "26-01-01", "2026-01-01x"]) expect(isRealIsoDate(bad), bad).toBe(false);
    expect(isRealIsoDate("2024-02-29")).toBe(true);
    expect(isRealIsoDate("2000-02-29")).toBe(true);
  });
});
