import type { Client } from "@libsql/client";
import { buildTestEdition } from "./test-edition";

// An edition to look sites up in, for end-to-end tests and `npm run bench:api`. When the database
// already holds a published edition with stored site models (an editions build), that one is used;
// otherwise a small edition is written from the database's approved stations
// (tests/shared/test-edition.ts: invented values, synthetic test data), published long ago so that
// a real edition stays the current one.

export const FIXTURE_EDITION = "2020.01.1";

export async function ensureLookupEdition(db: Client): Promise<string> {
  const real = await db.execute(
    "SELECT e.id FROM editions e WHERE e.status = 'published' AND EXISTS (SELECT 1 FROM surfaces s WHERE s.edition_id = e.id AND s.model IS NOT NULL) ORDER BY e.published_at DESC LIMIT 1",
  );
  if (real.rows.length) return String(real.rows[0].id);
  const st = await db.execute("SELECT code, lat, lon, elevation_m FROM stations WHERE status = 'approved' ORDER BY code");
  const stations = st.rows.map((r) => ({ code: String(r.code), lat: Number(r.lat), lon: Number(r.lon), elevationM: Number(r.elevation_m) }));
  const rows = buildTestEdition({ id: FIXTURE_EDITION, stations, maxNeighbors: 24, extrapolationKm: 800 });
  const at = Date.UTC(2020, 0, 15);
  await db.batch(
    [
      { sql: "INSERT OR IGNORE INTO editions (id, status, is_demo, created_at, published_at) VALUES (?, 'published', 1, ?, ?)", args: [FIXTURE_EDITION, at, at] },
      ...rows.map((r) => ({
        sql: "INSERT OR IGNORE INTO surfaces (id, edition_id, variable, period, grid, trend, variogram, cross_validation, stats, model) VALUES (?, ?, ?, ?, ?, ?, NULL, NULL, ?, ?)",
        args: [crypto.randomUUID(), FIXTURE_EDITION, r.variable, r.period, JSON.stringify(r.grid), r.trend ? JSON.stringify(r.trend) : null, JSON.stringify(r.stats), r.model ? JSON.stringify(r.model) : null],
      })),
    ],
    "write",
  );
  return FIXTURE_EDITION;
}
