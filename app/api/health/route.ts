import { sql } from "drizzle-orm";
import { getDb } from "@/db";

export const dynamic = "force-dynamic";

/** Liveness and database reachability; used by the process supervisor and load tests. */
export async function GET() {
  await getDb().run(sql`select 1`);
  return Response.json({ status: "ok" }, { headers: { "Cache-Control": "no-store" } });
}
