import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { getDb } from "@/db";
import { samples, stations } from "@/db/schema";
import { getCurrentEdition, getEditionStationMeans } from "@/lib/editions/queries";

// How a contributor's data is used: accepted samples, and their stations in the current edition (if any).
export async function contributorUsage(userId: string) {
  const acc = await getDb()
    .select({ n: sql<number>`count(*)` })
    .from(samples)
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(and(eq(stations.ownerId, userId), eq(samples.status, "accepted")))
    .get();
  const edition = await getCurrentEdition();
  let stationsInEdition: string[] = [];
  if (edition) {
    const mine = new Set((await getDb().select({ id: stations.id }).from(stations).where(eq(stations.ownerId, userId)).all()).map((s) => s.id));
    stationsInEdition = (await getEditionStationMeans(edition.id, 0)).filter((m) => mine.has(m.stationId) && m.included).map((m) => m.code);
  }
  return { acceptedSamples: Number(acc?.n ?? 0), edition: edition ? { id: edition.id } : null, stationsInEdition };
}
