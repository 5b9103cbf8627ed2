import "server-only";
import { z } from "zod";
import { PLAN_CATALOGUE, lowestPlanAllowing, planLimits } from "@/lib/billing/plans";
import { predictPool } from "@/lib/editions/predict-pool";
import { loadEditionPredictor } from "@/lib/editions/predictor";
import { AppError } from "@/lib/errors";
import { CoordinateError, parseCoordinate, parseElevation } from "@/lib/lookup/coordinates";
import { BATCH_STATIONS, batchItemJson, writeBatchItem } from "@/lib/lookup/batch-json";
import { apiPrediction as writeApiPrediction } from "@/lib/lookup/prediction-answer";
import { describeRowErrors, parseSitesCsv } from "@/lib/lookup/sites-csv";
import { defineEndpoint, JsonText } from "../endpoint";

// Site lookups: predicted monthly and annual δ18O, δ2H and d-excess with 95%
// intervals at one site (GET) or many (POST, JSON or CSV), computed exactly
// at the site from an edition's fitted models (lib/editions/predictor.ts).
//
// Quota: a single lookup costs 1 unit; a batch costs 1 unit per site (a
// 10,000-site batch does the work of 10,000 lookups). A request refused as
// malformed, for an unknown edition, or for a batch larger than the plan
// allows counts nothing (those checks run before the quota).

/** Most sites in one POST (the Institution plan's batch limit). */
export const MAX_BATCH_SITES = 10_000;

const EDITION_ID = /^(?:current|[0-9A-Za-z][0-9A-Za-z._-]{0,39})$/;

function coordinate(axis: "lat" | "lon") {
  return z.string().transform((s, ctx) => {
    try {
      return parseCoordinate(s, axis);
    } catch (e) {
      ctx.addIssue({ code: "custom", message: e instanceof CoordinateError ? e.message : String(e) });
      return z.NEVER;
    }
  });
}

const elevationParam = z.string().transform((s, ctx) => {
  try {
    return parseElevation(s);
  } catch (e) {
    ctx.addIssue({ code: "custom", message: e instanceof CoordinateError ? e.message : String(e) });
    return z.NEVER;
  }
});

const editionParam = z
  .string()
  .regex(EDITION_ID, { error: "edition is an edition id such as 2026.12.1, or current." })
  .describe("Edition id, e.g. 2026.12.1 (default: the current edition).");

export const predictQuery = z.strictObject({
  lat: coordinate("lat").describe("Latitude: decimal degrees (46.5042) or degrees-minutes-seconds (46°30'15\"N), −90…90."),
  lon: coordinate("lon").describe("Longitude: decimal degrees (7.2083) or degrees-minutes-seconds (7°12'30\"E), −180…180."),
  elevation: elevationParam.optional().describe("Elevation in metres above sea level (−500…9000). Without it the answer is the sea-level equivalent."),
  edition: editionParam.optional(),
});

const numberOrText = (axis: "lat" | "lon") =>
  z.union([z.number(), z.string()]).transform((v, ctx) => {
    try {
      return parseCoordinate(v, axis);
    } catch (e) {
      ctx.addIssue({ code: "custom", message: e instanceof CoordinateError ? e.message : String(e) });
      return z.NEVER;
    }
  });

const siteInput = z.strictObject({
  id: z.union([z.string().max(100), z.number()]).optional().describe("Your id for the site, echoed back (default: its position, 1-based)."),
  lat: numberOrText("lat").describe("Latitude, decimal degrees or degrees-minutes-seconds text."),
  lon: numberOrText("lon").describe("Longitude, decimal degrees or degrees-minutes-seconds text."),
  elevation: z
    .union([z.number(), z.string(), z.null()])
    .optional()
    .transform((v, ctx) => {
      try {
        return parseElevation(v ?? null);
      } catch (e) {
        ctx.addIssue({ code: "custom", message: e instanceof CoordinateError ? e.message : String(e) });
        return z.NEVER;
      }
    })
    .describe("Metres above sea level; leave out for the sea-level equivalent."),
});

export const predictBatchBody = z.strictObject({
  edition: editionParam.optional(),
  sites: z
    .array(siteInput)
    .min(1, { error: "sites is empty; send at least one site." })
    .max(MAX_BATCH_SITES, { error: `A batch holds at most ${MAX_BATCH_SITES.toLocaleString("en")} sites; split the file.` }),
});

