// The synthetic demo scenario (lib/demo): determinism, placement, counts, the toy
// model's sanity, and the deliberately bad samples. No timed assertions here;
// `npm run bench:geo` prints the generation time.
import { beforeAll, describe, expect, it } from "vitest";
import { COLLECTOR_TYPES } from "@/db/schema";
import {
  BAD_SAMPLE_KINDS,
  CONTINENTS,
  DEMO_CONTRIBUTOR_OWNER,
  DEMO_SCALE,
  generateDemoScenario,
  MIN_COAST_KM,
  REGIONS,
  type DemoSample,
  type DemoScenario,
} from "@/lib/demo";
import { distanceToCoastKm, isOnLand } from "@/lib/geo";

let full: DemoScenario;
let test: DemoScenario;
beforeAll(() => {
  full = generateDemoScenario({ profile: "full" });
  test = generateDemoScenario({ profile: "test" });
});

const dx = (s: { d18O: number; d2H: number }) => s.d2H - 8 * s.d18O; // Dansgaard (1964) [pub]
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

/** Amount-weighted annual means per station from accepted samples [trade]. */
function stationMeans(s: DemoScenario) {
  const acc = new Map<string, { p: number; w18: number; w2: number }>();
  for (const x of s.samples) {
    if (x.status !== "accepted" || !x.amountMm) continue;
    const o = acc.get(x.stationCode) ?? { p: 0, w18: 0, w2: 0 };
    o.p += x.amountMm;
    o.w18 += x.amountMm * x.d18O;
    o.w2 += x.amountMm * x.d2H;
    acc.set(x.stationCode, o);
  }
  return s.stations
    .filter((st) => acc.has(st.code))
    .map((st) => {
      const o = acc.get(st.code)!;
      const d18O = o.w18 / o.p;
      const d2H = o.w2 / o.p;
      return { st, d18O, d2H, d: d2H - 8 * d18O };
    });
}

/** Ordinary least squares by the normal equations (Gauss–Jordan) [trade]. */
function ols(X: number[][], y: number[]): number[] {
  const k = X[0].length;
  const A = Array.from({ length: k }, () => new Array<number>(k + 1).fill(0));
  X.forEach((row, i) => {
    for (let a = 0; a < k; a++) {
      A[a][k] += row[a] * y[i];
      for (let b = 0; b < k; b++) A[a][b] += row[a] * row[b];
    }
  });
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(A[r][c]) > Math.abs(A[p][c])) p = r;
    [A[c], A[p]] = [A[p], A[c]];
    for (let r = 0; r < k; r++) {
      if (r === c) continue;
      const f = A[r][c] / A[c][c];
      for (let j = c; j <= k; j++) A[r][j] -= f * A[c][j];
    }
  }
  return A.map((row, i) => row[k] / row[i]);
}

describe("determinism", () => {
  it("the same seed and profile give deep-equal output", () => {
    expect(generateDemoScenario({ profile: "full" })).toEqual(full);
    expect(generateDemoScenario({ profile: "test", seed: 7 })).toEqual(generateDemoScenario({ profile: "test", seed: 7 }));
  });

  it("a different seed gives a different scenario", () => {
    const other = generateDemoScenario({ profile: "test", seed: 7 });
    expect(other.stations.map((s) => [s.lon, s.lat])).not.toEqual(test.stations.map((s) => [s.lon, s.lat]));
  });

  it("the test profile is a subset of the full one: same stations, same samples in its window", () => {
    const fullStations = new Map(full.stations.map((s) => [s.code, s]));
    for (const s of test.stations) {
      const f = fullStations.get(s.code);
      expect(f, s.code).toBeDefined();
      expect(s).toEqual(f);
    }
    const fullSamples = new Map(full.samples.map((s) => [s.key, s]));
    for (const s of test.samples) expect(fullSamples.get(s.key), s.key).toEqual(s);
  });
});

