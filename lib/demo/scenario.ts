// The synthetic demo scenario: a fictional cooperative of collection stations on every
// inhabited continent, with invented organisations, people and laboratories, monthly
// samples from the toy model (lib/demo/model.ts) and a few deliberately bad samples.
// Pure and deterministic: the same seed and profile give deep-equal output.

import { distanceToCoastKm, isOnLand, wrapLon, greatCircleKm } from "@/lib/geo";
import { makeFields, monthValues, stationClimate, type StationClimate } from "./model";
import { LABORATORIES, ORGANIZATIONS, ORGANIZATION_LAB, personEmail, personNames, stationName } from "./names";
import { Rng } from "./prng";
import { CONTINENT_CODE, REGIONS, regionCount, type RegionSpec } from "./regions";
import { makeTerrain } from "./terrain";
import {
  BAD_SAMPLE_KINDS,
  type BadSampleKind,
  type CollectorType,
  type DemoBatch,
  type DemoLaboratory,
  type DemoPerson,
  type DemoProfile,
  type DemoSample,
  type DemoScenario,
  type DemoStation,
} from "./types";

/** The fixed seed of the shipped demo. */
export const DEFAULT_DEMO_SEED = 20190101;

/** Owner key standing for the demo contributor account (db/seed/demo-accounts.json, key "contributor"). */
export const DEMO_CONTRIBUTOR_OWNER = "demo-account:contributor";

/** Isotope scale every demo sample reports. */
export const DEMO_SCALE = "VSMOW-SLAP";

/** Month index 0 = January 2019. Accepted history runs to index 88 (May 2026). */
const FIRST_YEAR = 2019;
const LAST_ACCEPTED = 88;
/** Months the queued (pending) batches cover: June–October 2026, submitted in November 2026. */
const PENDING_MONTHS = [89, 90, 91, 92, 93];
const QUEUED_FROM = "2026-11-03";
/** First month kept by the test profile: June 2023 (three years of history). */
const TEST_FIRST = 53;
/** Accepted samples eligible as the original of a 'duplicate': 2025-01 onwards. */
const DUPLICATE_FROM = 72;

/** Minimum distance of a demo station from the 1:50m coastline, km. */
export const MIN_COAST_KM = 5;

const pad = (n: number) => String(n).padStart(2, "0");
const monthYear = (mi: number) => FIRST_YEAR + Math.floor(mi / 12);
const monthOfYear = (mi: number) => (mi % 12) + 1;
const monthStart = (mi: number) => `${monthYear(mi)}-${pad(monthOfYear(mi))}-01`;
const round = (x: number, digits: number) => {
  const f = 10 ** digits;
  return Math.round(x * f) / f;
};

function addDays(iso: string, days: number): string {
  const t = Date.parse(`${iso}T00:00:00Z`) + days * 86_400_000;
  return new Date(t).toISOString().slice(0, 10);
}

// ── placement ───────────────────────────────────────────────────────────────────
interface Placed {
  spec: RegionSpec;
  indexInRegion: number;
  lon: number;
  lat: number;
  coastKm: number;
}

/** Destination point from (lon, lat) along an initial bearing for a distance (spherical) [trade]. */
function destination(lon: number, lat: number, bearingRad: number, km: number): [number, number] {
  const R = 6371.0088;
  const d = km / R;
  const p1 = (lat * Math.PI) / 180;
  const l1 = (lon * Math.PI) / 180;
  const p2 = Math.asin(Math.sin(p1) * Math.cos(d) + Math.cos(p1) * Math.sin(d) * Math.cos(bearingRad));
  const l2 = l1 + Math.atan2(Math.sin(bearingRad) * Math.sin(d) * Math.cos(p1), Math.cos(d) - Math.sin(p1) * Math.sin(p2));
  return [wrapLon((l2 * 180) / Math.PI), (p2 * 180) / Math.PI];
}

