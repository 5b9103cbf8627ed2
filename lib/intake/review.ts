import "server-only";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { batches, reviewEvents, samples, stations, users, type Severity } from "@/db/schema";
import { errors } from "@/lib/errors";
import { queueMail } from "@/lib/mail";
import type { Viewer } from "@/lib/auth/guard";
import { batchSummaries, type BatchSummary } from "./batches";
import type { SampleDecisionInput } from "./schemas";

// The review desk: the queue, per-sample decisions with optimistic concurrency, bulk
// acceptance of clean samples, and closing a batch once every sample is decided.

export type QueueQuery = {
  sort?: "age" | "station" | "contributor" | "severity" | "samples";
  dir?: "asc" | "desc";
  station?: string;
  contributor?: string;
  severity?: "fail" | "warn" | "note" | "clean";
  page?: number;
  pageSize?: number;
};

const SEV_RANK: Record<string, number> = { clean: 0, note: 1, warn: 2, fail: 3 };

export async function reviewQueue(q: QueueQuery): Promise<{ rows: (BatchSummary & { pending: number; ageDays: number })[]; total: number; page: number; pageSize: number }> {
  const now = Date.now();
  let rows = (await batchSummaries({ statuses: ["queued", "in-review"] })).map((b) => ({
    ...b,
    pending: b.counts.pending ?? 0,
    ageDays: Math.floor((now - Date.parse(b.createdAt)) / 86_400_000),
  }));
  if (q.station) {
    const s = q.station.toUpperCase();
    rows = rows.filter((r) => r.stationCodes.some((c) => c.includes(s)));
  }
  if (q.contributor) {
    const c = q.contributor.toLowerCase();
    rows = rows.filter((r) => (r.contributorName ?? "").toLowerCase().includes(c));
  }
  if (q.severity) rows = rows.filter((r) => (r.worstSeverity ?? "clean") === q.severity);
  const dir = q.dir === "asc" ? 1 : -1;
  const key = q.sort ?? "age";
  const val = (r: (typeof rows)[number]): number | string =>
    key === "age" ? r.ageDays * 1e13 + (now - Date.parse(r.createdAt)) : key === "station" ? (r.stationCodes[0] ?? "") : key === "contributor" ? (r.contributorName ?? "") : key === "samples" ? r.pending : SEV_RANK[r.worstSeverity ?? "clean"];
  rows.sort((a, b) => {
    const x = val(a);
    const y = val(b);
    const c = x < y ? -1 : x > y ? 1 : 0;
    return c * dir || (a.createdAt < b.createdAt ? -1 : 1);
  });
  const pageSize = Math.min(100, Math.max(5, q.pageSize ?? 20));
  const page = Math.max(1, q.page ?? 1);
  return { rows: rows.slice((page - 1) * pageSize, page * pageSize), total: rows.length, page, pageSize };
}

const SAMPLE_STATUS = { accept: "accepted", reject: "rejected", return: "returned" } as const;

/**
 * Decide samples. Every sample must still be pending with the row version the moderator saw;
 * if another moderator got there first the whole request is refused with 409 and nothing is
 * written (one transaction), so two moderators can never both win silently.
 */
export async function decideSamples(viewer: Viewer, input: SampleDecisionInput, opts: { onlyBatchId?: string; requireClean?: boolean } = {}) {
  const db = getDb();
  const status = SAMPLE_STATUS[input.decision];
  const now = new Date();
  const result = await db.transaction(async (tx) => {
    const ids = input.samples.map((s) => s.id);
    const current = await tx
      .select({ s: samples, code: stations.code, decider: users.name })
      .from(samples)
      .innerJoin(stations, eq(stations.id, samples.stationId))
      .leftJoin(users, eq(users.id, samples.decidedBy))
      .where(inArray(samples.id, ids))
      .all();
    const byId = new Map(current.map((c) => [c.s.id, c]));
    const touched = new Set<string>();
    const events = [];
    for (const want of input.samples) {
      const c = byId.get(want.id);
      if (!c || (opts.onlyBatchId && c.s.batchId !== opts.onlyBatchId)) throw errors.notFound(`Sample ${want.id} is not in this batch.`);
      const label = `${c.code}, ${c.s.startDate} to ${c.s.endDate}`;
      if (c.s.status !== "pending" || c.s.rowVersion !== want.rowVersion) {
        const who = c.decider ? ` by ${c.decider}` : "";
        const when = c.s.decidedAt ? ` at ${c.s.decidedAt.toISOString().slice(0, 16).replace("T", " ")} UTC` : "";
        throw errors.conflict(
          c.s.status !== "pending"
            ? `Another decision got there first: the sample ${label} was already ${c.s.status}${who}${when}. Nothing was changed; reload the batch to see the current state.`
            : `The sample ${label} changed after you opened the batch. Nothing was changed; reload the batch and decide again.`,
        );
      }
      if (opts.requireClean && (c.s.worstSeverity === "warn" || c.s.worstSeverity === "fail"))
        throw errors.conflict(`The sample ${label} has a ${c.s.worstSeverity} from the checks, so it cannot be accepted in bulk. Decide it on its own.`);
      const updated = await tx
        .update(samples)
        .set({ status, decidedBy: viewer.id, decidedAt: now, decisionReason: input.reason || null, rowVersion: sql`${samples.rowVersion} + 1` })
        .where(and(eq(samples.id, c.s.id), eq(samples.rowVersion, want.rowVersion), eq(samples.status, "pending")))
        .returning({ rowVersion: samples.rowVersion })
        .get();
      if (!updated) throw errors.conflict(`Another decision on the sample ${label} got there first. Nothing was changed; reload the batch to see the current state.`);
      touched.add(c.s.batchId);
      events.push({
        actorId: viewer.id,
        entityType: "sample" as const,
        entityId: c.s.id,
        action: input.decision,
        before: { status: "pending", rowVersion: c.s.rowVersion },
        after: { status, rowVersion: updated.rowVersion },
        reason: input.reason || null,
        at: now,
      });
    }
    for (let i = 0; i < events.length; i += 500) await tx.insert(reviewEvents).values(events.slice(i, i + 500));
    const closed: string[] = [];
    for (const batchId of touched) if (await settleBatch(tx as unknown as Db, viewer, batchId, now)) closed.push(batchId);
    return { decided: events.length, status, closedBatches: closed };
  });
  return result;
}