describe("stations", () => {
  it("counts are in range: full 250–300 stations, test ~80", () => {
    expect(full.stations.length).toBeGreaterThanOrEqual(250);
    expect(full.stations.length).toBeLessThanOrEqual(300);
    expect(test.stations.length).toBeGreaterThanOrEqual(60);
    expect(test.stations.length).toBeLessThanOrEqual(100);
  });

  it("every station is on land, at least 5 km from the coast (lib/geo, 1:50m outlines)", () => {
    for (const s of full.stations) {
      expect(isOnLand(s.lon, s.lat), s.code).toBe(true);
      expect(distanceToCoastKm(s.lon, s.lat), s.code).toBeGreaterThanOrEqual(MIN_COAST_KM);
      expect(Math.abs(s.lat)).toBeLessThan(80);
    }
  });

  it("every inhabited continent is represented in both profiles, and none is Antarctica", () => {
    for (const s of [full, test]) {
      const seen = new Set(s.stations.map((x) => x.continent));
      for (const c of CONTINENTS) expect(seen.has(c), c).toBe(true);
      expect(s.stations.every((x) => x.lat > -60)).toBe(true);
    }
  });

  it("stations are dense in four clusters and sparse elsewhere", () => {
    const clusters = REGIONS.filter((r) => r.cluster);
    expect(clusters).toHaveLength(4);
    for (const r of clusters) {
      const n = full.stations.filter((s) => s.region === r.id).length;
      // Stations per 10⁶ km² in the cluster disc vs. the land outside the clusters (~1.3·10⁸ km²).
      const clusterDensity = n / ((Math.PI * r.cluster!.radiusKm ** 2) / 1e6);
      const sparse = full.stations.filter((s) => !s.dense).length / 130;
      expect(clusterDensity, r.id).toBeGreaterThan(10 * sparse);
    }
  });

  it("codes, names and people are invented, unique and well-formed", () => {
    const codes = full.stations.map((s) => s.code);
    expect(new Set(codes).size).toBe(codes.length);
    for (const c of codes) expect(c).toMatch(/^RP-(NAM|SAM|EUR|AFR|ASI|OCE)-\d{3}$/);
    const names = full.stations.map((s) => s.name);
    expect(new Set(names).size).toBe(names.length);
    const emails = full.people.map((p) => p.email);
    expect(new Set(emails).size).toBe(emails.length);
    for (const e of emails) expect(e).toMatch(/^[a-z.]+@[a-z-]+\.example$/);
    const people = new Set(full.people.map((p) => p.key));
    for (const s of full.stations) {
      expect(s.ownerKey === DEMO_CONTRIBUTOR_OWNER || people.has(s.ownerKey), s.ownerKey).toBe(true);
      expect(COLLECTOR_TYPES).toContain(s.collectorType);
      expect(s.notes).toMatch(/^Synthetic demo data/);
    }
    expect(full.stations.filter((s) => s.ownerKey === DEMO_CONTRIBUTOR_OWNER)).toHaveLength(4);
    expect(test.stations.filter((s) => s.ownerKey === DEMO_CONTRIBUTOR_OWNER)).toHaveLength(4);
  });

  it("elevations are plausible for the invented terrain (high on the Tibetan plateau, low in the Amazon)", () => {
    for (const s of full.stations) {
      expect(s.elevationM).toBeGreaterThanOrEqual(0);
      expect(s.elevationM).toBeLessThanOrEqual(5500);
    }
    const inRegion = (id: string) => full.stations.filter((s) => s.region === id).map((s) => s.elevationM);
    expect(mean(inRegion("asi-tibet"))).toBeGreaterThan(3000);
    expect(mean(inRegion("sam-amazon"))).toBeLessThan(700);
  });
});

describe("samples", () => {
  it("five or more years of monthly samples in the full profile, three in the test profile", () => {
    expect(full.meta).toMatchObject({ firstMonth: "2019-01", lastAcceptedMonth: "2026-05", label: "synthetic demo data" });
    expect(test.meta.firstMonth).toBe("2023-06");
    expect(full.samples.length).toBeGreaterThan(15_000);
    expect(test.samples.length).toBeGreaterThan(1_500);
    const perStation = full.stations.map((s) => full.samples.filter((x) => x.stationCode === s.code && x.status === "accepted").length);
    perStation.sort((a, b) => a - b);
    expect(perStation[Math.floor(perStation.length / 2)]).toBeGreaterThanOrEqual(60); // median ≥ 5 years
    expect(perStation[0]).toBeGreaterThanOrEqual(10); // short records exist but are not empty
    expect(perStation.filter((n) => n < 40).length).toBeGreaterThan(5); // some later starts and short records
    for (const st of full.stations) {
      const first = full.samples.find((x) => x.stationCode === st.code && x.status === "accepted");
      if (first) expect(st.startDate <= first.startDate, st.code).toBe(true);
    }
  });

  it("good samples are monthly, complete and analytically plausible", () => {
    const good = full.samples.filter((s) => !s.badKind);
    const problems: string[] = [];
    const need = (ok: boolean, what: string, s: DemoSample) => {
      if (!ok) problems.push(`${s.key}: ${what}`);
    };
    for (const s of good) {
      need(s.startDate < s.endDate && s.startDate.endsWith("-01") && s.endDate.endsWith("-01"), "monthly period", s);
      need((s.amountMm ?? 0) > 0, "amount", s);
      // Natural precipitation ranges and typical lab precision [trade, check-values.md].
      need(s.d18O > -60 && s.d18O < 10 && s.d2H > -480 && s.d2H < 60, "natural range", s);
      need(s.d18OSd >= 0.05 && s.d18OSd <= 0.2 && s.d2HSd >= 0.5 && s.d2HSd <= 2, "precision", s);
      need(s.method === "laser spectroscopy" || s.method === "IRMS", "method", s);
      need(s.scale === DEMO_SCALE && /VSMOW2, SLAP2/.test(s.referenceWaters), "scale and reference waters", s);
    }
    expect(problems).toEqual([]);
    expect(good.length).toBeGreaterThan(15_000);
  });

  it("no station has two samples for the same period except the deliberate duplicates", () => {
    const seen = new Map<string, DemoSample>();
    const repeats: DemoSample[] = [];
    for (const s of full.samples) {
      const k = `${s.stationCode} ${s.startDate} ${s.endDate}`;
      if (seen.has(k)) repeats.push(s);
      else seen.set(k, s);
    }
    expect(repeats.length).toBeGreaterThan(0);
    expect(repeats.every((s) => s.badKind === "duplicate")).toBe(true);
  });
});