function placeAll(seed: number): Placed[] {
  const placed: Placed[] = [];
  for (const spec of REGIONS) {
    const rng = Rng.derive(seed, `place:${spec.id}`);
    for (let i = 0; i < spec.count; i++) {
      for (let attempt = 0; attempt < 20_000; attempt++) {
        let lon: number;
        let lat: number;
        if (spec.cluster) {
          const r = spec.cluster.radiusKm * Math.sqrt(rng.random());
          [lon, lat] = destination(spec.cluster.lon, spec.cluster.lat, rng.uniform(0, 2 * Math.PI), r);
        } else {
          const [lonMin, lonMax, latMin, latMax] = rng.pick(spec.boxes ?? []);
          lon = wrapLon(rng.uniform(lonMin, lonMax));
          const s0 = Math.sin((latMin * Math.PI) / 180);
          const s1 = Math.sin((latMax * Math.PI) / 180);
          lat = (Math.asin(rng.uniform(s0, s1)) * 180) / Math.PI;
        }
        lon = round(lon, 4);
        lat = round(lat, 4);
        if (!isOnLand(lon, lat)) continue;
        const dLatMax = spec.minSpacingKm / 111;
        if (placed.some((p) => Math.abs(p.lat - lat) < dLatMax && greatCircleKm(p.lon, p.lat, lon, lat) < spec.minSpacingKm)) continue;
        const coastKm = distanceToCoastKm(lon, lat);
        if (coastKm < MIN_COAST_KM) continue;
        placed.push({ spec, indexInRegion: i, lon, lat, coastKm });
        break;
      }
    }
  }
  return placed;
}

function collectorFor(rng: Rng, lat: number, elevationM: number): CollectorType {
  if ((Math.abs(lat) > 55 || elevationM > 2500) && rng.chance(0.4)) return "snow";
  const u = rng.random();
  if (u < 0.35) return "bulk-oil";
  if (u < 0.55) return "bulk-paraffin";
  if (u < 0.8) return "bulk-tube-dip";
  if (u < 0.92) return "wet-only";
  if (u < 0.97) return "event";
  return "other";
}

// ── records ─────────────────────────────────────────────────────────────────────
/** Which months (indices) a station has a sample for, before dry months are dropped. */
function recordMonths(rng: Rng, forceFull: boolean): boolean[] {
  const has = new Array<boolean>(LAST_ACCEPTED + 1).fill(false);
  const u = rng.random();
  let start = 0;
  let end = LAST_ACCEPTED;
  const gaps: [number, number][] = [];
  if (!forceFull) {
    if (u < 0.62) {
      // full record
    } else if (u < 0.8) {
      start = rng.int(12, 42); // starts 2020-01 … 2022-07
    } else if (u < 0.93) {
      const n = rng.int(1, 3);
      for (let g = 0; g < n; g++) {
        const len = rng.int(2, 7);
        const at = rng.int(3, LAST_ACCEPTED - len - 3);
        gaps.push([at, at + len - 1]);
      }
    } else {
      const len = rng.int(14, 30); // a short record
      start = rng.int(0, LAST_ACCEPTED + 1 - len);
      end = start + len - 1;
    }
  }
  for (let mi = start; mi <= end; mi++) {
    if (gaps.some(([a, b]) => mi >= a && mi <= b)) continue;
    has[mi] = true;
  }
  return has;
}

interface PendingPlan {
  key: string;
  ownerRegion: string;
  stationIndexes: number[];
  /** Whether this batch receives bad samples (a clean batch is left for bulk acceptance). */
  withBad: boolean;
  /** Good samples each batch keeps at least. */
  minGood: number;
}

/** The queued batches of the review desk. All their stations are kept by both profiles. */
const PENDING_PLAN: PendingPlan[] = [
  { key: "queued-1", ownerRegion: "eur-alpine", stationIndexes: [0, 1], withBad: true, minGood: 2 },
  { key: "queued-2", ownerRegion: "eur-alpine", stationIndexes: [2], withBad: false, minGood: 0 },
  { key: "queued-3", ownerRegion: "nam-east", stationIndexes: [0], withBad: true, minGood: 2 },
  { key: "queued-4", ownerRegion: "afr-east", stationIndexes: [0], withBad: true, minGood: 2 },
  { key: "queued-5", ownerRegion: "asi-east", stationIndexes: [0], withBad: true, minGood: 2 },
  { key: "queued-6", ownerRegion: "sam-andes-north", stationIndexes: [0], withBad: true, minGood: 2 },
  { key: "queued-7", ownerRegion: "oce-southeast", stationIndexes: [0], withBad: true, minGood: 2 },
];