/** After decisions: a batch with nothing pending is decided (event + e-mail); otherwise in review. */
async function settleBatch(tx: Db, viewer: Viewer, batchId: string, now: Date): Promise<boolean> {
  const rows = await tx
    .select({ status: samples.status, code: stations.code, startDate: samples.startDate, endDate: samples.endDate, reason: samples.decisionReason })
    .from(samples)
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(eq(samples.batchId, batchId))
    .orderBy(asc(stations.code), asc(samples.startDate))
    .all();
  const b = await tx.select().from(batches).where(eq(batches.id, batchId)).get();
  if (!b) return false;
  const pending = rows.filter((r) => r.status === "pending").length;
  if (pending > 0) {
    if (b.status === "queued") await tx.update(batches).set({ status: "in-review" }).where(eq(batches.id, batchId));
    return false;
  }
  const n = (s: string) => rows.filter((r) => r.status === s).length;
  const counts = { accepted: n("accepted"), rejected: n("rejected"), returned: n("returned") + n("superseded") };
  await tx.update(batches).set({ status: "decided", decidedAt: now }).where(eq(batches.id, batchId));
  await tx.insert(reviewEvents).values({
    actorId: viewer.id,
    entityType: "batch",
    entityId: batchId,
    action: "decide",
    before: { status: b.status },
    after: { status: "decided", ...counts },
    at: now,
  });
  const who = await tx.select({ email: users.email, name: users.name, isDemo: users.isDemo, passwordHash: users.passwordHash }).from(users).where(eq(users.id, b.contributorId)).get();
  // Invented demo contributors (no password, cannot sign in) get no mail; the demo sign-in accounts do.
  if (who && !(who.isDemo && !who.passwordHash))
    await queueMail(
      {
        to: who.email,
        template: "batch-decided",
        data: {
          name: who.name,
          batchId,
          ...counts,
          samples: rows.map((r) => ({ stationCode: r.code, startDate: r.startDate, endDate: r.endDate, decision: r.status, reason: r.reason })),
        },
      },
      tx,
    );
  return true;
}

/** Numbers for the daily digest and the desk's header. */
export async function queueStats() {
  const db = getDb();
  const open = await db
    .select({ worst: samples.worstSeverity, n: sql<number>`count(*)` })
    .from(samples)
    .where(eq(samples.status, "pending"))
    .groupBy(samples.worstSeverity)
    .all();
  const b = await db
    .select({ n: sql<number>`count(*)`, oldest: sql<number | null>`min(${batches.createdAt})` })
    .from(batches)
    .where(inArray(batches.status, ["queued", "in-review"]))
    .get();
  const st = await db.select({ n: sql<number>`count(*)` }).from(stations).where(eq(stations.status, "pending")).get();
  const by = (s: Severity | null) => Number(open.find((o) => o.worst === s)?.n ?? 0);
  return {
    queuedBatches: Number(b?.n ?? 0),
    oldestDays: b?.oldest ? Math.floor((Date.now() - Number(b.oldest)) / 86_400_000) : null,
    pendingSamples: open.reduce((s, o) => s + Number(o.n), 0),
    failSamples: by("fail"),
    warnSamples: by("warn"),
    pendingStations: Number(st?.n ?? 0),
  };
}
