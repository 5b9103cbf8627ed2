import "server-only";
import { eq, inArray } from "drizzle-orm";
import { getDb } from "@/db";
import { stations as stationsTable, surfaces } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { type EditionSource, type LoadedEditionPredictor, predictorFromSource, sourceStationCodes } from "./site-model";
import { getCurrentEdition, getEdition, type EditionRow } from "./queries";

// Site predictors of published editions, loaded from the database and cached per edition (a
// small LRU), since restoring ~40 models takes a few ms. The predictor itself and its science
// are in lib/editions/site-model.ts (pure).

export { estimate, MAX_LISTED_STATIONS, statedCorrelation, Z95, type EditionInfo, type EditionSource, type LoadedEditionPredictor } from "./site-model";

const CACHE_SIZE = 4;
/** How long "the current edition" is remembered before the database is asked again, ms. */
const CURRENT_TTL_MS = 5_000;

/** A cached predictor with the source it was built from (the prediction worker threads build theirs from it). */
export type SourcedPredictor = LoadedEditionPredictor & { readonly source: EditionSource; readonly token: string };

function unknownEdition(id: string | undefined): AppError {
  return new AppError("unknown-edition", {
    detail: id
      ? `There is no published edition "${id}". Leave the edition out to use the current one.`
      : "No edition has been published yet, so there is nothing to predict from. Try again after the first edition is published.",
  });
}

/** An edition's stored surface rows and station names. */
async function loadSource(e: EditionRow): Promise<EditionSource> {
  const rows = await getDb()
    .select({ variable: surfaces.variable, period: surfaces.period, trend: surfaces.trend, stats: surfaces.stats, model: surfaces.model })
    .from(surfaces)
    .where(eq(surfaces.editionId, e.id))
    .all();
  const list = sourceStationCodes(rows);
  const names: [string, string][] = [];
  for (let i = 0; i < list.length; i += 500) {
    const part = await getDb().select({ code: stationsTable.code, name: stationsTable.name }).from(stationsTable).where(inArray(stationsTable.code, list.slice(i, i + 500))).all();
    for (const s of part) names.push([s.code, s.name]);
  }
  return { edition: { id: e.id, publishedAt: e.publishedAt, isDemo: e.isDemo, withdrawnAt: e.withdrawnAt, withdrawnReason: e.withdrawnReason }, rows, names };
}

async function build(e: EditionRow): Promise<SourcedPredictor> {
  const source = await loadSource(e);
  return Object.assign(predictorFromSource(source), { source, token: `${e.id}#${crypto.randomUUID()}` });
}

type Cache = { predictors: Map<string, Promise<SourcedPredictor>>; current: { id: string; at: number } | null };
const globalForPredictors = globalThis as unknown as { __rainprintPredictors?: Cache };
const cache = (): Cache => (globalForPredictors.__rainprintPredictors ??= { predictors: new Map(), current: null });

/** Forget cached predictors and the current edition (tests; after withdrawing an edition). */
export function forgetEditionPredictors(): void {
  const c = cache();
  c.predictors.clear();
  c.current = null;
}

async function resolveId(editionId: string | undefined): Promise<string> {
  const c = cache();
  if (editionId && editionId !== "current") return editionId;
  if (c.current && Date.now() - c.current.at < CURRENT_TTL_MS) return c.current.id;
  const cur = await getCurrentEdition();
  if (!cur) throw unknownEdition(undefined);
  c.current = { id: cur.id, at: Date.now() };
  return cur.id;
}

/**
 * The predictor of a published (or withdrawn, still citable) edition; default: the current one.
 * Throws AppError "unknown-edition" (404) for an unknown or unpublished id.
 */
export async function loadEditionPredictor(editionId?: string): Promise<SourcedPredictor> {
  const id = await resolveId(editionId);
  const c = cache();
  let p = c.predictors.get(id);
  if (p) {
    // LRU: most recently used last
    c.predictors.delete(id);
    c.predictors.set(id, p);
    return p;
  }
  p = (async () => {
    const e = await getEdition(id);
    if (!e) throw unknownEdition(id);
    return build(e);
  })();
  c.predictors.set(id, p);
  p.catch(() => c.predictors.delete(id));
  while (c.predictors.size > CACHE_SIZE) c.predictors.delete(c.predictors.keys().next().value as string);
  return p;
}