/** CSV body → the JSON body's shape (row errors → 400 with every problem by line). */
function parseCsvBody(text: string): unknown {
  const { sites, errors } = parseSitesCsv(text, { maxSites: MAX_BATCH_SITES });
  if (errors.length) {
    const lines = describeRowErrors(errors);
    throw new AppError("invalid-input", {
      detail: `The CSV has ${errors.length} problem${errors.length === 1 ? "" : "s"}; nothing was looked up. ${lines[0]}`,
      fields: { csv: lines },
    });
  }
  return { sites: sites.map((s) => ({ id: s.id, lat: s.lat, lon: s.lon, elevation: s.elevationM })) };
}

// ---- answers ----

const estimateSchema = z
  .object({
    value: z.number(),
    sd: z.number().describe("Standard deviation of the prediction."),
    lower95: z.number().describe("Lower end of the 95% interval."),
    upper95: z.number().describe("Upper end of the 95% interval."),
  })
  .meta({ id: "Estimate", description: "A predicted value with its standard deviation and 95% interval (value ± 1.96·sd; for precipitation the back-transformed interval)." });

const periodSchema = z.object({
  d18O: estimateSchema.describe("δ18O, ‰ VSMOW."),
  d2H: estimateSchema.describe("δ2H, ‰ VSMOW (derived: d-excess + 8·δ18O)."),
  dExcess: estimateSchema.describe("Deuterium excess, ‰."),
  precipMm: estimateSchema.nullable().describe("Precipitation, mm (per month; the annual value is the sum of the months)."),
});

export const sitePredictionSchema = z
  .object({
    edition: z.string().describe("The edition the values come from."),
    citation: z.string().describe("A ready-to-paste line that cites this lookup."),
    site: z.object({
      id: z.string().optional(),
      lat: z.number(),
      lon: z.number(),
      elevationM: z.number().nullable().describe("null: the sea-level-equivalent prediction (no elevation given)."),
      seaLevelEquivalent: z.boolean(),
      extrapolation: z.boolean().describe("True when the nearest station is farther than extrapolationKm: treat the values with extra care."),
      nearestStationKm: z.number(),
      extrapolationKm: z.number(),
    }),
    annual: periodSchema,
    monthly: z.array(periodSchema.extend({ month: z.number().int().min(1).max(12) })).length(12),
    waterLine: z
      .object({
        slope: z.number().nullable(),
        intercept: z.number().nullable(),
        slopeSE: z.number().nullable(),
        interceptSE: z.number().nullable(),
        r2: z.number().nullable(),
        method: z.string().describe("pwlsr: precipitation-weighted least squares (Hughes & Crawford 2012); ols without precipitation; none when no line fits."),
      })
      .describe("Predicted local meteoric water line δ2H = slope·δ18O + intercept through the 12 monthly predictions."),
    stations: z
      .array(z.object({ code: z.string(), name: z.string(), distanceKm: z.number(), weight: z.number().describe("Ordinary-kriging weight in the annual δ18O residual.") }))
      .describe("The stations that informed the prediction, nearest first."),
    synthetic: z.boolean().describe("True when the edition is built from synthetic demo data."),
    notice: z.string().optional(),
  })
  .meta({ id: "SitePrediction" });

export { BATCH_STATIONS, batchItemJson, writeBatchItem };

/** A prediction as the API answers it (lib/lookup/prediction-answer.ts); typed here so the compiler holds it to the documented schema. */
export const apiPrediction: (...args: Parameters<typeof writeApiPrediction>) => z.output<typeof sitePredictionSchema> = writeApiPrediction;

export const batchSitePredictionSchema = sitePredictionSchema
  .omit({ citation: true, synthetic: true, notice: true })
  .meta({ id: "BatchSitePrediction", description: `A site of a batch: as SitePrediction, with the ${BATCH_STATIONS} nearest informing stations; the citation and notice are given once for the batch.` });

export const batchResponse = z
  .object({
    edition: z.string(),
    citation: z.string().describe("How to cite the batch (each site is cited by its coordinates and this edition)."),
    count: z.number().int(),
    synthetic: z.boolean(),
    notice: z.string().optional(),
    results: z.array(batchSitePredictionSchema),
  })
  .meta({ id: "SitePredictionBatch" });

const DESCRIPTION_COMMON =
  "Values are computed exactly at the site from the edition's fitted models (trend in |latitude|, latitude² and elevation plus the kriged residual), not read from the map grid. " +
  "δ in ‰ on the VSMOW–SLAP scale; each value comes with its standard deviation and 95% interval. They are statistical estimates, not measurements; provenance or forensic conclusions need accredited laboratory analysis.";

