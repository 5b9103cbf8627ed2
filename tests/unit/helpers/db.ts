import { migrateDb } from "@/db/migrate";
import { getClient } from "@/db";

/** Apply the migrations to this test file's temporary database (see tests/unit/setup.ts). */
export async function freshDb(): Promise<void> {
  await migrateDb();
}

/** Row count of a table (for "nothing was written" assertions). */
export async function countRows(table: string): Promise<number> {
  const rs = await getClient().execute(`SELECT count(*) AS n FROM ${table}`);
  return Number(rs.rows[0].n);
}
