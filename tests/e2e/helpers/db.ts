import { createClient, type Client } from "@libsql/client";
import { inject } from "vitest";

// Direct access to the end-to-end database, for "nothing was written"
// assertions and for setting up states (an expired link) that no page makes.
let client: Client | undefined;

export function testDb(): Client {
  client ??= createClient({ url: inject("databaseUrl") });
  return client;
}

export async function countRows(table: string, where = "1 = 1", args: (string | number)[] = []): Promise<number> {
  const rs = await testDb().execute({ sql: `SELECT count(*) AS n FROM ${table} WHERE ${where}`, args });
  return Number(rs.rows[0].n);
}

/** Row counts of the tables a request could write to. */
export async function snapshotCounts(tables = ["users", "auth_tokens", "mail_log", "jobs", "review_events", "memberships", "organizations"]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = await countRows(t);
  return out;
}
