import "server-only";
import { and, asc, count, eq, gte, inArray, lt, max, min, sql, type SQL } from "drizzle-orm";
import { z } from "zod";
import { getDb } from "@/db";
import { COLLECTOR_TYPES, samples, stations } from "@/db/schema";
import { aggregateStationMeans, type PeriodMean } from "@/lib/isotopes";
import { errors } from "@/lib/errors";
import { defineEndpoint } from "../endpoint";
import { DATA_LICENCE, licenceSchema, limitOffset, nextPage, pageSchema, round, stationCodeParams, SYNTHETIC_NOTICE } from "./common";

// Stations: the approved collection stations, their long-term amount-weighted
// means, and (paid plans) their accepted samples.

const SAMPLING_INTERVALS = ["monthly", "weekly", "event", "daily", "other"] as const;

const stationSummary = z
  .object({
    code: z.string(),
    name: z.string(),
    lat: z.number().describe("Latitude, WGS84 decimal degrees."),
    lon: z.number().describe("Longitude, WGS84 decimal degrees."),
    elevationM: z.number().describe("Elevation, metres above sea level."),
    collectorType: z.enum(COLLECTOR_TYPES),
    samplingInterval: z.enum(SAMPLING_INTERVALS),
    country: z.string().nullable().describe("ISO 3166-1 alpha-2 code as registered; null when not given."),
    operator: z.string().nullable().describe("The organisation that runs the station."),
    sampleCount: z.number().int().describe("Accepted samples."),
    firstDate: z.iso.date().nullable().describe("Start of the earliest accepted sample (YYYY-MM-DD)."),
    lastDate: z.iso.date().nullable().describe("End of the latest accepted sample (YYYY-MM-DD, exclusive: periods are [start, end))."),
    synthetic: z.boolean().describe("True for synthetic demo data (invented, not measurements)."),
    url: z.string().describe("Path of this station in the API."),
  })
  .meta({ id: "StationSummary" });

type StationRow = SampleStats & {
  code: string;
  name: string;
  lat: number;
  lon: number;
  elevationM: number;
  collectorType: (typeof COLLECTOR_TYPES)[number];
  samplingInterval: (typeof SAMPLING_INTERVALS)[number];
  country: string | null;
  operatingOrg: string | null;
  isDemo: boolean;
};

function summary(r: StationRow): z.output<typeof stationSummary> {
  return {
    code: r.code,
    name: r.name,
    lat: r.lat,
    lon: r.lon,
    elevationM: r.elevationM,
    collectorType: r.collectorType,
    samplingInterval: r.samplingInterval,
    country: r.country,
    operator: r.operatingOrg,
    sampleCount: r.sampleCount,
    firstDate: r.firstDate,
    lastDate: r.lastDate,
    synthetic: r.isDemo,
    url: `/api/v1/stations/${encodeURIComponent(r.code)}`,
  };
}

const credit = (operator: string | null) => `${operator ?? "The station operator"}, via Rainprint`;

const stationColumns = {
  id: stations.id,
  code: stations.code,
  name: stations.name,
  lat: stations.lat,
  lon: stations.lon,
  elevationM: stations.elevationM,
  collectorType: stations.collectorType,
  samplingInterval: stations.samplingInterval,
  country: stations.country,
  operatingOrg: stations.operatingOrg,
  isDemo: stations.isDemo,
};

type SampleStats = { sampleCount: number; firstDate: string | null; lastDate: string | null };

/** Accepted-sample count and span for these stations (one grouped read over the station/status index). */
async function acceptedStats(stationIds: string[]): Promise<Map<string, SampleStats>> {
  if (!stationIds.length) return new Map();
  const rows = await getDb()
    .select({ stationId: samples.stationId, sampleCount: count(), firstDate: min(samples.startDate), lastDate: max(samples.endDate) })
    .from(samples)
    .where(and(inArray(samples.stationId, stationIds), eq(samples.status, "accepted")))
    .groupBy(samples.stationId)
    .all();
  return new Map(rows.map((r) => [r.stationId, { sampleCount: r.sampleCount, firstDate: r.firstDate, lastDate: r.lastDate }]));
}

const NO_SAMPLES: SampleStats = { sampleCount: 0, firstDate: null, lastDate: null };

// ───────────────────────────── GET /api/v1/stations ─────────────────────────────

