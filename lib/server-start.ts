import "server-only";
import { sql } from "drizzle-orm";
import { getDb } from "@/db";
import { predictPool } from "@/lib/editions/predict-pool";

/** Open the database and start the prediction threads before the first request (instrumentation.ts). A failure is logged, not fatal: requests then do the same work themselves. */
export async function warmUpServer(): Promise<void> {
  try {
    await getDb().run(sql`select 1`);
    predictPool();
  } catch (e) {
    console.error("[rainprint] warming up the server failed; the first requests will do it", e);
  }
}
