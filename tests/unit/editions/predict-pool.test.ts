import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { BATCH_CHUNK, PredictPool } from "@/lib/editions/predict-pool";
import { PREDICTORS_KEPT } from "@/lib/editions/predict-protocol";
import { forgetEditionPredictors, loadEditionPredictor, type SourcedPredictor } from "@/lib/editions/predictor";
import type { SiteInput } from "@/lib/editions/prediction";
import { apiPrediction } from "@/lib/lookup/prediction-answer";
import { batchItemJson } from "@/lib/lookup/batch-json";
import { resultsCsvRows } from "@/lib/lookup/results-csv";
import { freshDb } from "../helpers/db";
import { insertTestEdition, insertTestStations } from "../helpers/edition";
import { testStations } from "../../shared/test-edition";

// The prediction worker threads answer exactly what the request thread would: the same JSON
// text for a site, and for a batch the results in the order sent although the threads work
// through the sites in spatial order, chunk by chunk. A dead thread's work is answered inline.
// Synthetic test data (tests/shared/test-edition.ts).

const STATIONS = testStations("RP-POOL", 40, { lat: [-30, 60], lon: [-120, 140] }, 5);
let predictor: SourcedPredictor;
let pool: PredictPool;

/** Reproducible scattered sites (LCG, Numerical Recipes [trade]); every 7th without elevation. */
function sites(n: number, seed = 11): SiteInput[] {
  let s = seed;
  const r = () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 4294967296);
  return Array.from({ length: n }, (_, i) => ({ lat: -50 + 110 * r(), lon: -180 + 360 * r(), elevationM: i % 7 === 0 ? null : Math.round(3000 * r()) }));
}

/** The batch answer built the plain way: every site predicted in the order sent, written one by one. */
function reference(list: SiteInput[], ids: string[]): unknown {
  const preds = predictor.predictMany(list);
  return preds.map((p, i) => JSON.parse(batchItemJson(p, ids[i])));
}

beforeAll(async () => {
  await freshDb();
  await insertTestStations(STATIONS);
  await insertTestEdition({ id: "2026.06.1", stations: STATIONS, maxNeighbors: 12 });
  forgetEditionPredictors();
  predictor = await loadEditionPredictor("2026.06.1");
  pool = new PredictPool(2);
  await pool.whenReady();
}, 120_000);

afterAll(async () => {
  await pool?.close();
});

describe("prediction worker threads", () => {
  it("answer a site with the same JSON text as the request thread", async () => {
    for (const site of sites(25, 3)) {
      const text = await pool.siteText(predictor, site);
      expect(text).toBe(JSON.stringify(apiPrediction(predictor.predict(site), predictor)));
    }
  });

  it("turn a thread's failure into an error for the caller, not a hang (the predictor's own range check)", async () => {
    await expect(pool.siteText(predictor, { lat: 95, lon: 0, elevationM: null })).rejects.toThrow(/Latitude must be a number from −90 to 90/);
    // the thread is still there for the next lookup
    const site = sites(1, 4)[0];
    expect(await pool.siteText(predictor, site)).toBe(JSON.stringify(apiPrediction(predictor.predict(site), predictor)));
  });

  it("answer a batch of several chunks with every result in the order sent, equal to the plain computation", async () => {
    const list = sites(2 * BATCH_CHUNK + 137);
    const ids = list.map((_, i) => `site-${i}`);
    const stream = await pool.batchBody(predictor, list, ids);
    const answer = JSON.parse(await new Response(stream).text()) as { edition: string; count: number; results: { site: { id: string } }[] };
    expect(answer.edition).toBe("2026.06.1");
    expect(answer.count).toBe(list.length);
    expect(answer.results.map((r) => r.site.id)).toEqual(ids);
    // kriging in spatial order reuses factorised systems: equal to the plain order to the written precision
    expect(answer.results).toEqual(reference(list, ids));
  });

  it("write the batch page's results-file rows as the request thread would", async () => {
    const list = sites(120, 13);
    const ids = list.map((_, i) => `row-${i}`);
    const rows = await pool.csvRows(predictor, list, ids, "# synthetic demo data");
    expect(rows).toBe(resultsCsvRows(predictor.predictMany(list), ids, "# synthetic demo data"));
    expect(rows.split("\n").filter((l) => l.startsWith("row-")).length).toBe(120);
  });

  it("send an edition again to a thread that has let it go (a thread keeps PREDICTORS_KEPT editions)", async () => {
    const single = new PredictPool(1);
    await single.whenReady();
    // the same models under PREDICTORS_KEPT + 2 build tokens, as if that many editions were asked for in turn
    const builds = Array.from({ length: PREDICTORS_KEPT + 2 }, (_, i) => Object.create(predictor, { token: { value: `${predictor.token}/copy-${i}` } }) as SourcedPredictor);
    const site = sites(1, 21)[0];
    const expected = JSON.stringify(apiPrediction(predictor.predict(site), predictor));
    for (const b of [...builds, builds[0], builds[1]]) expect(await single.siteText(b, site)).toBe(expected);
    await single.close();
  });

  it("answer inline, the same, when there are no threads", async () => {
    const inline = new PredictPool(0);
    const list = sites(BATCH_CHUNK + 3, 5);
    const ids = list.map((_, i) => String(i + 1));
    const [viaThreads, viaInline] = await Promise.all([pool.batchBody(predictor, list, ids), inline.batchBody(predictor, list, ids)]);
    expect(await new Response(viaInline).text()).toBe(await new Response(viaThreads).text());
    expect(await inline.siteText(predictor, list[0])).toBe(await pool.siteText(predictor, list[0]));
  });

  it("finish a batch when a thread dies in the middle of it (its chunks are answered inline)", async () => {
    const fragile = new PredictPool(2);
    await fragile.whenReady();
    const list = sites(4 * BATCH_CHUNK, 9);
    const ids = list.map((_, i) => `s${i}`);
    const answer = fragile.batchBody(predictor, list, ids);
    await fragile.terminateOneForTests();
    const parsed = JSON.parse(await new Response(await answer).text()) as { results: unknown[] };
    expect(parsed.results).toEqual(reference(list, ids));
    await fragile.close();
  }, 60_000);

  it("stop handing out chunks when the request is aborted", async () => {
    const controller = new AbortController();
    controller.abort();
    await expect(pool.batchBody(predictor, sites(BATCH_CHUNK + 1), Array.from({ length: BATCH_CHUNK + 1 }, String), controller.signal)).rejects.toThrow();
  });
});