const BBOX = /^\s*(-?\d+(?:\.\d+)?)\s*,\s*(-?\d+(?:\.\d+)?)\s*,\s*(-?\d+(?:\.\d+)?)\s*,\s*(-?\d+(?:\.\d+)?)\s*$/;

const bboxSchema = z
  .string()
  .regex(BBOX, { error: "bbox is four numbers: west,south,east,north in decimal degrees, e.g. 5,45,16,55." })
  .transform((s, ctx) => {
    const [west, south, east, north] = BBOX.exec(s)!.slice(1).map(Number);
    if ([west, east].some((x) => x < -180 || x > 180)) ctx.addIssue({ code: "custom", message: "bbox longitudes must lie between -180 and 180." });
    if ([south, north].some((x) => x < -90 || x > 90)) ctx.addIssue({ code: "custom", message: "bbox latitudes must lie between -90 and 90." });
    if (south > north) ctx.addIssue({ code: "custom", message: "bbox south must not be north of north." });
    return { west, south, east, north };
  })
  .describe("west,south,east,north in decimal degrees; west > east crosses the antimeridian (e.g. 170,-50,-170,-10).");

const listQuery = z.strictObject({
  bbox: bboxSchema.optional(),
  country: z
    .string()
    .regex(/^[A-Za-z]{2}$/, { error: "country is a two-letter ISO 3166-1 code, e.g. DE." })
    .transform((s) => s.toUpperCase())
    .optional()
    .describe("Two-letter ISO 3166-1 code, e.g. DE."),
  q: z.string().trim().min(1, { error: "q needs at least one character." }).max(100, { error: "q can be at most 100 characters." }).optional().describe("Text in the station's code or name (case-insensitive)."),
  ...limitOffset(100, 500),
});

const listResponse = z
  .object({
    stations: z.array(stationSummary),
    page: pageSchema,
    notice: z.string().nullable().describe("Set when any station in the answer is synthetic demo data."),
    licence: licenceSchema,
  })
  .meta({ id: "StationList" });

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

export const listStations = defineEndpoint({
  id: "listStations",
  method: "GET",
  path: "/api/v1/stations",
  tag: "Stations",
  summary: "List approved stations",
  description:
    "Approved collection stations with their place, collector and the span and number of their accepted samples, ordered by code. Filter by a bounding box, a country or text in the code or name; page with limit and offset.",
  access: "everyone",
  query: listQuery,
  response: listResponse,
  responseDescription: "One page of stations.",
  examples: [
    { title: "Stations in central Europe", query: { bbox: "5,45,16,55", limit: "20" } },
    { title: "Search by name or code", query: { q: "RP-EUR" } },
  ],
  async handler({ query }) {
    const db = getDb();
    const where: SQL[] = [eq(stations.status, "approved")];
    if (query.bbox) {
      const { west, south, east, north } = query.bbox;
      where.push(gte(stations.lat, south), sql`${stations.lat} <= ${north}`);
      where.push(west <= east ? sql`${stations.lon} BETWEEN ${west} AND ${east}` : sql`(${stations.lon} >= ${west} OR ${stations.lon} <= ${east})`);
    }
    if (query.country) where.push(sql`upper(${stations.country}) = ${query.country}`);
    if (query.q) {
      const like = `%${escapeLike(query.q.toLowerCase())}%`;
      where.push(sql`(lower(${stations.code}) LIKE ${like} ESCAPE '\\' OR lower(${stations.name}) LIKE ${like} ESCAPE '\\')`);
    }
    const filter = and(...where);
    const [rows, totalRow] = await Promise.all([
      db.select(stationColumns).from(stations).where(filter).orderBy(asc(stations.code)).limit(query.limit).offset(query.offset).all(),
      db.select({ n: count() }).from(stations).where(filter).get(),
    ]);
    const total = totalRow?.n ?? 0;
    const stats = await acceptedStats(rows.map((r) => r.id));
    const list = rows.map((r) => summary({ ...r, ...(stats.get(r.id) ?? NO_SAMPLES) }));
    const raw = { q: query.q, country: query.country, bbox: query.bbox ? [query.bbox.west, query.bbox.south, query.bbox.east, query.bbox.north].join(",") : undefined };
    return {
      stations: list,
      page: { total, limit: query.limit, offset: query.offset, next: nextPage("/api/v1/stations", raw, total, query.limit, query.offset) },
      notice: list.some((s) => s.synthetic) ? SYNTHETIC_NOTICE : null,
      licence: DATA_LICENCE,
    };
  },
});

