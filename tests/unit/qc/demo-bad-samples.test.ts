import { describe, expect, it } from "vitest";
import { runBatchChecks, worstSeverity, type QcSample } from "@/lib/qc";
import { baseContext, CLEAN } from "./station-fixture";

// Synthetic demo data (invented): one batch from one station with the kinds of deliberately
// bad rows the demo data set carries — evaporated, swapped columns, duplicates, wrong units,
// impossible dates — between clean rows. Each bad row must be caught by its check; the clean
// rows must pass untouched.
const row = (n: number, o: Partial<QcSample>): QcSample => ({ ...CLEAN, ref: `row ${n}`, ...o });
const month = (m: number) => ({
  startDate: `2025-0${m}-01`,
  endDate: `2025-0${m + 1}-01`,
});

const batch: QcSample[] = [
  row(1, { ...month(3), d18O: -7.9, d2H: -52.3 }), // clean
  row(2, { ...month(4), d18O: -6.8, d2H: -44.1, amountMm: 48 }), // clean
  row(3, { ...month(5), d18O: -2.1, d2H: -24.6, amountMm: 3.5 }), // evaporated: d = −7.8‰
  row(4, { startDate: "2024-11-01", endDate: "2024-12-01", d18O: -68.4, d2H: -9.2 }), // swapped (stored period too)
  row(5, { ...month(4), d18O: -6.5, d2H: -42.0, amountMm: 51 }), // duplicate period of row 2
  row(6, { startDate: "2024-06-01", endDate: "2024-07-01", d18O: -0.0061, d2H: -0.0394 }), // per mil as fraction
  row(7, { startDate: "2025-02-30", endDate: "2025-03-30", d18O: -8.2, d2H: -55.0 }), // impossible date
  row(8, { startDate: "2025-09-01", endDate: "2025-10-01", d18O: -9.0, d2H: -62.0 }), // in the future
];

describe("the demo data's kinds of deliberate bad samples (synthetic demo data)", () => {
  const results = runBatchChecks(batch, baseContext());
  const codesOf = (i: number) => results[i].map((r) => `${r.code}:${r.severity}`);

  it("leaves the clean rows alone", () => {
    expect(results[0]).toEqual([]);
    // row 2 is clean in itself but shares its period with row 5
    expect(codesOf(1)).toEqual(["duplicate:fail"]);
  });
  it("flags the evaporated sample", () => expect(codesOf(2)).toContain("evaporation:warn"));
  it("flags the swapped columns and skips the isotope checks it would mislead", () => {
    expect(codesOf(3)).toContain("swapped:fail");
    expect(codesOf(3)).toContain("duplicate:fail"); // November 2024 is already stored
    expect(codesOf(3).some((c) => c.startsWith("line-offset"))).toBe(false);
  });
  it("flags the duplicate period in the batch", () => expect(codesOf(4)).toContain("duplicate:fail"));
  it("flags per-mil values entered as fractions", () => expect(codesOf(5)).toContain("units:fail"));
  it("flags the impossible and the future dates", () => {
    expect(codesOf(6)).toContain("period:fail");
    expect(results[6][0].message).toMatch(/2025-02-30/);
    expect(codesOf(7)).toContain("period:fail");
  });
  it("every bad row ends up with a worst severity the review desk sorts on", () => {
    expect(results.map(worstSeverity)).toEqual([null, "fail", "warn", "fail", "fail", "fail", "fail", "fail"]);
  });
});
