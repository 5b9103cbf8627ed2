import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, reviewEvents, surfaces } from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { createKrigingModel, createStationSet, crossValidate, restoreKrigingModel } from "@/lib/geostats";
import { defaultBuildParameters } from "@/lib/editions/build/compute";
import { periodMeans, publishEdition, runEditionBuild } from "@/lib/editions/build/pipeline";
import { fitTrend } from "@/lib/editions/build/trend";
import type { SurfaceModelRecord } from "@/lib/editions/prediction";
import { statedCorrelation } from "@/lib/editions/predictor";
import type { EditionDiff, SurfaceCrossValidation, SurfaceGridSpec, SurfaceStats, SurfaceTrend, SurfaceVariogram } from "@/lib/editions/types";
import { readSurfacePlaneData } from "@/lib/surfaces/store";
import { readSurfacePlane } from "@/lib/downloads/editions";
import { freshDb } from "../helpers/db";

// The edition pipeline on the synthetic demo data (test profile, 84 stations): the seeded edition,
// rebuilds of the same inputs, and the stored cross-validation against the engine.

let seeded: string;

beforeAll(async () => {
  await freshDb();
  await seedDemo({ profile: "test" });
  seeded = (await getDb().select({ id: editions.id }).from(editions).get())!.id;
}, 120_000);

/** Build an edition of the current accepted data on a small grid, in this process. */
async function build(id: string, grid = { resolutionDeg: 2, extent: { west: -20, south: 30, east: 40, north: 60 } }, threads = 1) {
  const params = defaultBuildParameters({ grid });
  await getDb().insert(editions).values({ id, status: "building", parameters: params, isDemo: true });
  await runEditionBuild(id, { threads });
  return params;
}

async function planeBytes(editionId: string) {
  const rows = await getDb().select().from(surfaces).where(eq(surfaces.editionId, editionId)).all();
  const out = new Map<string, Buffer>();
  for (const r of rows) {
    const grid = r.grid as SurfaceGridSpec;
    for (const plane of ["value", "variance"] as const) {
      const data = await readSurfacePlaneData(r.id, grid, plane);
      out.set(`${r.variable}/${r.period}/${plane}`, Buffer.from(data.buffer, data.byteOffset, data.byteLength));
    }
    const x = await readSurfacePlaneData(r.id, grid, "extrapolation");
    out.set(`${r.variable}/${r.period}/extrapolation`, Buffer.from(x));
  }
  return out;
}

