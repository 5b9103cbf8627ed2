import { describe, expect, it } from "vitest";
import {
  CHECK_CATALOGUE,
  CHECK_CODES,
  CHECK_THRESHOLDS,
  runChecks,
  worstSeverity,
  type CheckCode,
  type CheckResult,
  type QcContext,
  type QcSample,
} from "@/lib/qc";
import { baseContext, CLEAN, HISTORY, sample } from "./station-fixture";

const codes = (r: CheckResult[]) => r.map((x) => x.code);
const find = (r: CheckResult[], code: CheckCode) => r.filter((x) => x.code === code);
/** Every result ever produced in this file, to check them against the catalogue at the end. */
const seen: CheckResult[] = [];
function run(s: QcSample, ctx: QcContext = baseContext()): CheckResult[] {
  const r = runChecks(s, ctx);
  seen.push(...r);
  return r;
}

describe("a clean sample", () => {
  it("trips no check at all", () => {
    expect(run(CLEAN)).toEqual([]);
  });
});

describe("missing", () => {
  it("fails without δ18O or with a non-number δ2H, and says which", () => {
    const a = run(sample({ d18O: null }));
    expect(find(a, "missing")[0]).toMatchObject({ severity: "fail" });
    expect(find(a, "missing")[0].message).toMatch(/δ18O is missing/);
    // @ts-expect-error — a string where a number belongs, as a CSV might deliver it
    const b = run(sample({ d2H: "abc" }));
    expect(find(b, "missing")[0].message).toMatch(/δ2H is not a number \("abc"\)/);
    // isotope-based checks are skipped
    expect(codes(b)).not.toContain("line-offset");
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("missing"));
});

describe("units", () => {
  it("fails per-mil values entered as fractions (−0.0079 instead of −7.9) [trade]", () => {
    const r = run(sample({ d18O: -0.0079, d2H: -0.0523 }));
    const u = find(r, "units");
    expect(u).toHaveLength(1);
    expect(u[0].severity).toBe("fail");
    expect(u[0].message).toMatch(/multiplied by 1000 they give -7\.90‰ and -52\.3‰/);
    expect(u[0].values.d18OTimes1000).toBeCloseTo(-7.9, 10);
    expect(codes(r)).not.toContain("evaporation");
  });
  it("fails raw isotope ratios near the VSMOW ratios (2005.20e-6, 155.76e-6) [pub]", () => {
    const r = run(sample({ d18O: 0.00199, d2H: 0.000148 }));
    expect(find(r, "units")[0].message).toMatch(/isotope ratios/);
  });
  it("stays silent for genuine values near 0‰ that are not fractions", () => {
    expect(codes(run(sample({ d18O: -0.4, d2H: 2.1 })))).not.toContain("units");
    expect(codes(run(CLEAN))).not.toContain("units");
  });
});

describe("swapped", () => {
  it("fails δ18O and δ2H entered in each other's column [trade: δ2H ≈ 8·δ18O]", () => {
    const r = run(sample({ d18O: -52.3, d2H: -7.9 }));
    const s = find(r, "swapped");
    expect(s[0].severity).toBe("fail");
    expect(s[0].values.dExcessIfSwapped).toBeCloseTo(-52.3 + 63.2, 10);
    expect(s[0].message).toMatch(/look swapped/);
    // the misleading checks are skipped
    expect(codes(r)).not.toEqual(expect.arrayContaining(["line-offset"]));
    expect(codes(r)).not.toContain("range");
  });
  it("also catches a swap that pushes δ18O out of range", () => {
    expect(codes(run(sample({ d18O: -120, d2H: -15.2 })))).toContain("swapped");
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("swapped"));
});

describe("sign", () => {
  it("warns when both values are positive but ordinary once negated", () => {
    const r = run(sample({ d18O: 7.9, d2H: 52.3 }));
    expect(find(r, "sign")[0]).toMatchObject({ severity: "warn" });
    expect(codes(r)).not.toContain("evaporation"); // interpretive checks wait until the signs are settled
  });
  it("is silent on a real, slightly positive evaporated sample", () => {
    expect(codes(run(sample({ d18O: 1.2, d2H: 2.0 })))).not.toContain("sign");
  });
});

describe("range", () => {
  it(`fails δ values outside ${CHECK_THRESHOLDS.d18OMinPermil.value}…+${CHECK_THRESHOLDS.d18OMaxPermil.value}‰ / ${CHECK_THRESHOLDS.d2HMinPermil.value}…+${CHECK_THRESHOLDS.d2HMaxPermil.value}‰ [trade]`, () => {
    expect(find(run(sample({ d18O: -75, d2H: -560 })), "range")[0]).toMatchObject({ severity: "fail" });
    expect(find(run(sample({ d18O: 11, d2H: 60.5 })), "range")[0].message).toMatch(/δ18O 11.00‰ is outside/);
  });
  it("fails a negative amount and an amount above the world 24-hour record [mem], warns above 300 mm/day [trade]", () => {
    expect(find(run(sample({ amountMm: -3 })), "range")[0]).toMatchObject({ severity: "fail" });
    const day = { startDate: "2025-03-01", endDate: "2025-03-02" };
    expect(find(run(sample({ ...day, amountMm: 2400 }), baseContext({ station: null })), "range")[0].severity).toBe("fail");
    const warn = find(run(sample({ ...day, amountMm: 400 }), baseContext({ station: null })), "range")[0];
    expect(warn.severity).toBe("warn");
    expect(warn.values.mmPerDay).toBe(400);
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("range"));
});

describe("period", () => {
  const periodOf = (s: Partial<QcSample>, ctx?: QcContext) => find(run(sample(s), ctx), "period");
  it("fails dates that are not dates", () => {
    const r = periodOf({ startDate: "2025-02-30" });
    expect(r[0].severity).toBe("fail");
    expect(r[0].message).toMatch(/start date "2025-02-30" is not a valid date/);
    expect(periodOf({ endDate: null })[0].message).toMatch(/end date is missing/);
  });
  it("fails an end date before (or equal to) the start", () => {
    expect(periodOf({ startDate: "2025-04-01", endDate: "2025-03-01" })[0].message).toMatch(/before the start date/);
    expect(periodOf({ startDate: "2025-03-01", endDate: "2025-03-01" })[0].message).toMatch(/same as the start/);
  });
  it("fails a period in the future (today injected, never read from the clock)", () => {
    expect(periodOf({ startDate: "2025-07-01", endDate: "2025-08-01" })[0].message).toMatch(/after today \(2025-06-15\)/);
    expect(periodOf({ startDate: "2025-06-01", endDate: "2025-07-01" })[0].message).toMatch(/ends on 2025-07-01, after today/);
    // a sample collected today ends tomorrow: fine
    const ok = periodOf({ startDate: "2025-05-16", endDate: "2025-06-16" }, baseContext({ storedPeriods: [] }));
    expect(ok).toEqual([]);
  });
  it("warns above 62 days and fails above 366 days [trade]; warns before 1950", () => {
    const ctx = baseContext({ storedPeriods: [], station: null });
    expect(periodOf({ startDate: "2024-10-01", endDate: "2025-01-01" }, ctx)[0]).toMatchObject({ severity: "warn", values: { days: 92 } });
    expect(periodOf({ startDate: "2023-01-01", endDate: "2024-03-01" }, ctx)[0].severity).toBe("fail");
    expect(periodOf({ startDate: "1925-03-01", endDate: "1925-04-01" }, ctx)[0].message).toMatch(/before 1950-01-01/);
  });
  it("notes a period that does not look monthly at a monthly station", () => {
    const r = periodOf({ startDate: "2025-03-01", endDate: "2025-03-11" });
    expect(r.map((x) => x.severity)).toContain("note");
    expect(r.map((x) => x.message).join(" ")).toMatch(/collects monthly, but this period is 10 days/);
  });
  it("warns when the period overlaps a stored one, and notes a gap since the last stored period", () => {
    const overlap = periodOf({ startDate: "2025-02-15", endDate: "2025-03-15" });
    expect(overlap.find((x) => x.severity === "warn")?.values.overlapDays).toBe(14);
    const gap = periodOf({ startDate: "2025-04-01", endDate: "2025-05-01" });
    expect(gap[0]).toMatchObject({ severity: "note", values: { gapDays: 31 } });
  });
  it("warns when two samples of one batch overlap", () => {
    const other = sample({ ref: "row 2", startDate: "2025-03-20", endDate: "2025-04-20", d18O: -6, d2H: -40 });
    const r = periodOf({}, baseContext({ otherBatchSamples: [other] }));
    expect(r[0].message).toMatch(/overlaps row 2 in this batch by 12 days/);
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("period"));
});

describe("duplicate", () => {
  it("fails a period already stored for the station", () => {
    const r = find(run(sample({ startDate: "2024-05-01", endDate: "2024-06-01" })), "duplicate");
    expect(r[0]).toMatchObject({ severity: "fail" });
    expect(r[0].message).toMatch(/already stored/);
  });
  it("fails the same station and period twice in one batch", () => {
    const twin = sample({ ref: "row 9", d18O: -7.5, d2H: -50 });
    const r = find(run(CLEAN, baseContext({ otherBatchSamples: [twin] })), "duplicate");
    expect(r[0].message).toMatch(/another sample for the same station and period \(row 9\)/);
  });
  it("does not mix up stations in one batch", () => {
    const elsewhere = sample({ ref: "row 9", stationId: "st-2", d18O: -7.5, d2H: -50 });
    expect(codes(run(CLEAN, baseContext({ otherBatchSamples: [elsewhere] })))).not.toContain("duplicate");
  });
  it("warns about exactly repeated δ values in the batch or the station's record", () => {
    const copy = sample({ ref: "row 4", startDate: "2025-04-01", endDate: "2025-05-01" });
    expect(find(run(CLEAN, baseContext({ otherBatchSamples: [copy] })), "duplicate")[0]).toMatchObject({ severity: "warn" });
    const h = HISTORY[7];
    const r = find(run(sample({ d18O: h.d18O, d2H: h.d2H })), "duplicate");
    expect(r[0].message).toMatch(new RegExp(`accepted sample ${h.startDate}`));
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("duplicate"));
});

describe("amount-missing and amount-zero", () => {
  it("warns when the amount is missing or not a number", () => {
    expect(find(run(sample({ amountMm: null })), "amount-missing")[0]).toMatchObject({ severity: "warn" });
    // @ts-expect-error — text in a number field
    expect(find(run(sample({ amountMm: "12 mm" })), "amount-missing")[0].message).toMatch(/"12 mm" is not a number/);
  });
  it("warns when a sample was analysed from 0 mm", () => {
    expect(find(run(sample({ amountMm: 0 })), "amount-zero")[0]).toMatchObject({ severity: "warn" });
  });
  it("is silent on the clean sample", () => {
    expect(codes(run(CLEAN))).not.toContain("amount-missing");
    expect(codes(run(CLEAN))).not.toContain("amount-zero");
  });
});

describe("precision", () => {
  it(`warns above ${CHECK_THRESHOLDS.precisionMaxD18OPermil.value}‰ δ18O / ${CHECK_THRESHOLDS.precisionMaxD2HPermil.value}‰ δ2H (1σ) [trade]`, () => {
    const r = find(run(sample({ d18OSd: 0.45 })), "precision");
    expect(r[0]).toMatchObject({ severity: "warn", values: { d18OSd: 0.45 } });
    const lab = find(run(sample({ d2HSd: null }), baseContext({ labPrecision: { d18O: 0.1, d2H: 3 } })), "precision");
    expect(lab[0].message).toMatch(/the laboratory's stated precision/);
  });
  it("warns about an impossible uncertainty and notes a missing one", () => {
    expect(find(run(sample({ d18OSd: -0.1 })), "precision")[0].message).toMatch(/Not a valid 1σ uncertainty/);
    const none = find(run(sample({ d18OSd: null, d2HSd: null }), baseContext({ labPrecision: null })), "precision");
    expect(none[0].severity).toBe("note");
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("precision"));
});

describe("scale", () => {
  const scaleOf = (s: Partial<QcSample>) => find(run(sample(s)), "scale");
  it("fails VPDB, warns missing or unknown scales, notes a bare VSMOW and missing reference waters", () => {
    expect(scaleOf({ scale: "VPDB" })[0].severity).toBe("fail");
    expect(scaleOf({ scale: null })[0].severity).toBe("warn");
    expect(scaleOf({ scale: "house scale" })[0].severity).toBe("warn");
    expect(scaleOf({ scale: "VSMOW" })[0].severity).toBe("note");
    expect(scaleOf({ referenceWaters: "" })[0]).toMatchObject({ severity: "note" });
  });
  it("accepts the usual spellings of VSMOW–SLAP", () => {
    for (const s of ["VSMOW-SLAP", "VSMOW2/SLAP2", "vsmow–slap", "V-SMOW / SLAP scale"]) expect(scaleOf({ scale: s })).toEqual([]);
  });
});

describe("evaporation", () => {
  it("warns when d-excess is below 0‰ [trade], and names the shallow slope from the station mean", () => {
    const r = find(run(sample({ d18O: -3.0, d2H: -30.0 })), "evaporation");
    expect(r[0].severity).toBe("warn");
    expect(r[0].values.dExcess).toBeCloseTo(-6, 10);
    expect(r[0].values.slopeFromStationMean as number).toBeLessThan(6.5);
    expect(r[0].message).toMatch(/line of slope \d\.\d from the station's mean/);
  });
  it("notes a low d-excess in a small sample [trade]", () => {
    const r = find(run(sample({ d18O: -6.0, d2H: -45.0, amountMm: 2 })), "evaporation");
    expect(r[0]).toMatchObject({ severity: "note" });
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("evaporation"));
});

describe("line-offset", () => {
  it("warns beyond 3 × the station line's residual SD and notes beyond 2 × [trade]", () => {
    const ctx = baseContext();
    const { slope, intercept, residualSD } = ctx.stationLine as NonNullable<QcContext["stationLine"]>;
    const at = (k: number) => sample({ d18O: -8, d2H: slope * -8 + intercept + k * residualSD });
    expect(find(run(at(4)), "line-offset")[0]).toMatchObject({ severity: "warn" });
    expect(find(run(at(-2.5)), "line-offset")[0]).toMatchObject({ severity: "note" });
    expect(find(run(at(1.5)), "line-offset")).toEqual([]);
    expect(find(run(at(4)), "line-offset")[0].values.timesResidualSD).toBeCloseTo(4, 8);
  });
  it("warns when δ2H is more than 20‰ off the global meteoric water line [trade], even without a station line", () => {
    const r = find(run(sample({ d18O: -8, d2H: -28 }), baseContext({ stationLine: null })), "line-offset");
    expect(r[0].severity).toBe("warn");
    expect(r[0].values.gmwlResidual).toBeCloseTo(26, 10);
    expect(r[0].message).toMatch(/26.0‰ above the global meteoric water line/);
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("line-offset"));
});

describe("spatial-outlier", () => {
  it("warns beyond 4 SD and notes beyond 3 SD of the predicted value [trade]", () => {
    const pred = (value: number, sd: number) => baseContext({ predicted: { d18O: { value, sd } } });
    expect(find(run(CLEAN, pred(-14, 1.2)), "spatial-outlier")[0]).toMatchObject({ severity: "warn" });
    const note = find(run(CLEAN, pred(-12, 1.2)), "spatial-outlier")[0];
    expect(note.severity).toBe("note");
    expect(note.values.d18OZ).toBeCloseTo((-7.9 + 12) / 1.2, 10);
  });
  it("is silent without a prediction and on the clean sample", () => {
    expect(codes(run(CLEAN, baseContext({ predicted: null })))).not.toContain("spatial-outlier");
    expect(codes(run(CLEAN))).not.toContain("spatial-outlier");
  });
});

describe("station-outlier", () => {
  it("flags a value far outside the station's own record (robust z) [mem: Iglewicz & Hoaglin 1993]", () => {
    const r = find(run(sample({ d18O: -24, d2H: -182 })), "station-outlier");
    expect(r[0].severity).toBe("warn");
    expect(r[0].values.historyN).toBe(26);
  });
  it("is silent on the clean sample", () => expect(codes(run(CLEAN))).not.toContain("station-outlier"));
});

describe("history", () => {
  it("notes that record-based checks were skipped at a new station", () => {
    const r = find(run(CLEAN, baseContext({ history: [], stationLine: null, storedPeriods: [] })), "history");
    expect(r[0].severity).toBe("note");
    expect(r[0].message).toMatch(/needs 12 accepted samples, has 0/);
  });
  it("is silent with a full record", () => expect(codes(run(CLEAN))).not.toContain("history"));
});

describe("odd data never throws", () => {
  it("reports on garbage samples and contexts instead of throwing", () => {
    const junk: unknown[] = [undefined, null, 0, "x", Number.NaN, Infinity, -Infinity, {}, [], "2025-13-45", -1e308, true];
    let i = 0;
    for (const a of junk) {
      for (const b of junk) {
        const s = { d18O: a, d2H: b, startDate: junk[i % junk.length], endDate: b, amountMm: a, d18OSd: b, scale: a, referenceWaters: b } as unknown as QcSample;
        const ctx = {
          today: junk[(i + 3) % junk.length],
          history: i % 2 ? [{ d18O: a, d2H: b, startDate: a, endDate: b }, null] : a,
          stationLine: { slope: a, intercept: b, residualSD: a, n: b },
          otherBatchSamples: [s, null, undefined],
          storedPeriods: [null, { startDate: a, endDate: b }],
          labPrecision: { d18O: a, d2H: b },
          predicted: { d18O: { value: a, sd: b }, d2H: null },
        } as unknown as QcContext;
        i++;
        const r = runChecks(s, ctx);
        expect(Array.isArray(r)).toBe(true);
        for (const x of r) {
          expect(CHECK_CODES).toContain(x.code);
          expect(["note", "warn", "fail"]).toContain(x.severity);
          expect(typeof x.message).toBe("string");
        }
      }
    }
    expect(() => runChecks(undefined as unknown as QcSample, undefined as unknown as QcContext)).not.toThrow();
  });
});

describe("worstSeverity", () => {
  it("picks the most serious severity, null for none", () => {
    const r = (severity: "note" | "warn" | "fail"): CheckResult => ({ code: "range", severity, message: "", values: {} });
    expect(worstSeverity([])).toBeNull();
    expect(worstSeverity([r("note")])).toBe("note");
    expect(worstSeverity([r("note"), r("fail"), r("warn")])).toBe("fail");
    expect(worstSeverity([r("warn"), r("note")])).toBe("warn");
    expect(worstSeverity(run(sample({ d18O: -52.3, d2H: -7.9 })))).toBe("fail");
    expect(worstSeverity(run(CLEAN))).toBeNull();
  });
});

describe("catalogue and thresholds", () => {
  it("explains every check code, and every result stayed within its catalogued severities", () => {
    for (const code of CHECK_CODES) {
      expect(CHECK_CATALOGUE[code].title.length).toBeGreaterThan(3);
      expect(CHECK_CATALOGUE[code].explanation.length).toBeGreaterThan(40);
    }
    expect(seen.length).toBeGreaterThan(40);
    for (const r of seen) expect(CHECK_CATALOGUE[r.code].severities).toContain(r.severity);
    // every code was produced by some built case above
    expect(new Set(seen.map((r) => r.code))).toEqual(new Set(CHECK_CODES));
  });
  it("gives every threshold a source tag", () => {
    for (const [key, th] of Object.entries(CHECK_THRESHOLDS)) {
      expect(th.source, key).toMatch(/\[(pub|trade|mem)\]/);
    }
  });
});
