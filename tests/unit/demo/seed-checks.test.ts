// The seed's check hook (a custom checker instead of the default lib/qc one; null for
// none) and its behaviour without the demo accounts. A fresh temporary database for this
// file (tests/unit/setup.ts).
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db";
import { migrateDb } from "@/db/migrate";
import { batches, samples, stations } from "@/db/schema";
import { demoId, seedDemoData, type SeedCheckSample, type SeedDemoDataResult } from "@/db/seed/demo-data";
import { generateDemoScenario } from "@/lib/demo";

describe("seedDemoData with a check hook", () => {
  const scenario = generateDemoScenario({ profile: "test" });
  const seen: string[] = [];
  let result: SeedDemoDataResult;
  // A stand-in checker with one real rule: d-excess below 0 fails ("evaporation", [trade]).
  const checkSample: SeedCheckSample = (s, ctx) => {
    seen.push(s.key);
    expect(ctx.station.code).toBe(s.stationCode);
    expect(ctx.history.every((h) => h.status === "accepted" && h.stationCode === s.stationCode)).toBe(true);
    return s.dExcess < 0
      ? { checks: [{ code: "evaporation", severity: "fail", dExcess: s.dExcess }], worstSeverity: "fail", lcExcess: -1 }
      : { checks: [], worstSeverity: null };
  };

  beforeAll(async () => {
    await migrateDb();
    result = await seedDemoData({ profile: "test", checkSample });
  });
  afterAll(() => closeDb());

  it("runs the hook on every pending sample and only on those", () => {
    const pending = scenario.samples.filter((s) => s.status === "pending").map((s) => s.key);
    expect(seen.sort()).toEqual(pending.sort());
  });

  it("stores the outcome on the sample and the worst severity on its batch", async () => {
    const db = getDb();
    const evaporated = scenario.samples.filter((s) => s.badKind === "evaporated");
    expect(evaporated.length).toBeGreaterThan(0);
    for (const e of evaporated) {
      const row = await db.select().from(samples).where(eq(samples.id, demoId(`sample:${e.key}`))).get();
      expect(row!.worstSeverity).toBe("fail");
      expect(row!.checks).toEqual([{ code: "evaporation", severity: "fail", dExcess: row!.dExcess }]);
      expect(row!.lcExcess).toBe(-1);
      const batch = await db.select().from(batches).where(eq(batches.id, row!.batchId)).get();
      expect(batch!.worstSeverity).toBe("fail");
    }
  });

  it("without the demo accounts it still seeds, says so, and gives the demo stations to an invented colleague", async () => {
    expect(result.skipped).toBe(false);
    expect(result.inserted.stations).toBe(scenario.stations.length);
    expect(result.inserted.samples).toBe(scenario.samples.length);
    expect(result.warnings.join(" ")).toMatch(/demo contributor account is missing/);
    const orphans = await getDb().select({ n: sql<number>`count(*)` }).from(stations).where(sql`${stations.ownerId} is null`).get();
    expect(orphans!.n).toBe(0);
  });

  it("ids are stable name-based UUIDs", () => {
    expect(demoId("station:RP-EUR-001")).toBe(demoId("station:RP-EUR-001"));
    expect(demoId("station:RP-EUR-001")).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(demoId("a")).not.toBe(demoId("b"));
  });
});
