import "server-only";
import { and, asc, between, eq, inArray, ne, or, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { reviewEvents, stations, users } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { errors } from "@/lib/errors";
import { queueMail } from "@/lib/mail";
import type { StationInput } from "./schemas";
import { stationEntryChecks, type StationCheck } from "./station-checks";

// Stations: registration (pending), the moderators' decision, and who may see what.
// Contributors see only their own stations here; moderators and admins see all.

export const isModerator = (v: Viewer) => v.role === "moderator" || v.role === "admin";

export type StationRow = typeof stations.$inferSelect;

/** The columns an operator enters and may correct (everything but the code). */
function editableFields(input: StationInput) {
  const { name, lat, lon, elevationM, collectorType, samplingInterval, operatingOrg, startDate, notes } = input;
  return { name, lat, lon, elevationM, collectorType, samplingInterval, operatingOrg, startDate, notes };
}

/**
 * Stations (not rejected) in a ±0.25° latitude box around the input and the matching longitude span, for the
 * entry checks (which measure the exact distances); the longitude bound is dropped where the box would cross ±180°.
 */
async function nearbyStations(db: Db, input: StationInput, excludeId: string | null) {
  const dLat = 0.25;
  const dLon = 0.25 / Math.max(0.05, Math.cos((input.lat * Math.PI) / 180));
  const wraps = input.lon - dLon < -180 || input.lon + dLon > 180;
  const rows = await db
    .select({ id: stations.id, code: stations.code, name: stations.name, lat: stations.lat, lon: stations.lon, elevationM: stations.elevationM })
    .from(stations)
    .where(
      and(
        between(stations.lat, input.lat - dLat, input.lat + dLat),
        wraps ? undefined : between(stations.lon, input.lon - dLon, input.lon + dLon),
        ne(stations.status, "rejected"),
      ),
    )
    .all();
  return excludeId ? rows.filter((r) => r.id !== excludeId) : rows;
}

/** Register a station for the viewer: entry checks, one row (pending) and its audit event in one transaction. */
export async function registerStation(viewer: Viewer, input: StationInput): Promise<{ station: StationRow; checks: StationCheck[] }> {
  const db = getDb();
  const checks = stationEntryChecks(input, await nearbyStations(db, input, null));
  return db.transaction(async (tx) => {
    const taken = await tx.select({ id: stations.id }).from(stations).where(eq(stations.code, input.code)).get();
    if (taken) throw errors.invalid(`A station with the code ${input.code} is already registered. Choose another code.`, { code: [`${input.code} is already taken.`] });
    const station = await tx
      .insert(stations)
      .values({
        code: input.code,
        ...editableFields(input),
        status: "pending",
        entryChecks: checks,
        ownerId: viewer.id,
      })
      .returning()
      .get();
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "station",
      entityId: station.id,
      action: "register",
      before: null,
      after: { status: "pending", code: station.code, lat: station.lat, lon: station.lon, elevationM: station.elevationM, warnings: checks.map((c) => c.code) },
    });
    return { station, checks };
  });
}

/**
 * The owner corrects a station a moderator returned: new entry checks, back to pending
 * (row version checked), an audit event with the values before and after.
 */
export async function correctStation(viewer: Viewer, code: string, input: StationInput & { rowVersion: number }): Promise<{ station: StationRow; checks: StationCheck[] }> {
  const db = getDb();
  const before = await db.select().from(stations).where(eq(stations.code, code.toUpperCase())).get();
  if (!before || before.ownerId !== viewer.id) throw errors.notFound(`You have no station with the code ${code}.`);
  if (before.status !== "returned") throw errors.conflict(`Station ${before.code} is ${before.status}; only a station returned for changes can be corrected.`);
  if (input.code !== before.code) throw errors.invalid("The station code cannot be changed.", { code: ["The station code cannot be changed."] });
  const checks = stationEntryChecks(input, await nearbyStations(db, input, before.id));
  return db.transaction(async (tx) => {
    const after = await tx
      .update(stations)
      .set({
        ...editableFields(input),
        entryChecks: checks,
        status: "pending",
        rowVersion: sql`${stations.rowVersion} + 1`,
        updatedAt: new Date(),
      })
      .where(and(eq(stations.id, before.id), eq(stations.rowVersion, input.rowVersion), eq(stations.status, "returned")))
      .returning()
      .get();
    if (!after) throw errors.conflict(`Station ${before.code} changed after you opened it. Reload the page and try again.`);
    const pick = (r: StationRow) => ({ status: r.status, name: r.name, lat: r.lat, lon: r.lon, elevationM: r.elevationM, collectorType: r.collectorType, rowVersion: r.rowVersion });
    await tx.insert(reviewEvents).values({ actorId: viewer.id, entityType: "station", entityId: before.id, action: "resubmit", before: pick(before), after: pick(after) });
    return { station: after, checks };
  });
}

