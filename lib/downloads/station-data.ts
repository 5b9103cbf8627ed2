import "server-only";
import { and, asc, count, eq, gte, inArray, lt, lte, type SQL } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { samples, stations, users } from "@/db/schema";
import { aggregateStationMeans, type PeriodMean } from "@/lib/isotopes";
import { csvRow, fixed, type CsvValue } from "./csv";
import { CREDIT_LINE, DATA_LICENCE, SYNTHETIC_LABEL } from "./licence";

// Accepted station data as files: monthly (or shorter) samples and long-term
// station means, as CSV or GeoJSON. Only accepted samples of approved (or
// retired) stations. Streamed: one station at a time.
//
// Licence and credits travel with the data:
//   CSV — a `credit` column on every row (the station's operator and the
//   contributor who submitted its data), a `data_status` column ("contributed"
//   or "synthetic demo data"), and a `notice` column filled on the first row
//   only with the licence, units and how to credit. Plain columns open in any
//   spreadsheet or CSV reader without options.
//   GeoJSON — a top-level `metadata` member (a foreign member, RFC 7946 §6.1)
//   with the licence, the credits per operator and the demo label, and the
//   same `credit` and `data_status` properties on every feature.
// Text cells are neutralised against spreadsheet formulas (lib/downloads/csv.ts).

export type StationDataset = "samples" | "station-means";
export type StationDataFormat = "csv" | "geojson";

const CODE = /^[A-Za-z0-9._-]{1,40}$/;
const ISO_DAY = /^\d{4}-\d{2}-\d{2}$/;
const isoDay = z
  .string()
  .regex(ISO_DAY, "Use a date like 2024-01-31.")
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), "This is not a calendar date.");

/** Optional filters, from the query string. Unknown parameters are refused. */
export const stationDataQuery = z
  .object({
    stations: z
      .string()
      .max(20_000)
      .transform((s) => s.split(",").map((x) => x.trim()).filter(Boolean))
      .refine((xs) => xs.length <= 500, "Name at most 500 stations.")
      .refine((xs) => xs.every((x) => CODE.test(x)), "Station codes are letters, digits, dots, dashes and underscores, separated by commas.")
      .optional(),
    from: isoDay.optional(),
    to: isoDay.optional(),
    bbox: z
      .string()
      .transform((s) => s.split(",").map(Number))
      .refine((b) => b.length === 4 && b.every(Number.isFinite), "Give bbox as minLon,minLat,maxLon,maxLat in degrees.")
      .refine(([w, s, e, n]) => w >= -180 && e <= 180 && s >= -90 && n <= 90 && w < e && s < n, "bbox must be west < east and south < north, within ±180 and ±90 degrees.")
      .optional(),
  })
  .strict()
  .refine((q) => !q.from || !q.to || q.from < q.to, { message: "`from` must be before `to`.", path: ["to"] });
export type StationDataFilter = z.infer<typeof stationDataQuery>;

interface StationInfo {
  id: string;
  code: string;
  name: string;
  lat: number;
  lon: number;
  elevationM: number;
  collectorType: string;
  operatingOrg: string | null;
  country: string | null;
  ownerName: string | null;
  isDemo: boolean;
  sampleCount: number;
}

function sampleWhere(f: StationDataFilter): SQL[] {
  const w: SQL[] = [eq(samples.status, "accepted")];
  if (f.from) w.push(gte(samples.startDate, f.from));
  if (f.to) w.push(lt(samples.startDate, f.to));
  return w;
}

/** Stations with at least one matching accepted sample, ordered by code. */
async function matchingStations(f: StationDataFilter): Promise<StationInfo[]> {
  const db = getDb();
  const where: SQL[] = [inArray(stations.status, ["approved", "retired"]), ...sampleWhere(f)];
  if (f.stations?.length) where.push(inArray(stations.code, f.stations));
  if (f.bbox) {
    const [w, s, e, n] = f.bbox;
    where.push(gte(stations.lon, w), lte(stations.lon, e), gte(stations.lat, s), lte(stations.lat, n));
  }
  return db
    .select({
      id: stations.id,
      code: stations.code,
      name: stations.name,
      lat: stations.lat,
      lon: stations.lon,
      elevationM: stations.elevationM,
      collectorType: stations.collectorType,
      operatingOrg: stations.operatingOrg,
      country: stations.country,
      ownerName: users.name,
      isDemo: stations.isDemo,
      sampleCount: count(samples.id),
    })
    .from(stations)
    .innerJoin(samples, eq(samples.stationId, stations.id))
    .leftJoin(users, eq(users.id, stations.ownerId))
    .where(and(...where))
    .groupBy(stations.id)
    .orderBy(asc(stations.code))
    .all();
}

async function stationSamples(stationId: string, f: StationDataFilter) {
  return getDb()
    .select({
      startDate: samples.startDate,
      endDate: samples.endDate,
      amountMm: samples.amountMm,
      d18O: samples.d18O,
      d2H: samples.d2H,
      dExcess: samples.dExcess,
      d18OSd: samples.d18OSd,
      d2HSd: samples.d2HSd,
      method: samples.method,
      laboratory: samples.laboratory,
      scale: samples.scale,
      isDemo: samples.isDemo,
    })
    .from(samples)
    .where(and(eq(samples.stationId, stationId), ...sampleWhere(f)))
    .orderBy(asc(samples.startDate), asc(samples.id))
    .all();
}

