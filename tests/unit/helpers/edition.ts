import { getDb } from "@/db";
import { editions, stations, surfaces } from "@/db/schema";
import { buildTestEdition, type TestEditionOptions, type TestStation } from "../../shared/test-edition";

/** Write invented stations (approved, synthetic) to the test database. */
export async function insertTestStations(list: TestStation[]): Promise<void> {
  await getDb()
    .insert(stations)
    .values(list.map((s) => ({ code: s.code, name: `Test station ${s.code}`, lat: s.lat, lon: s.lon, elevationM: s.elevationM, collectorType: "bulk-oil" as const, status: "approved" as const, isDemo: true })))
    .onConflictDoNothing();
}

/** Write a test edition (see tests/shared/test-edition.ts) with its surfaces; published unless told otherwise. */
export async function insertTestEdition(opts: TestEditionOptions & { status?: "published" | "ready" | "withdrawn"; publishedAt?: Date }): Promise<void> {
  const rows = buildTestEdition(opts);
  const db = getDb();
  await db.insert(editions).values({ id: opts.id, status: opts.status ?? "published", isDemo: true, publishedAt: opts.status === "ready" ? null : (opts.publishedAt ?? new Date()) });
  await db.insert(surfaces).values(rows.map((r) => ({ editionId: opts.id, ...r })));
}
