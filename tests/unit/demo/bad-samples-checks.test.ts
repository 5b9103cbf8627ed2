// The deliberately bad demo samples against lib/qc's intake checks, run exactly as the
// seed runs them (db/seed/demo-checks.ts): each kind must trip the check made for it, and
// the good pending samples next to them must not fail. Synthetic demo data throughout.
import { describe, expect, it } from "vitest";
import { makeDemoCheckSample } from "@/db/seed/demo-checks";
import type { SeedCheckOutcome } from "@/db/seed/demo-data";
import { BAD_SAMPLE_KINDS, generateDemoScenario, type BadSampleKind, type DemoSample } from "@/lib/demo";
import type { CheckResult } from "@/lib/qc";

/** The check (code and severities) each kind of bad sample is there to trip. */
const EXPECTED: Record<BadSampleKind, { code: string; severities: string[] }> = {
  evaporated: { code: "evaporation", severities: ["warn"] },
  "swapped-columns": { code: "swapped", severities: ["fail"] },
  duplicate: { code: "duplicate", severities: ["warn", "fail"] },
  "wrong-units": { code: "units", severities: ["fail"] },
  "end-before-start": { code: "period", severities: ["fail"] },
  "future-date": { code: "period", severities: ["fail"] },
  "out-of-range": { code: "range", severities: ["warn", "fail"] },
  "amount-missing": { code: "amount-missing", severities: ["warn"] },
  imprecise: { code: "precision", severities: ["note", "warn"] },
  outlier: { code: "station-outlier", severities: ["note", "warn"] },
  mistyped: { code: "line-offset", severities: ["note", "warn"] },
};

describe("lib/qc trips on every kind of deliberately bad demo sample", () => {
  for (const profile of ["full", "test"] as const) {
    const scenario = generateDemoScenario({ profile });
    const check = makeDemoCheckSample();
    const history = (code: string) => scenario.samples.filter((s) => s.stationCode === code && s.status === "accepted");
    const run = async (s: DemoSample): Promise<SeedCheckOutcome> => {
      const station = scenario.stations.find((x) => x.code === s.stationCode)!;
      return check({ ...s, dExcess: s.d2H - 8 * s.d18O }, { station, history: history(s.stationCode), scenario });
    };

    it(`${profile}: each bad sample gets the check made for its kind`, async () => {
      const misses: string[] = [];
      for (const s of scenario.samples.filter((x) => x.badKind)) {
        const { checks } = await run(s);
        const want = EXPECTED[s.badKind!];
        const hit = (checks as CheckResult[]).some((c) => c.code === want.code && want.severities.includes(c.severity));
        if (!hit) misses.push(`${s.key} (${s.badKind}) got ${JSON.stringify((checks as CheckResult[]).map((c) => `${c.code}:${c.severity}`))}`);
      }
      expect(misses).toEqual([]);
      expect(new Set(scenario.samples.filter((x) => x.badKind).map((x) => x.badKind))).toEqual(new Set(BAD_SAMPLE_KINDS));
    });

    it(`${profile}: good pending samples pass without a failure and get an lc-excess`, async () => {
      const good = scenario.samples.filter((x) => x.status === "pending" && !x.badKind);
      expect(good.length).toBeGreaterThan(10);
      for (const s of good) {
        const out = await run(s);
        expect(out.worstSeverity === "fail", `${s.key}: ${JSON.stringify(out.checks)}`).toBe(false);
        expect(typeof out.lcExcess).toBe("number");
      }
    });
  }
});