export const predictSite = defineEndpoint({
  id: "predictSite",
  method: "GET",
  path: "/api/v1/predict",
  tag: "Site lookups",
  summary: "Predicted precipitation isotopes at one site",
  description: `Monthly and annual δ18O, δ2H, d-excess and precipitation at a site, the predicted local meteoric water line and the stations that informed it. ${DESCRIPTION_COMMON} Costs one unit of the daily quota and, on the Open plan, one of its daily site lookups.`,
  access: "everyone",
  query: predictQuery,
  response: sitePredictionSchema,
  responseDescription: "The prediction at the site.",
  quota: { meter: "lookups" },
  errors: ["unknown-edition"],
  examples: [
    { title: "A site in decimal degrees with its elevation", query: { lat: "46.5042", lon: "7.2083", elevation: "1200" } },
    { title: "Degrees-minutes-seconds, a named edition", query: { lat: "46°30'15\"N", lon: "7°12'30\"E", edition: "current" } },
  ],
  async beforeQuota({ query }) {
    await loadEditionPredictor(query.edition); // an unknown edition is a 404 that counts nothing
  },
  async handler({ query }) {
    // computed on a prediction worker thread (lib/editions/predict-pool.ts); same text as apiPrediction
    const predictor = await loadEditionPredictor(query.edition);
    return new JsonText(await predictPool().siteText(predictor, { lat: query.lat, lon: query.lon, elevationM: query.elevation ?? null }));
  },
});

export const predictBatch = defineEndpoint({
  id: "predictBatch",
  method: "POST",
  path: "/api/v1/predict",
  tag: "Site lookups",
  summary: "Predicted precipitation isotopes at many sites",
  description:
    `The same answer as the single-site lookup for up to ${MAX_BATCH_SITES.toLocaleString("en")} sites, as JSON { sites: [{ id, lat, lon, elevation }] } or as CSV (text/csv; columns id, latitude, longitude, elevation_m; decimal degrees or degrees-minutes-seconds). ` +
    `${DESCRIPTION_COMMON} Each site costs one unit of the daily quota. Plans limit the sites per batch (Researcher ${planLimits("researcher").batchLookupMaxSites.toLocaleString("en")}, Institution ${planLimits("institution").batchLookupMaxSites.toLocaleString("en")}); a CSV with any bad row is refused whole, each problem named by line, and counts nothing.`,
  access: { unlockedBy: (l) => l.batchLookupMaxSites > 0, what: "Batch lookups" },
  body: {
    schema: predictBatchBody,
    maxBytes: 4 * 1024 * 1024,
    csv: { parse: parseCsvBody, description: "A header row naming id, latitude, longitude and optionally elevation_m, then one site per row." },
  },
  response: batchResponse,
  responseDescription: "One prediction per site, in the order sent.",
  quota: { cost: ({ body }) => body.sites.length },
  errors: ["unknown-edition", "plan-required"],
  examples: [
    {
      title: "Two sites as JSON",
      withKey: true,
      body: { sites: [{ id: "spring-1", lat: 46.5042, lon: 7.2083, elevation: 1200 }, { id: "well-7", lat: "47°22'N", lon: "8°33'E" }] },
    },
  ],
  async beforeQuota({ caller, body }) {
    const max = planLimits(caller.plan).batchLookupMaxSites;
    if (body.sites.length > max) {
      const up = lowestPlanAllowing((l) => l.batchLookupMaxSites >= body.sites.length);
      throw new AppError("plan-required", {
        detail: `This batch has ${body.sites.length.toLocaleString("en")} sites; the ${PLAN_CATALOGUE[caller.plan].name} plan looks up at most ${max.toLocaleString("en")} per batch${
          up ? ` (the ${PLAN_CATALOGUE[up].name} plan: ${planLimits(up).batchLookupMaxSites.toLocaleString("en")})` : ""
        }. Split the file. Nothing was counted.`,
        extensions: up ? { "required-plan": up } : undefined,
      });
    }
    await loadEditionPredictor(body.edition);
  },
  async handler({ req, body }) {
    // the sites in spatial order, answered in chunks in parallel on the prediction threads, written back in the order sent
    const predictor = await loadEditionPredictor(body.edition);
    const sites = body.sites.map((s) => ({ lat: s.lat, lon: s.lon, elevationM: s.elevation ?? null }));
    const ids = body.sites.map((s, i) => String(s.id ?? i + 1));
    const stream = await predictPool().batchBody(predictor, sites, ids, req.signal);
    // no-transform: the app server would gzip the answer (~46 MB for 10,000 sites) at zlib's default
    // level, which costs more CPU than predicting it; a proxy in front may compress it instead.
    return new Response(stream, { headers: { "Content-Type": "application/json; charset=utf-8", "Cache-Control": "no-store, no-transform" } });
  },
});

