import "server-only";
import { z } from "zod";
import { errors } from "@/lib/errors";
import { EDITION_ID } from "@/lib/downloads/editions";
import type { BuildParameters } from "@/lib/editions/build/compute";
import { getEdition, listPublishedEditions, type EditionRow } from "@/lib/editions/queries";
import type { EditionDiff } from "@/lib/editions/types";
import { SURFACE_VARIABLES } from "@/db/schema";
import { defineEndpoint } from "../endpoint";
import { DATA_LICENCE, licenceSchema, SYNTHETIC_NOTICE } from "./common";

// Editions: the published (and withdrawn) editions with their parameters and the leave-one-out
// cross-validation statistics of every surface.

const cvSchema = z
  .object({
    n: z.number().int().describe("Stations left out one at a time."),
    meanError: z.number().describe("Mean of observed − predicted (ideal 0), in the surface's units."),
    rmse: z.number().describe("Root mean squared error, in the surface's units."),
    meanZ: z.number().describe("Mean standardised error (ideal 0)."),
    meanZ2: z.number().describe("Mean squared standardised error (ideal ≈ 1)."),
  })
  .meta({ id: "CrossValidationStatistics" });

const surfaceSummary = z
  .object({
    variable: z.enum(SURFACE_VARIABLES),
    period: z.number().int().min(0).max(12).describe("0 = annual, 1–12 = calendar month."),
    method: z.enum(["regression-kriging", "sqrt-kriging", "derived-d2H", "derived-annual-sum"]),
    stations: z.number().int().describe("Stations whose mean went into the surface."),
    variogram: z.enum(["spherical", "exponential", "gaussian"]).nullable().describe("The variogram model chosen by cross-validation; null for derived surfaces."),
    crossValidation: cvSchema.nullable().describe("Leave-one-out statistics; null for derived surfaces."),
  })
  .meta({ id: "EditionSurfaceSummary" });

const parametersSchema = z
  .object({
    grid: z.object({
      resolutionDeg: z.number(),
      extent: z.object({ west: z.number(), south: z.number(), east: z.number(), north: z.number() }),
      landOnly: z.boolean(),
    }),
    maxNeighbors: z.number().int(),
    extrapolationKm: z.number(),
    fitMethod: z.number().int(),
    variogramModels: z.array(z.string()),
    stationMeanRules: z.record(z.string(), z.number()).describe("Overrides of the coverage rules; {} = the defaults."),
    d2HCovariance: z.string(),
    elevationModelId: z.string().nullable().optional().describe("The elevation model the grid trend used; null = sea-level-equivalent surfaces."),
  })
  .meta({ id: "EditionParameters", description: "Every parameter of the build." });

const editionSummary = z
  .object({
    id: z.string().describe("Edition id, e.g. 2026.12.1: cite it with any value you use."),
    status: z.enum(["published", "withdrawn"]),
    current: z.boolean().describe("True for the newest published edition (what the map and lookups use by default)."),
    publishedAt: z.iso.datetime().nullable(),
    synthetic: z.boolean().describe("True when built from synthetic demo data."),
    stations: z.number().int().nullable(),
    samples: z.number().int().nullable(),
    seaLevelEquivalent: z.boolean().nullable().describe("True when the grid surfaces are reduced to sea level (no elevation model)."),
    parameters: parametersSchema.nullable(),
    surfaces: z.array(surfaceSummary),
    url: z.string(),
  })
  .meta({ id: "EditionSummary" });

const stationChange = z.object({
  stationCode: z.string(),
  variable: z.enum(["d18O", "dExcess", "precipMm"]),
  period: z.number().int(),
  previous: z.number(),
  current: z.number(),
  change: z.number(),
});

const editionDetail = z
  .object({
    edition: editionSummary,
    inputsHash: z.string().nullable().describe("SHA-256 over the accepted samples (ids and versions) and station positions the edition was built from."),
    diff: z
      .object({
        previous: z.string().nullable(),
        stationsAdded: z.array(z.string()),
        stationsRemoved: z.array(z.string()),
        meanChanges: z.array(stationChange),
        predictedChanges: z.array(stationChange),
      })
      .nullable()
      .describe("Changes since the previous published edition."),
    notice: z.string().nullable(),
    licence: licenceSchema,
  })
  .meta({ id: "EditionDetail" });

function out(e: EditionRow, currentId: string | null): z.output<typeof editionSummary> {
  const s = e.summary;
  const p = (e.parameters ?? null) as BuildParameters | null;
  return {
    id: e.id,
    status: e.status as "published" | "withdrawn",
    current: e.id === currentId,
    publishedAt: e.publishedAt ? e.publishedAt.toISOString() : null,
    synthetic: e.isDemo,
    stations: s?.stations.total ?? null,
    samples: s?.stations.samples ?? null,
    seaLevelEquivalent: s?.seaLevelEquivalent ?? null,
    parameters: p,
    surfaces: (s?.surfaces ?? []).map((x) => ({ ...x, variogram: x.variogram ?? null })),
    url: `/api/v1/editions/${encodeURIComponent(e.id)}`,
  };
}

async function currentId(): Promise<string | null> {
  return (await getEdition("current"))?.id ?? null;
}

export const listEditions = defineEndpoint({
  id: "listEditions",
  method: "GET",
  path: "/api/v1/editions",
  tag: "Editions",
  summary: "Published editions",
  description:
    "Every published (and withdrawn) edition, newest first, with its build parameters and the leave-one-out cross-validation statistics of each surface.",
  access: "everyone",
  response: z.object({ editions: z.array(editionSummary), notice: z.string().nullable(), licence: licenceSchema }).meta({ id: "EditionList" }),
  responseDescription: "The editions.",
  examples: [{ title: "All editions" }],
  async handler() {
    const [list, cur] = await Promise.all([listPublishedEditions(), currentId()]);
    return { editions: list.map((e) => out(e, cur)), notice: list.some((e) => e.isDemo) ? SYNTHETIC_NOTICE : null, licence: DATA_LICENCE };
  },
});

export const getEditionById = defineEndpoint({
  id: "getEdition",
  method: "GET",
  path: "/api/v1/editions/{id}",
  tag: "Editions",
  summary: "One edition",
  description: "A published or withdrawn edition (or `current`): parameters, cross-validation per surface, the inputs hash and the changes since the previous edition.",
  access: "everyone",
  params: z.strictObject({
    id: z.string().regex(EDITION_ID, { error: "An edition id looks like 2026.12.1 (or use current)." }).describe("Edition id, e.g. 2026.12.1, or current."),
  }),
  response: editionDetail,
  responseDescription: "The edition.",
  errors: ["not-found"],
  examples: [{ title: "The current edition", params: { id: "current" } }],
  async handler({ params }) {
    const e = await getEdition(params.id);
    if (!e) throw errors.notFound(`There is no published edition ${params.id}.`);
    return {
      edition: out(e, await currentId()),
      inputsHash: e.inputsHash,
      diff: (e.diff ?? null) as EditionDiff | null,
      notice: e.isDemo ? SYNTHETIC_NOTICE : null,
      licence: DATA_LICENCE,
    };
  },
});