export function creditFor(s: Pick<StationInfo, "operatingOrg" | "ownerName" | "isDemo">): string {
  const parts = [s.operatingOrg ? `operated by ${s.operatingOrg}` : null, s.ownerName ? `data contributed by ${s.ownerName}` : null].filter(Boolean);
  const text = parts.length ? parts.join("; ") : "Rainprint contributor";
  return s.isDemo ? `${text} (invented, ${SYNTHETIC_LABEL})` : text;
}

const status = (demo: boolean) => (demo ? SYNTHETIC_LABEL : "contributed");

function describeFilter(f: StationDataFilter): string {
  const parts: string[] = [];
  if (f.stations?.length) parts.push(`stations ${f.stations.join(" ")}`);
  if (f.from) parts.push(`samples starting on or after ${f.from}`);
  if (f.to) parts.push(`samples starting before ${f.to}`);
  if (f.bbox) parts.push(`stations within lon ${f.bbox[0]} to ${f.bbox[2]} and lat ${f.bbox[1]} to ${f.bbox[3]}`);
  return parts.length ? parts.join("; ") : "all accepted data";
}

function notice(dataset: StationDataset, f: StationDataFilter, stationsN: number, anyDemo: boolean, now: Date): string {
  return [
    dataset === "samples"
      ? "Accepted precipitation isotope samples from Rainprint"
      : "Long-term amount-weighted station means computed from Rainprint's accepted samples at the time of download (an edition's means are frozen in that edition)",
    `downloaded ${now.toISOString()}`,
    `${stationsN} stations; ${describeFilter(f)}`,
    "delta values in per mil vs VSMOW (d-excess = d2H - 8 d18O); amounts in mm; coordinates WGS84 degrees; periods are [start, end)",
    `licence ${DATA_LICENCE.shortName} (${DATA_LICENCE.url}): ${CREDIT_LINE}`,
    ...(anyDemo ? [`rows marked '${SYNTHETIC_LABEL}' are invented for demonstration and are not real measurements`] : []),
  ].join("; ");
}

const SAMPLE_COLUMNS = [
  "station_code",
  "station_name",
  "lat",
  "lon",
  "elevation_m",
  "collector_type",
  "start_date",
  "end_date",
  "amount_mm",
  "d18O_permil",
  "d2H_permil",
  "d_excess_permil",
  "d18O_sd_permil",
  "d2H_sd_permil",
  "method",
  "laboratory",
  "scale",
] as const;

const PERIOD_KEYS = ["annual", "m01", "m02", "m03", "m04", "m05", "m06", "m07", "m08", "m09", "m10", "m11", "m12"] as const;

const MEAN_COLUMNS = [
  "station_code",
  "station_name",
  "lat",
  "lon",
  "elevation_m",
  "period",
  "d18O_permil",
  "d2H_permil",
  "d_excess_permil",
  "precip_mm",
  "included",
  "years_counted",
  "samples_used",
  "sampled_precip_fraction",
  "first_year",
  "last_year",
  "coverage_flags",
] as const;

type SampleRow = Awaited<ReturnType<typeof stationSamples>>[number];

function sampleValues(s: StationInfo, x: SampleRow): Record<(typeof SAMPLE_COLUMNS)[number], CsvValue> {
  return {
    station_code: s.code,
    station_name: s.name,
    lat: s.lat,
    lon: s.lon,
    elevation_m: s.elevationM,
    collector_type: s.collectorType,
    start_date: x.startDate,
    end_date: x.endDate,
    amount_mm: x.amountMm,
    d18O_permil: x.d18O,
    d2H_permil: x.d2H,
    d_excess_permil: fixed(x.dExcess, 3),
    d18O_sd_permil: x.d18OSd,
    d2H_sd_permil: x.d2HSd,
    method: x.method,
    laboratory: x.laboratory,
    scale: x.scale,
  };
}

function meanValues(s: StationInfo, m: PeriodMean): Record<(typeof MEAN_COLUMNS)[number], CsvValue> {
  return {
    station_code: s.code,
    station_name: s.name,
    lat: s.lat,
    lon: s.lon,
    elevation_m: s.elevationM,
    period: PERIOD_KEYS[m.period] === "annual" ? "annual" : String(m.period).padStart(2, "0"),
    d18O_permil: fixed(m.d18O, 3),
    d2H_permil: fixed(m.d2H, 2),
    d_excess_permil: fixed(m.dExcess, 2),
    precip_mm: fixed(m.precipMm, 1),
    included: m.included,
    years_counted: m.coverage.yearsCounted,
    samples_used: m.coverage.samplesUsed,
    sampled_precip_fraction: fixed(m.coverage.sampledPrecipFraction, 3),
    first_year: m.coverage.firstYear,
    last_year: m.coverage.lastYear,
    coverage_flags: m.coverage.flags.join(" "),
  };
}

