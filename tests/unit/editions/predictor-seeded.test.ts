import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { editions, surfaces } from "@/db/schema";
import { seedDemo } from "@/db/seed";
import { forgetEditionPredictors, loadEditionPredictor } from "@/lib/editions/predictor";
import type { SurfaceGridSpec, SurfaceStats } from "@/lib/editions/types";
import { readSurfacePlaneData } from "@/lib/surfaces/store";
import { freshDb } from "../helpers/db";

// The predictor on the edition the demo seed builds and publishes (lib/editions/build, synthetic demo
// data, test profile): at grid-cell centres its values and variances equal the planes the build
// computed with the grid runner — two independent paths through the same stored models.

let editionId = "";

beforeAll(async () => {
  await freshDb();
  await seedDemo({ profile: "test" });
  editionId = (await getDb().select({ id: editions.id }).from(editions).where(eq(editions.status, "published")).get())!.id;
  forgetEditionPredictors();
}, 180_000);

async function plane(variable: "d18O" | "d2H" | "dExcess" | "precipMm", period: number) {
  const row = (await getDb().select().from(surfaces).where(eq(surfaces.editionId, editionId)).all()).find((r) => r.variable === variable && r.period === period)!;
  const grid = row.grid as SurfaceGridSpec;
  return { grid, stats: row.stats as SurfaceStats, value: await readSurfacePlaneData(row.id, grid, "value"), variance: await readSurfacePlaneData(row.id, grid, "variance") };
}

describe("predictor vs the build's grid planes", () => {
  it("equals the stored Float32 planes at cell centres (value and variance), δ2H and annual precipitation included", async () => {
    const p = await loadEditionPredictor();
    expect(p.editionId).toBe(editionId);
    const checks: ["d18O" | "d2H" | "dExcess" | "precipMm", number, (s: ReturnType<typeof p.predict>) => { value: number; sd: number }][] = [
      ["d18O", 0, (s) => s.annual.d18O],
      ["d2H", 0, (s) => s.annual.d2H],
      ["dExcess", 7, (s) => s.monthly[6].dExcess],
      ["d18O", 1, (s) => s.monthly[0].d18O],
      ["precipMm", 3, (s) => s.monthly[2].precipMm!],
      ["precipMm", 0, (s) => s.annual.precipMm!],
    ];
    for (const [variable, period, pick] of checks) {
      const pl = await plane(variable, period);
      expect(pl.stats.seaLevelEquivalent).toBe(true);
      const { grid } = pl;
      const cells: number[] = [];
      for (let i = 0; i < pl.value.length && cells.length < 40; i += 7) if (Number.isFinite(pl.value[i])) cells.push(i);
      expect(cells.length, `${variable} ${period}`).toBeGreaterThan(10);
      const sites = cells.map((i) => ({ lat: grid.lat0 - Math.floor(i / grid.nx) * grid.dLat, lon: grid.lon0 + (i % grid.nx) * grid.dLon }));
      const preds = p.predictMany(sites);
      cells.forEach((c, j) => {
        const e = pick(preds[j]);
        const tol = 2e-5 * Math.max(1, Math.abs(pl.value[c]));
        expect(Math.abs(e.value - pl.value[c]), `${variable}/${period} value at cell ${c}`).toBeLessThan(tol);
        expect(Math.abs(e.sd ** 2 - pl.variance[c]), `${variable}/${period} variance at cell ${c}`).toBeLessThan(2e-5 * Math.max(1, pl.variance[c]));
      });
    }
  });
});