describe("the seeded demo edition", () => {
  it("is published with 52 surfaces: δ18O, d-excess, δ2H and precipitation for the year and each month", async () => {
    const e = (await getDb().select().from(editions).where(eq(editions.id, seeded)).get())!;
    expect(e.status).toBe("published");
    expect(e.isDemo).toBe(true);
    expect(e.inputsHash).toMatch(/^[0-9a-f]{64}$/);
    const rows = await getDb().select({ variable: surfaces.variable, period: surfaces.period, model: surfaces.model }).from(surfaces).where(eq(surfaces.editionId, seeded)).all();
    expect(rows).toHaveLength(52);
    // kriged surfaces carry a model for site lookups; derived ones (δ2H, annual precipitation) do not
    const withModel = rows.filter((r) => r.model).length;
    expect(withModel).toBe(26 + 12);
    const audit = await getDb().select().from(reviewEvents).where(and(eq(reviewEvents.entityId, seeded), eq(reviewEvents.entityType, "edition"))).all();
    expect(audit.map((a) => a.action).sort()).toEqual(["build-start", "publish"]);
  });

  it("stores cross-validation statistics equal to a direct leave-one-out run on the same station means (lib/geostats crossValidate)", async () => {
    for (const variable of ["d18O", "dExcess"] as const)
      for (const period of [0, 7]) {
        const s = (await getDb()
          .select()
          .from(surfaces)
          .where(and(eq(surfaces.editionId, seeded), eq(surfaces.variable, variable), eq(surfaces.period, period)))
          .get())!;
        const stored = s.crossValidation as SurfaceCrossValidation;
        const vg = s.variogram as SurfaceVariogram;
        const model = s.model as SurfaceModelRecord;
        // independent recomputation from the frozen means: OLS trend, then OK of the residuals
        const means = (await periodMeans(seeded, period)).filter((m) => m.included && m.d18O !== null && m.dExcess !== null);
        expect(model.stationCodes).toEqual(means.map((m) => m.code));
        const trend = fitTrend(
          means.map((m) => m.lat),
          means.map((m) => m.elevationM),
          means.map((m) => m[variable] as number),
        );
        expect(trend.record.terms.map((t) => t.estimate)).toEqual((s.trend as SurfaceTrend).terms.map((t) => t.estimate));
        const chosen = vg.fitted.find((f) => f.model === vg.chosen)!;
        const direct = crossValidate(
          createKrigingModel({
            stations: createStationSet({ coordinates: "lonlat", points: means.map((m) => [m.lon, m.lat]) }),
            values: trend.residuals,
            variogram: { model: chosen.model, nugget: chosen.nugget, psill: chosen.psill, range: chosen.rangeKm },
            maxNeighbors: 24,
          }),
        );
        expect(stored.n).toBe(direct.n);
        expect(stored.rmse).toBe(direct.rmse);
        expect(stored.meanError).toBe(direct.meanError);
        expect(stored.meanZ).toBe(direct.meanZ);
        expect(stored.meanZ2).toBe(direct.meanZ2);
        // the chosen model has the smallest leave-one-out RMSE of the candidates
        for (const f of vg.fitted) expect(chosen.crossValidation.rmse).toBeLessThanOrEqual(f.crossValidation.rmse);
        // the stored model restores to the same kriging model
        const restored = restoreKrigingModel(model.kriging);
        expect(Array.from(restored.values)).toEqual(Array.from(trend.residuals));
      }
  });

  it("δ2H is d-excess + 8·δ18O cell by cell (Dansgaard 1964 definition of d)", async () => {
    const get = async (v: "d18O" | "dExcess" | "d2H") => (await readSurfacePlane(seeded, v, 0))!.values;
    const [o, d, h] = await Promise.all([get("d18O"), get("dExcess"), get("d2H")]);
    let n = 0;
    for (let c = 0; c < h.length; c++) {
      if (Number.isNaN(h[c])) continue;
      n++;
      expect(h[c]).toBeCloseTo(d[c] + 8 * o[c], 3);
    }
    expect(n).toBeGreaterThan(100);
  });

  it("each δ2H surface records the ρ its variance used, as a number and in its note (read by the site predictor)", async () => {
    const rows = await getDb()
      .select({ stats: surfaces.stats })
      .from(surfaces)
      .where(and(eq(surfaces.editionId, seeded), eq(surfaces.variable, "d2H")))
      .all();
    expect(rows).toHaveLength(13);
    for (const r of rows) {
      const stats = r.stats as SurfaceStats;
      expect(stats.d2HCorrelation).toBeGreaterThanOrEqual(-1);
      expect(stats.d2HCorrelation).toBeLessThanOrEqual(1);
      expect(statedCorrelation(stats.note!)).toBeCloseTo(stats.d2HCorrelation!, 4);
    }
  });
});

describe("rebuilding", () => {
  it("the same inputs and parameters give byte-identical planes and the same inputs hash", async () => {
    await build("test.same.1");
    await build("test.same.2");
    const [a, b] = await Promise.all([planeBytes("test.same.1"), planeBytes("test.same.2")]);
    expect(a.size).toBe(52 * 3);
    expect([...b.keys()].sort()).toEqual([...a.keys()].sort());
    for (const [k, bytes] of a) expect(Buffer.compare(bytes, b.get(k)!), k).toBe(0);
    const hashes = await getDb().select({ h: editions.inputsHash }).from(editions).all();
    expect(new Set(hashes.map((r) => r.h)).size).toBe(1);
  }, 120_000);

  it("planes do not depend on the number of kriging threads (1° global grid, 64,800 cells: worker threads)", async () => {
    const g = { resolutionDeg: 1, extent: { west: -180, south: -90, east: 180, north: 90 } };
    await build("test.threads.1", g, 1);
    await build("test.threads.2", g, 2);
    const [a, b] = await Promise.all([planeBytes("test.threads.1"), planeBytes("test.threads.2")]);
    expect(a.size).toBe(52 * 3);
    for (const [k, bytes] of a) expect(Buffer.compare(bytes, b.get(k)!), k).toBe(0);
  }, 180_000);

  it("a new edition records its diff against the published one", async () => {
    expect(await publishEdition("test.same.1", null)).toBe(true);
    const e = (await getDb().select().from(editions).where(eq(editions.id, "test.same.2")).get())!;
    // test.same.2 was built before test.same.1 was published: its diff was against the seeded edition
    const diff = e.diff as EditionDiff;
    expect(diff.previous).toBe(seeded);
    expect(diff.stationsAdded).toEqual([]);
    expect(diff.stationsRemoved).toEqual([]);
    // same means → no change in the station means; different grids → predicted values may differ
    for (const c of diff.meanChanges) expect(c.change).toBe(0);
    expect(diff.predictedChanges.length).toBeGreaterThan(0);
  });
});