async function meansOf(s: StationInfo, f: StationDataFilter): Promise<PeriodMean[]> {
  const rows = await stationSamples(s.id, f);
  const means = aggregateStationMeans(rows.map((r) => ({ startDate: r.startDate, endDate: r.endDate, d18O: r.d18O, d2H: r.d2H, amountMm: r.amountMm })));
  return [means.annual, ...means.monthly];
}

/** The file as text chunks (one station at a time). */
export async function* stationDataChunks(
  dataset: StationDataset,
  format: StationDataFormat,
  f: StationDataFilter,
  now: Date = new Date(),
): AsyncGenerator<string> {
  const list = await matchingStations(f);
  const anyDemo = list.some((s) => s.isDemo);
  const text = notice(dataset, f, list.length, anyDemo, now);
  if (format === "csv") {
    const columns = dataset === "samples" ? SAMPLE_COLUMNS : MEAN_COLUMNS;
    yield csvRow([...columns, "credit", "data_status", "notice"]);
    let first = true;
    for (const s of list) {
      const credit = creditFor(s);
      let out = "";
      if (dataset === "samples") {
        for (const x of await stationSamples(s.id, f)) {
          const v = sampleValues(s, x);
          out += csvRow([...columns.map((c) => v[c as keyof typeof v]), credit, status(s.isDemo || x.isDemo), first ? text : null]);
          first = false;
        }
      } else {
        for (const m of await meansOf(s, f)) {
          const v = meanValues(s, m);
          out += csvRow([...columns.map((c) => v[c as keyof typeof v]), credit, status(s.isDemo), first ? text : null]);
          first = false;
        }
      }
      if (out) yield out;
    }
    if (first) yield csvRow([...columns.map(() => null), null, null, `${text}; no data matched`]);
    return;
  }
  // GeoJSON FeatureCollection with a top-level `metadata` member, features streamed after it.
  const metadata = {
    title: dataset === "samples" ? "Rainprint accepted precipitation isotope samples" : "Rainprint long-term station means",
    generatedAt: now.toISOString(),
    licence: DATA_LICENCE,
    credit: CREDIT_LINE,
    credits: creditsOf(list),
    filter: describeFilter(f),
    units: { delta: "per mil vs VSMOW", dExcess: "per mil (d2H - 8 d18O)", amount: "mm", coordinates: "WGS84 degrees [lon, lat]" },
    syntheticDemoData: anyDemo,
    notice: text,
  };
  yield `{"type":"FeatureCollection","metadata":${JSON.stringify(metadata)},"features":[`;
  let sep = "";
  for (const s of list) {
    const credit = creditFor(s);
    const geometry = { type: "Point", coordinates: [s.lon, s.lat] };
    let out = "";
    if (dataset === "samples") {
      for (const x of await stationSamples(s.id, f)) {
        const { lat: _lat, lon: _lon, ...props } = sampleValues(s, x);
        void _lat;
        void _lon;
        out += `${sep}${JSON.stringify({ type: "Feature", geometry, properties: { ...props, credit, data_status: status(s.isDemo || x.isDemo) } })}`;
        sep = ",";
      }
    } else {
      const props: Record<string, CsvValue> = {
        station_code: s.code,
        station_name: s.name,
        elevation_m: s.elevationM,
        country: s.country,
      };
      for (const m of await meansOf(s, f)) {
        const k = PERIOD_KEYS[m.period];
        props[`d18O_permil_${k}`] = fixed(m.d18O, 3);
        props[`d2H_permil_${k}`] = fixed(m.d2H, 2);
        props[`d_excess_permil_${k}`] = fixed(m.dExcess, 2);
        props[`precip_mm_${k}`] = fixed(m.precipMm, 1);
        props[`included_${k}`] = m.included;
      }
      out = `${sep}${JSON.stringify({ type: "Feature", geometry, properties: { ...props, credit, data_status: status(s.isDemo) } })}`;
      sep = ",";
    }
    if (out) yield out;
  }
  yield "]}";
}

/** Credits per operator: who operated the stations and who contributed their data. */
function creditsOf(list: StationInfo[]): { operator: string | null; contributors: string[]; stations: number; syntheticDemoData: boolean }[] {
  const by = new Map<string, { operator: string | null; contributors: Set<string>; stations: number; syntheticDemoData: boolean }>();
  for (const s of list) {
    const key = s.operatingOrg ?? "";
    const e = by.get(key) ?? { operator: s.operatingOrg, contributors: new Set<string>(), stations: 0, syntheticDemoData: false };
    if (s.ownerName) e.contributors.add(s.ownerName);
    e.stations += 1;
    e.syntheticDemoData ||= s.isDemo;
    by.set(key, e);
  }
  return [...by.values()].map((e) => ({ ...e, contributors: [...e.contributors].sort() }));
}

export function stationDataFileName(dataset: StationDataset, format: StationDataFormat, now: Date = new Date()): string {
  return `rainprint-${dataset}-${now.toISOString().slice(0, 10)}.${format}`;
}