describe("the toy model behaves like precipitation", () => {
  it("annual means get more negative with latitude and elevation (Bowen & Wilkinson 2002 form [mem]; lapse −0.28‰/100 m [mem])", () => {
    const m = stationMeans(full);
    const beta = ols(
      m.map(({ st }) => [1, Math.abs(st.lat), st.lat * st.lat, st.elevationM, st.coastDistanceKm]),
      m.map((x) => x.d18O),
    );
    // Elevation gradient near the −0.0028 ‰/m built in (residual field and weighting blur it).
    expect(beta[3]).toBeLessThan(-0.0018);
    expect(beta[3]).toBeGreaterThan(-0.0038);
    // Latitude: the fitted curve falls from 20° to 60°.
    const curve = (lat: number) => beta[1] * lat + beta[2] * lat * lat;
    expect(curve(60) - curve(20)).toBeLessThan(-5);
    // Plain group means say the same.
    const low = m.filter((x) => Math.abs(x.st.lat) < 20 && x.st.elevationM < 1000).map((x) => x.d18O);
    const high = m.filter((x) => Math.abs(x.st.lat) > 50 && x.st.elevationM < 1000).map((x) => x.d18O);
    expect(mean(high)).toBeLessThan(mean(low) - 4);
  });

  it("mean d-excess of station means ≈ +10‰ (global mean of precipitation [trade])", () => {
    const d = stationMeans(full).map((x) => x.d);
    expect(Math.abs(mean(d) - 10)).toBeLessThan(1.5);
  });

  it("d-excess is higher where moisture comes from dry air (eastern Mediterranean ≈ +20‰, Gat & Carmi 1970 [mem])", () => {
    const m = stationMeans(full);
    const levant = m.filter((x) => x.st.region === "asi-levant").map((x) => x.d);
    expect(levant.length).toBeGreaterThan(0);
    expect(mean(levant)).toBeGreaterThan(mean(m.map((x) => x.d)) + 3);
  });

  it("mid-latitude northern stations are heavier in July than in January (temperature effect [trade])", () => {
    const nh = new Set(full.stations.filter((s) => s.lat > 35 && s.lat < 60).map((s) => s.code));
    const month = (m: string) =>
      full.samples.filter((s) => nh.has(s.stationCode) && !s.badKind && s.startDate.slice(5, 7) === m).map((s) => s.d18O);
    expect(mean(month("07"))).toBeGreaterThan(mean(month("01")) + 3);
  });

  it("tropical stations are lighter in their wettest months (amount effect, Dansgaard 1964 [mem])", () => {
    const tropical = full.stations.filter((s) => Math.abs(s.lat) < 12);
    let negative = 0;
    for (const st of tropical) {
      const xs = full.samples.filter((s) => s.stationCode === st.code && s.status === "accepted");
      const ma = mean(xs.map((s) => s.amountMm!));
      const mo = mean(xs.map((s) => s.d18O));
      const cov = mean(xs.map((s) => (s.amountMm! - ma) * (s.d18O - mo)));
      if (cov < 0) negative++;
    }
    expect(negative / tropical.length).toBeGreaterThan(0.8);
  });

  it("samples scatter around a meteoric line of slope near 8 (Craig 1961 [pub])", () => {
    const acc = full.samples.filter((s) => s.status === "accepted");
    const mx = mean(acc.map((s) => s.d18O));
    const my = mean(acc.map((s) => s.d2H));
    let sxy = 0;
    let sxx = 0;
    for (const s of acc) {
      sxy += (s.d18O - mx) * (s.d2H - my);
      sxx += (s.d18O - mx) ** 2;
    }
    const slope = sxy / sxx;
    expect(slope).toBeGreaterThan(7.3);
    expect(slope).toBeLessThan(8.3);
  });
});