// ───────────────────────────── GET /api/v1/stations/{code} ─────────────────────────────

const coverageSchema = z
  .object({
    yearsCounted: z.number().int(),
    yearsWithData: z.number().int(),
    monthsCounted: z.number().int(),
    samplesUsed: z.number().int(),
    sampledPrecipFraction: z.number().nullable().describe("Share of the recorded precipitation that has isotope values (0–1)."),
    firstYear: z.number().int().nullable(),
    lastYear: z.number().int().nullable(),
    flags: z.array(z.string()).describe("Coverage warnings, e.g. too-few-years, amounts-missing."),
  })
  .meta({ id: "MeanCoverage" });

const periodMeanSchema = z
  .object({
    period: z.number().int().min(0).max(12).describe("0 = annual, 1–12 = calendar month."),
    d18O: z.number().nullable().describe("Amount-weighted mean δ18O, ‰ VSMOW (rounded to 0.01)."),
    d2H: z.number().nullable().describe("Amount-weighted mean δ2H, ‰ VSMOW."),
    dExcess: z.number().nullable().describe("d-excess of the weighted means, δ2H − 8·δ18O, ‰."),
    precipMm: z.number().nullable().describe("Mean precipitation of the period, mm (per month; per year for the annual mean)."),
    included: z.boolean().describe("Whether the mean meets the coverage rules that let it into an edition."),
    coverage: coverageSchema,
  })
  .meta({ id: "PeriodMean" });

const stationDetail = z
  .object({
    station: stationSummary,
    means: z.object({
      annual: periodMeanSchema,
      monthly: z.array(periodMeanSchema).length(12),
      rules: z.record(z.string(), z.number()).describe("The coverage rules the means were computed with."),
      method: z.string(),
    }),
    notice: z.string().nullable(),
    licence: licenceSchema,
    credit: z.string(),
  })
  .meta({ id: "StationDetail" });

function periodOut(p: PeriodMean): z.output<typeof periodMeanSchema> {
  const c = p.coverage;
  return {
    period: p.period,
    d18O: round(p.d18O, 2),
    d2H: round(p.d2H, 2),
    dExcess: round(p.dExcess, 2),
    precipMm: round(p.precipMm, 1),
    included: p.included,
    coverage: {
      yearsCounted: c.yearsCounted,
      yearsWithData: c.yearsWithData,
      monthsCounted: c.monthsCounted,
      samplesUsed: c.samplesUsed,
      sampledPrecipFraction: round(c.sampledPrecipFraction, 3),
      firstYear: c.firstYear,
      lastYear: c.lastYear,
      flags: [...c.flags],
    },
  };
}

async function approvedStation(code: string) {
  const row = await getDb()
    .select(stationColumns)
    .from(stations)
    .where(and(eq(stations.status, "approved"), sql`upper(${stations.code}) = ${code.toUpperCase()}`))
    .get();
  if (!row) throw errors.notFound(`There is no approved station with code ${code}.`);
  return row;
}

export const getStation = defineEndpoint({
  id: "getStation",
  method: "GET",
  path: "/api/v1/stations/{code}",
  tag: "Stations",
  summary: "One station with its long-term means",
  description:
    "A station's metadata and its long-term amount-weighted monthly and annual means of δ18O, δ2H and d-excess from its accepted samples, each with its coverage and whether it meets the rules for entering an edition.",
  access: "everyone",
  params: stationCodeParams,
  response: stationDetail,
  responseDescription: "The station and its means.",
  errors: ["not-found"],
  examples: [{ title: "A demo station", params: { code: "RP-EUR-001" } }],
  async handler({ params }) {
    const st = await approvedStation(params.code);
    const rows = await getDb()
      .select({ startDate: samples.startDate, endDate: samples.endDate, d18O: samples.d18O, d2H: samples.d2H, amountMm: samples.amountMm })
      .from(samples)
      .where(and(eq(samples.stationId, st.id), eq(samples.status, "accepted")))
      .orderBy(asc(samples.startDate))
      .all();
    const means = aggregateStationMeans(rows);
    const stats: SampleStats = rows.length
      ? { sampleCount: rows.length, firstDate: rows[0].startDate, lastDate: rows.reduce((m, r) => (r.endDate > m ? r.endDate : m), rows[0].endDate) }
      : NO_SAMPLES;
    return {
      station: summary({ ...st, ...stats }),
      means: {
        annual: periodOut(means.annual),
        monthly: means.monthly.map(periodOut),
        rules: { ...means.rules },
        method: "Amount-weighted means ΣP·δ/ΣP of the accepted samples, each placed in the month holding the midpoint of its period; d-excess of the weighted means (Dansgaard 1964).",
      },
      notice: st.isDemo ? SYNTHETIC_NOTICE : null,
      licence: DATA_LICENCE,
      credit: credit(st.operatingOrg),
    };
  },
});