/** Stations 0–3 of the Central Europe cluster belong to the demo contributor account. */
const DEMO_CONTRIBUTOR_STATIONS = 4;

interface StationBuild {
  station: DemoStation;
  climate: StationClimate;
  lab: DemoLaboratory;
  /** Modelled values per month index (accepted history and pending months). */
  months: Map<number, { amountMm: number; d18O: number; d2H: number; d18OSd: number; d2HSd: number }>;
}

function sampleFrom(
  b: StationBuild,
  mi: number,
  v: { amountMm: number | null; d18O: number; d2H: number; d18OSd: number; d2HSd: number },
  extra: { key: string; batchKey: string; status: DemoSample["status"]; badKind?: BadSampleKind; notes?: string },
): DemoSample {
  return {
    key: extra.key,
    stationCode: b.station.code,
    batchKey: extra.batchKey,
    status: extra.status,
    startDate: monthStart(mi),
    endDate: monthStart(mi + 1),
    amountMm: v.amountMm,
    d18O: v.d18O,
    d2H: v.d2H,
    d18OSd: v.d18OSd,
    d2HSd: v.d2HSd,
    method: b.lab.method,
    laboratory: b.lab.name,
    scale: DEMO_SCALE,
    referenceWaters: b.lab.referenceWaters,
    notes: extra.notes ?? null,
    badKind: extra.badKind ?? null,
  };
}

/** Turn a good modelled sample into a deliberately bad one of the given kind. */
function corrupt(kind: BadSampleKind, good: DemoSample, rng: Rng, nth: number, history: DemoSample[]): DemoSample {
  const bad: DemoSample = { ...good, key: `${good.key}:${kind}`, badKind: kind };
  switch (kind) {
    case "evaporated": {
      // Enrichment along an evaporation line of slope 5 (slopes below 8, commonly 4–6 [trade]):
      // d falls by 3 per ‰ of δ18O enrichment, so e ≥ (d + 1)/3 makes d < 0.
      const d = good.d2H - 8 * good.d18O;
      const e = Math.max(4, (d + 2) / 3) + rng.uniform(0, 2.5);
      bad.d18O = round(good.d18O + e, 2);
      bad.d2H = round(good.d2H + 5 * e, 1);
      bad.notes = nth === 0 ? "Collector found with very little oil left." : null;
      break;
    }
    case "swapped-columns":
      bad.d18O = good.d2H;
      bad.d2H = good.d18O;
      break;
    case "duplicate": {
      const candidates = history.filter((s) => s.startDate >= monthStart(DUPLICATE_FROM));
      if (history.length === 0) return bad; // nothing to duplicate; cannot happen for full records
      const orig = candidates.length > 0 ? rng.pick(candidates) : history[history.length - 1];
      bad.key = `${orig.key}:duplicate`;
      bad.startDate = orig.startDate;
      bad.endDate = orig.endDate;
      bad.amountMm = orig.amountMm;
      // A re-analysis of the same water: equal within analytical noise.
      bad.d18O = round(orig.d18O + rng.normal(0, 0.05), 2);
      bad.d2H = round(orig.d2H + rng.normal(0, 0.5), 1);
      bad.duplicateOf = orig.key;
      break;
    }
    case "wrong-units":
      bad.d18O = round(good.d18O / 1000, 5);
      bad.d2H = round(good.d2H / 1000, 4);
      break;
    case "end-before-start":
      bad.startDate = good.endDate;
      bad.endDate = good.startDate;
      break;
    case "future-date": {
      const month = good.startDate.slice(5, 7);
      bad.startDate = `2098-${month}-01`;
      bad.endDate = month === "12" ? "2099-01-01" : `2098-${pad(Number(month) + 1)}-01`;
      break;
    }
    case "out-of-range":
      if (nth === 0) {
        bad.d18O = round(14 + rng.uniform(0, 6), 2); // above +10‰
        bad.d2H = round(8 * bad.d18O + 10, 1);
      } else {
        bad.d2H = round(-520 - rng.uniform(0, 60), 1); // below −480‰
        bad.d18O = round((bad.d2H - 10) / 8, 2);
      }
      break;
    case "amount-missing":
      bad.amountMm = null;
      break;
    case "imprecise":
      bad.d18OSd = round(rng.uniform(0.45, 0.9), 2);
      bad.d2HSd = round(rng.uniform(3.5, 6), 1);
      bad.notes = nth === 0 ? "Re-run pending; instrument drift that week." : null;
      break;
    case "outlier": {
      // At least 9‰ lighter than this month's value and at a robust z below −6 in the
      // station's record (modified z = 0.6745·(x − median)/MAD, Iglewicz & Hoaglin 1993 [mem]).
      // (Over the months both profiles keep, so the sample is the same in each.)
      const xs = history.filter((h) => h.startDate >= monthStart(TEST_FIRST)).map((h) => h.d18O).sort((a, b) => a - b);
      const med = xs.length ? xs[Math.floor(xs.length / 2)] : good.d18O;
      const mad = xs.length ? xs.map((x) => Math.abs(x - med)).sort((a, b) => a - b)[Math.floor(xs.length / 2)] : 1;
      const target = Math.min(good.d18O - 9, med - (6 * mad) / 0.6745) - rng.uniform(0, 1.5);
      const shift = target - good.d18O;
      bad.d18O = round(target, 2);
      bad.d2H = round(good.d2H + 8 * shift, 1);
      break;
    }
    case "mistyped":
      bad.d2H = round(good.d2H + (nth === 0 ? -40 : 45) + rng.uniform(-3, 3), 1);
      break;
  }
  return bad;
}

