// The demo seed against a fresh temporary database (one per test file, tests/unit/setup.ts).
import { and, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, getDb } from "@/db";
import { migrateDb } from "@/db/migrate";
import { seedDemo } from "@/db/seed";
import demoAccounts from "@/db/seed/demo-accounts.json";
import { demoId, seedDemoData } from "@/db/seed/demo-data";
import { batches, reviewEvents, samples, stations, users } from "@/db/schema";
import { generateDemoScenario } from "@/lib/demo";

const count = async (table: typeof users | typeof stations | typeof batches | typeof samples | typeof reviewEvents) =>
  (await getDb().select({ n: sql<number>`count(*)` }).from(table).get())!.n;

async function counts() {
  return {
    users: await count(users),
    stations: await count(stations),
    batches: await count(batches),
    samples: await count(samples),
    reviewEvents: await count(reviewEvents),
  };
}

describe("seeding the demo (test profile)", () => {
  const scenario = generateDemoScenario({ profile: "test" });
  let first: Awaited<ReturnType<typeof counts>>;

  beforeAll(async () => {
    await migrateDb();
    await seedDemo({ profile: "test" });
    first = await counts();
  });
  afterAll(() => closeDb());

  it("inserts every station, batch and sample of the scenario", () => {
    expect(first.stations).toBe(scenario.stations.length);
    expect(first.batches).toBe(scenario.batches.length);
    expect(first.samples).toBe(scenario.samples.length);
    expect(first.users).toBe(demoAccounts.accounts.length + scenario.people.length);
    // One audit event per approved station and per decided batch, plus the seeded edition's build and publication.
    expect(first.reviewEvents).toBe(scenario.stations.length + scenario.batches.filter((b) => b.status === "decided").length + 2);
  });

  it("stations are approved demo stations; invented contributors cannot sign in with a password", async () => {
    const db = getDb();
    const st = await db.select().from(stations);
    expect(st.every((s) => s.status === "approved" && s.isDemo)).toBe(true);
    const invented = await db.select().from(users).where(sql`${users.email} like '%.example' and ${users.email} not like '%@rainprint.example'`);
    expect(invented.length).toBe(scenario.people.length);
    expect(invented.every((u) => u.passwordHash === null && u.isDemo && u.role === "contributor")).toBe(true);
  });

  it("the demo contributor account owns four stations and has a queued batch", async () => {
    const db = getDb();
    const me = await db.select().from(users).where(eq(users.email, "contributor@rainprint.example")).get();
    expect(me).toBeDefined();
    const mine = await db.select().from(stations).where(eq(stations.ownerId, me!.id));
    expect(mine).toHaveLength(4);
    const queued = await db.select().from(batches).where(and(eq(batches.contributorId, me!.id), eq(batches.status, "queued")));
    expect(queued.length).toBeGreaterThanOrEqual(1);
  });

  it("accepted samples sit in decided seed batches; bad samples wait as pending in queued batches", async () => {
    const db = getDb();
    const rows = await db
      .select({ status: samples.status, batchStatus: batches.status, source: batches.source, n: sql<number>`count(*)` })
      .from(samples)
      .innerJoin(batches, eq(samples.batchId, batches.id))
      .groupBy(samples.status, batches.status, batches.source);
    expect(rows).toEqual(
      expect.arrayContaining([
        { status: "accepted", batchStatus: "decided", source: "seed", n: scenario.samples.filter((s) => s.status === "accepted").length },
        { status: "pending", batchStatus: "queued", source: "seed", n: scenario.samples.filter((s) => s.status === "pending").length },
      ]),
    );
    expect(rows).toHaveLength(2);
    const moderator = await db.select().from(users).where(eq(users.email, "moderator@rainprint.example")).get();
    const acc = await db.select().from(samples).where(eq(samples.status, "accepted")).limit(5);
    for (const s of acc) {
      expect(s.decidedBy).toBe(moderator!.id);
      expect(s.decidedAt).toBeInstanceOf(Date);
    }
  });

  it("stores d-excess = δ2H − 8·δ18O (Dansgaard 1964 [pub]) and sample counts per batch", async () => {
    const rows = await getDb().select().from(samples);
    for (const s of rows) expect(s.dExcess).toBeCloseTo(s.d2H - 8 * s.d18O, 6);
    const batchRows = await getDb().select().from(batches);
    for (const b of batchRows) expect(b.sampleCount).toBe(rows.filter((s) => s.batchId === b.id).length);
  });

  it("runs lib/qc's checks on the pending samples: every bad one is flagged, the queue sorts on it", async () => {
    const db = getDb();
    const pending = await db.select().from(samples).where(eq(samples.status, "pending"));
    const byKey = new Map(scenario.samples.map((s) => [demoId(`sample:${s.key}`), s]));
    for (const row of pending) {
      const s = byKey.get(row.id)!;
      if (s.badKind) {
        expect(row.checks.length, s.key).toBeGreaterThan(0);
        expect(row.worstSeverity, s.key).not.toBeNull();
      } else {
        expect(row.worstSeverity === "fail", s.key).toBe(false);
        expect(row.lcExcess, s.key).not.toBeNull();
      }
    }
    const queued = await db.select().from(batches).where(eq(batches.status, "queued"));
    expect(queued.filter((b) => b.worstSeverity === "fail").length).toBeGreaterThanOrEqual(5);
    // Accepted history is stored as decided, without check results.
    const accepted = await db.select().from(samples).where(eq(samples.status, "accepted")).limit(50);
    for (const row of accepted) expect([row.checks, row.worstSeverity, row.lcExcess]).toEqual([[], null, null]);
  });

  it("a second run inserts nothing", async () => {
    await seedDemo({ profile: "test" });
    expect(await counts()).toEqual(first);
    const again = await seedDemoData({ profile: "test" });
    expect(again.skipped).toBe(true);
    expect(again.inserted).toEqual({ users: 0, stations: 0, batches: 0, samples: 0, reviewEvents: 0 });
    expect(await counts()).toEqual(first);
  });
});