describe("deliberately bad samples", () => {
  const bad = () => full.samples.filter((s) => s.badKind);

  it("15–30 of them, every kind present and tagged, all pending in queued batches", () => {
    expect(bad().length).toBeGreaterThanOrEqual(15);
    expect(bad().length).toBeLessThanOrEqual(30);
    for (const k of BAD_SAMPLE_KINDS) expect(bad().some((s) => s.badKind === k), k).toBe(true);
    const queued = new Set(full.batches.filter((b) => b.status === "queued").map((b) => b.key));
    for (const s of bad()) {
      expect(s.status).toBe("pending");
      expect(queued.has(s.batchKey)).toBe(true);
    }
    // The test profile keeps the same bad samples.
    expect(test.samples.filter((s) => s.badKind)).toEqual(bad());
  });

  it("each kind really has its problem", () => {
    const today = new Date().toISOString().slice(0, 10);
    const accepted = new Map(full.samples.filter((s) => s.status === "accepted").map((s) => [s.key, s]));
    for (const s of bad()) {
      const why = `${s.badKind} ${s.key}`;
      switch (s.badKind) {
        case "evaporated":
          expect(dx(s), why).toBeLessThan(0); // d < 0: likely evaporated [trade]
          break;
        case "swapped-columns":
          expect(Math.abs(s.d18O), why).toBeGreaterThan(Math.abs(s.d2H));
          break;
        case "duplicate": {
          const orig = accepted.get(s.duplicateOf!);
          expect(orig, why).toBeDefined();
          expect([orig!.stationCode, orig!.startDate, orig!.endDate]).toEqual([s.stationCode, s.startDate, s.endDate]);
          break;
        }
        case "wrong-units":
          expect(Math.abs(s.d18O), why).toBeLessThan(0.1);
          expect(Math.abs(s.d2H), why).toBeLessThan(1);
          break;
        case "end-before-start":
          expect(s.endDate < s.startDate, why).toBe(true);
          break;
        case "future-date":
          expect(s.startDate > today, why).toBe(true);
          break;
        case "out-of-range":
          expect(s.d18O > 10 || s.d18O < -60 || s.d2H > 60 || s.d2H < -480, why).toBe(true);
          break;
        case "amount-missing":
          expect(s.amountMm, why).toBeNull();
          break;
        case "imprecise":
          expect(s.d18OSd > 0.3 || s.d2HSd > 2, why).toBe(true); // lab acceptance limits [trade]
          break;
        case "outlier": {
          const history = full.samples.filter((x) => x.stationCode === s.stationCode && x.status === "accepted");
          expect(s.d18O, why).toBeLessThan(mean(history.map((x) => x.d18O)) - 6);
          expect(Math.abs(dx(s) - mean(history.map(dx))), why).toBeLessThan(8);
          break;
        }
        case "mistyped":
          expect(Math.abs(s.d2H - (8 * s.d18O + 10)), why).toBeGreaterThan(20); // > 20‰ off the GMWL [trade]
          break;
        default:
          throw new Error(`unexpected kind ${s.badKind}`);
      }
    }
  });

  it("queued batches hold bad and good samples, and one batch is entirely clean", () => {
    const queued = full.batches.filter((b) => b.status === "queued");
    expect(queued.length).toBeGreaterThanOrEqual(3);
    let clean = 0;
    for (const b of queued) {
      const xs = full.samples.filter((s) => s.batchKey === b.key);
      expect(xs.length).toBeGreaterThan(0);
      expect(xs.some((s) => !s.badKind), b.key).toBe(true);
      if (xs.every((s) => !s.badKind)) clean++;
      expect(b.decidedOn).toBeNull();
    }
    expect(clean).toBeGreaterThanOrEqual(1);
    expect(queued.some((b) => b.ownerKey === DEMO_CONTRIBUTOR_OWNER)).toBe(true);
  });

  it("decided batches hold only accepted samples and were decided after they were submitted", () => {
    const statusByBatch = new Map<string, Set<string>>();
    for (const s of full.samples) {
      if (!statusByBatch.has(s.batchKey)) statusByBatch.set(s.batchKey, new Set());
      statusByBatch.get(s.batchKey)!.add(s.status);
    }
    for (const b of full.batches.filter((x) => x.status === "decided")) {
      expect([...(statusByBatch.get(b.key) ?? [])]).toEqual(["accepted"]);
      expect(b.decidedOn! >= b.submittedOn).toBe(true);
    }
  });
});