// ── the scenario ────────────────────────────────────────────────────────────────
export interface GenerateOptions {
  seed?: number;
  profile?: DemoProfile;
}

/**
 * Generate the synthetic demo scenario. `full`: ~270 stations, January 2019 – May 2026
 * accepted plus queued batches for June–October 2026. `test`: the first quarter of each
 * region's stations (~85), June 2023 – May 2026, the same queued batches.
 */
export function generateDemoScenario(opts: GenerateOptions = {}): DemoScenario {
  const seed = opts.seed ?? DEFAULT_DEMO_SEED;
  const profile = opts.profile ?? "full";
  const fields = makeFields(seed);
  const terrain = makeTerrain(seed);

  // People: two per organisation.
  const peopleRng = Rng.derive(seed, "people");
  const names = personNames(peopleRng, ORGANIZATIONS.length * 2);
  const people: DemoPerson[] = [];
  ORGANIZATIONS.forEach((o, i) => {
    for (let j = 0; j < 2; j++) {
      const name = names[i * 2 + j];
      people.push({ key: `person-${o.key}-${j + 1}`, name, email: personEmail(name, o.slug), organizationKey: o.key });
    }
  });
  const labByKey = new Map(LABORATORIES.map((l) => [l.key, l]));

  // Stations (always placed for the full profile, so codes and names never depend on the profile).
  const placed = placeAll(seed);
  const nameRng = Rng.derive(seed, "station-names");
  const takenNames = new Set<string>();
  const codeCounter = new Map<string, number>();
  const orgUse = new Map<string, number>();
  const all: { p: Placed; station: DemoStation }[] = [];
  for (const p of placed) {
    const cc = CONTINENT_CODE[p.spec.continent];
    const n = (codeCounter.get(cc) ?? 0) + 1;
    codeCounter.set(cc, n);
    const code = `RP-${cc}-${String(n).padStart(3, "0")}`;
    const srng = Rng.derive(seed, `station:${code}`);
    const orgKey = p.spec.organizations[p.indexInRegion % p.spec.organizations.length];
    const used = orgUse.get(orgKey) ?? 0;
    orgUse.set(orgKey, used + 1);
    const demoOwned = p.spec.id === "eur-alpine" && p.indexInRegion < DEMO_CONTRIBUTOR_STATIONS;
    const ownerKey = demoOwned ? DEMO_CONTRIBUTOR_OWNER : `person-${orgKey}-${(used % 2) + 1}`;
    const elevationM = terrain.elevationM(p.lon, p.lat, p.coastKm);
    // One station in ten sends its water to a second laboratory.
    const labKey = srng.chance(0.1) ? (ORGANIZATION_LAB[orgKey] === "lab-pacific" ? "lab-northmarch" : "lab-pacific") : ORGANIZATION_LAB[orgKey];
    all.push({
      p,
      station: {
        code,
        name: stationName(nameRng, takenNames),
        lon: p.lon,
        lat: p.lat,
        elevationM,
        continent: p.spec.continent,
        region: p.spec.id,
        dense: Boolean(p.spec.cluster),
        collectorType: collectorFor(srng, p.lat, elevationM),
        samplingInterval: "monthly",
        organizationKey: orgKey,
        ownerKey,
        startDate: "",
        coastDistanceKm: round(p.coastKm, 1),
        laboratoryKey: labKey,
        notes: `Synthetic demo data: an invented station (placement group: ${p.spec.label}); its elevation comes from an invented terrain function.`,
      },
    });
  }

  const kept = all.filter(({ p }) => p.indexInRegion < regionCount(p.spec, profile));
  const firstMonth = profile === "full" ? 0 : TEST_FIRST;
  const pendingStations = new Map<string, PendingPlan>();
  for (const plan of PENDING_PLAN) {
    for (const idx of plan.stationIndexes) {
      const hit = all.find(({ p }) => p.spec.id === plan.ownerRegion && p.indexInRegion === idx);
      if (hit) pendingStations.set(hit.station.code, plan);
    }
  }

  // Samples, per station from its own random stream (independent of the profile).
  const builds = new Map<string, StationBuild>();
  const samples: DemoSample[] = [];
  const batches: DemoBatch[] = [];
  for (const { station, p } of kept) {
    const rng = Rng.derive(seed, `samples:${station.code}`);
    const climate = stationClimate(fields, { lon: station.lon, lat: station.lat, elevationM: station.elevationM, coastKm: p.coastKm });
    const lab = labByKey.get(station.laboratoryKey)!;
    const isPending = pendingStations.has(station.code);
    const has = recordMonths(rng, isPending);
    const yearAnomaly = Array.from({ length: 8 }, () => rng.normal(0, 0.5));
    const build: StationBuild = { station, climate, lab, months: new Map() };
    builds.set(station.code, build);
    const last = isPending ? PENDING_MONTHS[PENDING_MONTHS.length - 1] : LAST_ACCEPTED;
    const byYear = new Map<number, DemoSample[]>();
    for (let mi = 0; mi <= last; mi++) {
      // Every month draws the same random numbers whether or not it is kept.
      const v = monthValues(climate, monthOfYear(mi), yearAnomaly[monthYear(mi) - FIRST_YEAR], rng);
      const missing = rng.chance(0.025);
      const sd18 = round(rng.uniform(lab.d18OSdPermil[0], lab.d18OSdPermil[1]), 2);
      const sd2 = round(rng.uniform(lab.d2HSdPermil[0], lab.d2HSdPermil[1]), 1);
      const values = {
        amountMm: round(mi > LAST_ACCEPTED ? Math.max(v.amountMm, 4) : v.amountMm, 1),
        d18O: round(v.d18O, 2),
        d2H: round(v.d2H, 1),
        d18OSd: sd18,
        d2HSd: sd2,
      };
      build.months.set(mi, values);
      if (mi > LAST_ACCEPTED) continue; // pending months are handled below
      // A collector with under 2 mm of rain in a month yields no sample.
      if (!has[mi] || missing || v.amountMm < 2 || mi < firstMonth) continue;
      const year = monthYear(mi);
      const batchKey = `${station.code}:${year}`;
      const s = sampleFrom(build, mi, values, { key: `${station.code}:${monthStart(mi)}`, batchKey, status: "accepted" });
      if (!byYear.has(year)) byYear.set(year, []);
      byYear.get(year)!.push(s);
    }
    const stationSamples = [...byYear.values()].flat();
    // The day the station started collecting (the same in both profiles).
    station.startDate = monthStart(Math.max(0, has.indexOf(true)));
    for (const year of byYear.keys()) {
      const br = Rng.derive(seed, `batch:${station.code}:${year}`);
      const submittedOn = year < 2026 ? `${year + 1}-02-${pad(br.int(1, 27))}` : `2026-06-${pad(br.int(1, 20))}`;
      batches.push({
        key: `${station.code}:${year}`,
        ownerKey: station.ownerKey,
        status: "decided",
        submittedOn,
        decidedOn: addDays(submittedOn, br.int(5, 40)),
        note: `Synthetic demo data: ${station.code} samples of ${year}.`,
      });
    }
    samples.push(...stationSamples);
  }

  // Queued batches for the review desk, with the deliberately bad samples among them.
  const badRng = Rng.derive(seed, "bad-samples");
  const kinds = badRng.shuffle([...BAD_SAMPLE_KINDS, ...BAD_SAMPLE_KINDS]);
  const kindCount = new Map<BadSampleKind, number>();
  interface Slot {
    build: StationBuild;
    mi: number;
    kind: BadSampleKind | null;
  }
  const queued: { plan: PendingPlan; slots: Slot[]; ownerKey: string }[] = [];
  for (const plan of PENDING_PLAN) {
    const codes = [...pendingStations].filter(([, pl]) => pl === plan).map(([code]) => code);
    const slots: Slot[] = [];
    for (const code of codes) {
      const b = builds.get(code);
      if (!b) continue;
      const months = plan.withBad ? PENDING_MONTHS : PENDING_MONTHS.slice(0, 3);
      for (const mi of months) slots.push({ build: b, mi, kind: null });
    }
    if (slots.length > 0) queued.push({ plan, slots: badRng.shuffle(slots), ownerKey: slots[0].build.station.ownerKey });
  }
  const withBad = queued.filter((q) => q.plan.withBad);
  let k = 0;
  for (let round_ = 0; k < kinds.length && round_ < 10; round_++) {
    for (const q of withBad) {
      if (k >= kinds.length) break;
      const free = q.slots.filter((s) => s.kind === null);
      if (free.length <= q.plan.minGood) continue;
      free[0].kind = kinds[k++];
    }
  }
  queued.forEach((q, i) => {
    const submittedOn = addDays(QUEUED_FROM, i * 4 + badRng.int(0, 2));
    batches.push({
      key: q.plan.key,
      ownerKey: q.ownerKey,
      status: "queued",
      submittedOn,
      decidedOn: null,
      note: "Synthetic demo data: samples waiting for review.",
    });
    // Sort slots back into station/month order for a natural batch.
    const ordered = q.slots.slice().sort((a, b) => a.build.station.code.localeCompare(b.build.station.code) || a.mi - b.mi);
    for (const slot of ordered) {
      const v = slot.build.months.get(slot.mi)!;
      const good = sampleFrom(slot.build, slot.mi, v, {
        key: `${slot.build.station.code}:${monthStart(slot.mi)}`,
        batchKey: q.plan.key,
        status: "pending",
      });
      if (slot.kind === null) {
        samples.push(good);
        continue;
      }
      const nth = kindCount.get(slot.kind) ?? 0;
      kindCount.set(slot.kind, nth + 1);
      const history = samples.filter((s) => s.stationCode === slot.build.station.code && s.status === "accepted");
      samples.push(corrupt(slot.kind, good, badRng, nth, history));
    }
  });

  const stations = kept.map(({ station }) => station);
  const usedOrgs = new Set(stations.map((s) => s.organizationKey));
  return {
    meta: {
      label: "synthetic demo data",
      seed,
      profile,
      firstMonth: monthStart(firstMonth).slice(0, 7),
      lastAcceptedMonth: monthStart(LAST_ACCEPTED).slice(0, 7),
    },
    organizations: ORGANIZATIONS.filter((o) => usedOrgs.has(o.key)),
    // Everyone at an organisation that runs a kept station (some own none: colleagues).
    people: people.filter((p) => usedOrgs.has(p.organizationKey)),
    laboratories: LABORATORIES.filter((l) => stations.some((s) => s.laboratoryKey === l.key)),
    stations,
    batches,
    samples,
  };
}