/** A station by code, if the viewer may see its registry record (owner or moderator); else 404. */
export async function stationForViewer(viewer: Viewer, code: string): Promise<StationRow> {
  const row = await getDb().select().from(stations).where(eq(stations.code, code.toUpperCase())).get();
  if (!row || (!isModerator(viewer) && row.ownerId !== viewer.id)) throw errors.notFound(`You have no station with the code ${code}.`);
  return row;
}

export async function listStationsOf(userId: string): Promise<StationRow[]> {
  return getDb().select().from(stations).where(eq(stations.ownerId, userId)).orderBy(asc(stations.code)).all();
}

export async function listPendingStations() {
  return getDb()
    .select({ station: stations, ownerName: users.name, ownerEmail: users.email })
    .from(stations)
    .leftJoin(users, eq(users.id, stations.ownerId))
    .where(or(eq(stations.status, "pending")))
    .orderBy(asc(stations.createdAt))
    .all();
}

const DECISION_STATUS = { approve: "approved", return: "returned", reject: "rejected" } as const;

/**
 * A moderator's decision on a pending (or returned) station. Optimistic concurrency: the
 * update only applies when row_version still equals what the moderator saw; otherwise 409.
 */
export async function decideStation(
  viewer: Viewer,
  code: string,
  d: { decision: "approve" | "return" | "reject"; reason: string; rowVersion: number },
): Promise<StationRow> {
  const db = getDb();
  return db.transaction(async (tx) => {
    const before = await tx.select().from(stations).where(eq(stations.code, code.toUpperCase())).get();
    if (!before) throw errors.notFound(`There is no station with the code ${code}.`);
    if (before.status !== "pending" && before.status !== "returned")
      throw errors.conflict(`Station ${before.code} is already ${before.status}${before.decidedAt ? ` (decided ${before.decidedAt.toISOString().slice(0, 16).replace("T", " ")} UTC)` : ""}. Reload the page to see its current state.`);
    const status = DECISION_STATUS[d.decision];
    const now = new Date();
    const after = await tx
      .update(stations)
      .set({ status, decidedBy: viewer.id, decidedAt: now, decisionReason: d.reason || null, rowVersion: sql`${stations.rowVersion} + 1`, updatedAt: now })
      .where(and(eq(stations.id, before.id), eq(stations.rowVersion, d.rowVersion)))
      .returning()
      .get();
    if (!after) throw errors.conflict(`Someone changed station ${before.code} after you opened it. Reload the page to see its current state, then decide again.`);
    await tx.insert(reviewEvents).values({
      actorId: viewer.id,
      entityType: "station",
      entityId: before.id,
      action: d.decision,
      before: { status: before.status, rowVersion: before.rowVersion },
      after: { status: after.status, rowVersion: after.rowVersion },
      reason: d.reason || null,
      at: now,
    });
    if (before.ownerId) {
      const owner = await tx.select({ email: users.email, name: users.name }).from(users).where(eq(users.id, before.ownerId)).get();
      if (owner)
        await queueMail(
          { to: owner.email, template: "station-decided", data: { name: owner.name, code: before.code, stationName: before.name, decision: d.decision, reason: d.reason || null } },
          tx as unknown as Db,
        );
    }
    return after;
  });
}

export type AuditEntry = {
  id: string;
  at: string;
  actor: string | null;
  entityType: string;
  entityId: string;
  action: string;
  before: unknown;
  after: unknown;
  reason: string | null;
};

/** Audit events for the given entities, oldest first. */
export async function auditFor(entities: { type: "station" | "batch" | "sample"; ids: string[] }[], limit = 500): Promise<AuditEntry[]> {
  const conds = entities.filter((e) => e.ids.length).map((e) => and(eq(reviewEvents.entityType, e.type), inArray(reviewEvents.entityId, e.ids)));
  if (!conds.length) return [];
  const rows = await getDb()
    .select({ e: reviewEvents, actor: users.name, actorEmail: users.email })
    .from(reviewEvents)
    .leftJoin(users, eq(users.id, reviewEvents.actorId))
    .where(or(...conds))
    .orderBy(asc(reviewEvents.at), asc(reviewEvents.id))
    .limit(limit)
    .all();
  return rows.map(({ e, actor, actorEmail }) => ({
    id: e.id,
    at: e.at.toISOString(),
    actor: actor ?? actorEmail ?? null,
    entityType: e.entityType,
    entityId: e.entityId,
    action: e.action,
    before: e.before,
    after: e.after,
    reason: e.reason,
  }));
}