// ───────────────────────────── GET /api/v1/stations/{code}/samples ─────────────────────────────

const samplesQuery = z
  .strictObject({
    from: z.iso.date({ error: "from is a date, YYYY-MM-DD." }).optional().describe("Samples starting on or after this day (YYYY-MM-DD)."),
    to: z.iso.date({ error: "to is a date, YYYY-MM-DD." }).optional().describe("Samples starting before this day (YYYY-MM-DD, exclusive)."),
    ...limitOffset(1000, 5000),
  })
  .refine((q) => !q.from || !q.to || q.from < q.to, { error: "from must be before to.", path: ["to"] });

const sampleSchema = z
  .object({
    startDate: z.iso.date().describe("First day of the collection period."),
    endDate: z.iso.date().describe("Day after the last day of the period (exclusive)."),
    amountMm: z.number().nullable().describe("Precipitation amount, mm."),
    d18O: z.number().describe("δ18O, ‰ VSMOW."),
    d2H: z.number().describe("δ2H, ‰ VSMOW."),
    dExcess: z.number().describe("δ2H − 8·δ18O, ‰."),
    d18OSd: z.number().nullable().describe("Analytical uncertainty of δ18O (1σ), ‰."),
    d2HSd: z.number().nullable().describe("Analytical uncertainty of δ2H (1σ), ‰."),
    method: z.string().nullable(),
    laboratory: z.string().nullable(),
    scale: z.string().nullable().describe("Normalisation scale, e.g. VSMOW-SLAP."),
  })
  .meta({ id: "AcceptedSample" });

const samplesResponse = z
  .object({
    station: z.object({ code: z.string(), name: z.string(), synthetic: z.boolean() }),
    samples: z.array(sampleSchema),
    page: pageSchema,
    notice: z.string().nullable(),
    licence: licenceSchema,
    credit: z.string(),
  })
  .meta({ id: "SampleList" });

export const listStationSamples = defineEndpoint({
  id: "listStationSamples",
  method: "GET",
  path: "/api/v1/stations/{code}/samples",
  tag: "Stations",
  summary: "A station's accepted samples",
  description:
    "The accepted samples of a station in date order, as they passed the checks and the review desk: collection period, amount, δ18O, δ2H, d-excess, analytical uncertainties, method, laboratory and scale.",
  access: { unlockedBy: (l) => l.stationDataDownloads, what: "Accepted samples" },
  params: stationCodeParams,
  query: samplesQuery,
  response: samplesResponse,
  responseDescription: "One page of accepted samples.",
  errors: ["not-found"],
  examples: [{ title: "Samples of 2025", params: { code: "RP-EUR-001" }, query: { from: "2025-01-01", to: "2026-01-01" }, withKey: true }],
  async handler({ params, query }) {
    const st = await approvedStation(params.code);
    const where = and(
      eq(samples.stationId, st.id),
      eq(samples.status, "accepted"),
      query.from ? gte(samples.startDate, query.from) : undefined,
      query.to ? lt(samples.startDate, query.to) : undefined,
    );
    const db = getDb();
    const [rows, totalRow] = await Promise.all([
      db
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
        })
        .from(samples)
        .where(where)
        .orderBy(asc(samples.startDate), asc(samples.endDate))
        .limit(query.limit)
        .offset(query.offset)
        .all(),
      db.select({ n: count() }).from(samples).where(where).get(),
    ]);
    const total = totalRow?.n ?? 0;
    return {
      station: { code: st.code, name: st.name, synthetic: st.isDemo },
      samples: rows,
      page: { total, limit: query.limit, offset: query.offset, next: nextPage(`/api/v1/stations/${encodeURIComponent(st.code)}/samples`, { from: query.from, to: query.to }, total, query.limit, query.offset) },
      notice: st.isDemo ? SYNTHETIC_NOTICE : null,
      licence: DATA_LICENCE,
      credit: credit(st.operatingOrg),
    };
  },
});
