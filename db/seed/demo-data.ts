// Seeds the synthetic demo scenario (lib/demo) into the database: invented contributor
// users, approved demo stations, accepted samples in decided batches, and queued batches
// of pending samples (with the deliberately bad ones) for the review desk.
//
// Idempotent: ids are derived from the scenario's keys, every insert ignores rows that
// exist, and a database that already holds demo stations is left alone entirely (the
// profile of the first run wins). One write transaction for everything but the users.

import type { InStatement, InValue } from "@libsql/client";
import { hash } from "node:crypto";
import { and, eq, getTableColumns, getTableName, inArray, like, sql, type Column } from "drizzle-orm";
import type { SQLiteTable } from "drizzle-orm/sqlite-core";
import { getClient, getDb, type Db } from "../index";
import { batches, reviewEvents, samples, stations, users, type Severity } from "../schema";
import {
  DEMO_CONTRIBUTOR_OWNER,
  generateDemoScenario,
  type DemoProfile,
  type DemoSample,
  type DemoScenario,
  type DemoStation,
} from "../../lib/demo";
import { dExcess } from "../../lib/isotopes";
import { makeDemoCheckSample } from "./demo-checks";
import demoAccounts from "./demo-accounts.json";

/** What a sample check returns, as the seed stores it (lib/qc's runChecks fits this). */
export interface SeedCheckOutcome {
  checks: unknown[];
  worstSeverity: Severity | null;
  lcExcess?: number | null;
}

/** The sample as handed to a check: the generator's sample plus its computed d-excess. */
export type SeedSampleForCheck = DemoSample & { dExcess: number };

/**
 * Hook for running the intake checks on the pending demo samples while seeding.
 * `history` is the station's accepted samples in date order; `scenario` gives access to
 * neighbouring stations for spatial checks.
 */
export type SeedCheckSample = (
  sample: SeedSampleForCheck,
  context: { station: DemoStation; history: readonly DemoSample[]; scenario: DemoScenario },
) => SeedCheckOutcome | Promise<SeedCheckOutcome>;

export interface SeedDemoDataOptions {
  profile: DemoProfile;
  seed?: number;
  /**
   * Run on every pending sample. Default: lib/qc's runChecks with the intake's context
   * (db/seed/demo-checks.ts); null leaves `checks` [] and `lcExcess` null.
   */
  checkSample?: SeedCheckSample | null;
}

export interface SeedDemoDataResult {
  skipped: boolean;
  inserted: { users: number; stations: number; batches: number; samples: number; reviewEvents: number };
  /** Problems that did not stop the seed (e.g. a demo account missing). */
  warnings: string[];
  ms: number;
}

/** Rows per multi-row INSERT (× ≤ 26 columns stays below SQLite's 32766 parameters). */
const CHUNK = 500;

/**
 * A stable UUID for a demo key: name-based, SHA-1, laid out as RFC 4122 version 5
 * (RFC 4122 §4.3 [pub]), so reseeding yields the same ids.
 */
export function demoId(key: string): string {
  const h = Buffer.from(hash("sha1", `rainprint-demo:${key}`, "hex"), "hex");
  h[6] = (h[6] & 0x0f) | 0x50;
  h[8] = (h[8] & 0x3f) | 0x80;
  const x = h.subarray(0, 16).toString("hex");
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20, 32)}`;
}

/** d-excess d = δ2H − 8·δ18O — Dansgaard (1964), Tellus 16:436 [pub] (lib/isotopes), to 10⁻⁶ ‰. */
function dExcessOf(d18O: number, d2H: number): number {
  return Math.round(dExcess(d18O, d2H) * 1e6) / 1e6;
}

const SEVERITY_RANK: Record<Severity, number> = { note: 1, warn: 2, fail: 3 };
function worst(a: Severity | null, b: Severity | null): Severity | null {
  if (!a) return b;
  if (!b) return a;
  return SEVERITY_RANK[a] >= SEVERITY_RANK[b] ? a : b;
}

const at = (isoDate: string, hourUtc = 9) => new Date(`${isoDate}T${String(hourUtc).padStart(2, "0")}:00:00Z`);
const daysBefore = (isoDate: string, days: number) => new Date(at(isoDate).getTime() - days * 86_400_000);

/**
 * Multi-row `INSERT OR IGNORE` statements for rows of one table, values mapped with each
 * Drizzle column's own driver mapping (dates → ms, booleans → 0/1, JSON → text). Built by
 * hand because Drizzle's query builder takes seconds for ~20,000 rows; libSQL runs the
 * statements in a fraction of that. Columns absent from the rows take their SQL defaults.
 */
function insertStatements<T extends SQLiteTable>(table: T, rows: T["$inferInsert"][]): InStatement[] {
  if (rows.length === 0) return [];
  const all = getTableColumns(table) as Record<string, Column>;
  const cols = Object.keys(rows[0] as object).map((key) => [key, all[key]] as const);
  for (const [key, col] of cols) if (!col) throw new Error(`Demo seed: ${getTableName(table)} has no column ${key}.`);
  const names = cols.map(([, c]) => `"${c.name}"`).join(", ");
  const one = `(${cols.map(() => "?").join(", ")})`;
  return chunks(rows).map((part) => ({
    sql: `INSERT OR IGNORE INTO "${getTableName(table)}" (${names}) VALUES ${part.map(() => one).join(", ")}`,
    args: part.flatMap((row) =>
      cols.map(([key, col]) => {
        const v = (row as Record<string, unknown>)[key];
        return (v === null || v === undefined ? null : col.mapToDriverValue(v)) as InValue;
      }),
    ),
  }));
}

function chunks<T>(rows: T[]): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < rows.length; i += CHUNK) out.push(rows.slice(i, i + CHUNK));
  return out;
}

async function accountId(db: Db, key: string): Promise<string | null> {
  const a = demoAccounts.accounts.find((x) => x.key === key);
  if (!a) return null;
  const row = await db.select({ id: users.id }).from(users).where(eq(users.email, a.email.toLowerCase())).get();
  return row?.id ?? null;
}

/** Insert the synthetic demo scenario; see the file comment. */
export async function seedDemoData(opts: SeedDemoDataOptions): Promise<SeedDemoDataResult> {
  const t0 = performance.now();
  const db = getDb();
  const inserted = { users: 0, stations: 0, batches: 0, samples: 0, reviewEvents: 0 };
  const warnings: string[] = [];

  const already = await db
    .select({ n: sql<number>`count(*)` })
    .from(stations)
    .where(and(eq(stations.isDemo, true), like(stations.code, "RP-%")))
    .get();
  if ((already?.n ?? 0) > 0) return { skipped: true, inserted, warnings, ms: performance.now() - t0 };

  const scenario = generateDemoScenario({ profile: opts.profile, seed: opts.seed });
  const orgName = new Map(scenario.organizations.map((o) => [o.key, o.name]));

  // ── users: invented contributors (no password: they cannot sign in with one) ──
  const firstBatchDate = new Map<string, string>();
  for (const b of scenario.batches) {
    const prev = firstBatchDate.get(b.ownerKey);
    if (!prev || b.submittedOn < prev) firstBatchDate.set(b.ownerKey, b.submittedOn);
  }
  const userRows = scenario.people.map((p) => ({
    id: demoId(`person:${p.key}`),
    name: p.name,
    email: p.email,
    emailVerified: daysBefore(firstBatchDate.get(p.key) ?? "2019-01-01", 60),
    passwordHash: null,
    role: "contributor" as const,
    affiliation: orgName.get(p.organizationKey) ?? null,
    isDemo: true,
    createdAt: daysBefore(firstBatchDate.get(p.key) ?? "2019-01-01", 60),
  }));
  for (const part of chunks(userRows)) {
    const r = await db.insert(users).values(part).onConflictDoNothing().returning({ id: users.id });
    inserted.users += r.length;
  }
  const personIds = new Map<string, string>();
  const byEmail = new Map(scenario.people.map((p) => [p.email, p.key]));
  for (const part of chunks(scenario.people.map((p) => p.email))) {
    const rows = await db.select({ id: users.id, email: users.email }).from(users).where(inArray(users.email, part));
    for (const r of rows) personIds.set(byEmail.get(r.email)!, r.id);
  }
  const contributorId = await accountId(db, "contributor");
  const moderatorId = await accountId(db, "moderator");
  if (!contributorId) warnings.push("The demo contributor account is missing: its stations go to an invented colleague.");
  if (!moderatorId) warnings.push("The demo moderator account is missing: seeded decisions carry no moderator.");

  const stationByCode = new Map(scenario.stations.map((s) => [s.code, s]));
  const ownerId = (ownerKey: string, station?: DemoStation): string => {
    if (ownerKey === DEMO_CONTRIBUTOR_OWNER) {
      if (contributorId) return contributorId;
      const org = station?.organizationKey ?? "tallowfen";
      const fallback = personIds.get(`person-${org}-1`) ?? [...personIds.values()][0];
      return fallback;
    }
    const id = personIds.get(ownerKey);
    if (!id) throw new Error(`Demo seed: no user for owner ${ownerKey}.`);
    return id;
  };

  // ── checks on pending samples (optional hook) ──
  const history = new Map<string, DemoSample[]>();
  for (const s of scenario.samples) {
    if (s.status !== "accepted") continue;
    if (!history.has(s.stationCode)) history.set(s.stationCode, []);
    history.get(s.stationCode)!.push(s);
  }
  const outcomes = new Map<string, SeedCheckOutcome>();
  const checkSample = opts.checkSample === undefined ? makeDemoCheckSample() : opts.checkSample;
  if (checkSample) {
    for (const s of scenario.samples) {
      if (s.status !== "pending") continue;
      const station = stationByCode.get(s.stationCode)!;
      const outcome = await checkSample(
        { ...s, dExcess: dExcessOf(s.d18O, s.d2H) },
        { station, history: history.get(s.stationCode) ?? [], scenario },
      );
      outcomes.set(s.key, outcome);
    }
  }

  // ── rows ──
  const batchById = new Map(scenario.batches.map((b) => [b.key, b]));
  const stationRows = scenario.stations.map((s) => ({
    id: demoId(`station:${s.code}`),
    code: s.code,
    name: s.name,
    lat: s.lat,
    lon: s.lon,
    elevationM: s.elevationM,
    collectorType: s.collectorType,
    samplingInterval: s.samplingInterval,
    operatingOrg: orgName.get(s.organizationKey) ?? null,
    country: null,
    startDate: s.startDate,
    notes: s.notes,
    status: "approved" as const,
    entryChecks: [],
    ownerId: ownerId(s.ownerKey, s),
    decidedBy: moderatorId,
    decidedAt: daysBefore(s.startDate, 20),
    decisionReason: "Synthetic demo data: approved when the demo was seeded.",
    isDemo: true,
    createdAt: daysBefore(s.startDate, 30),
  }));

  const sampleCount = new Map<string, number>();
  const batchWorst = new Map<string, Severity | null>();
  const sampleRows = scenario.samples.map((s) => {
    const b = batchById.get(s.batchKey)!;
    const outcome = outcomes.get(s.key);
    sampleCount.set(s.batchKey, (sampleCount.get(s.batchKey) ?? 0) + 1);
    batchWorst.set(s.batchKey, worst(batchWorst.get(s.batchKey) ?? null, outcome?.worstSeverity ?? null));
    const accepted = s.status === "accepted";
    return {
      id: demoId(`sample:${s.key}`),
      batchId: demoId(`batch:${s.batchKey}`),
      stationId: demoId(`station:${s.stationCode}`),
      version: 1,
      status: s.status,
      startDate: s.startDate,
      endDate: s.endDate,
      amountMm: s.amountMm,
      d18O: s.d18O,
      d2H: s.d2H,
      d18OSd: s.d18OSd,
      d2HSd: s.d2HSd,
      method: s.method,
      laboratory: s.laboratory,
      scale: s.scale,
      referenceWaters: s.referenceWaters,
      notes: s.notes,
      dExcess: dExcessOf(s.d18O, s.d2H),
      lcExcess: outcome?.lcExcess ?? null,
      checks: outcome?.checks ?? [],
      worstSeverity: outcome?.worstSeverity ?? null,
      decidedBy: accepted ? moderatorId : null,
      decidedAt: accepted && b.decidedOn ? at(b.decidedOn, 14) : null,
      isDemo: true,
      createdAt: at(b.submittedOn),
    };
  });

  const batchRows = scenario.batches.map((b) => {
    const station = scenario.stations.find((s) => s.ownerKey === b.ownerKey);
    return {
      id: demoId(`batch:${b.key}`),
      contributorId: ownerId(b.ownerKey, station),
      source: "seed" as const,
      status: b.status,
      sampleCount: sampleCount.get(b.key) ?? 0,
      worstSeverity: batchWorst.get(b.key) ?? null,
      note: b.note,
      isDemo: true,
      createdAt: at(b.submittedOn),
      decidedAt: b.decidedOn ? at(b.decidedOn, 14) : null,
    };
  });

  // The audit trail of the seeded decisions: one event per approved station and per decided batch.
  const eventRows = [
    ...stationRows.map((s) => ({
      id: demoId(`event:station:${s.code}`),
      at: s.decidedAt,
      actorId: moderatorId,
      entityType: "station" as const,
      entityId: s.id,
      action: "approve",
      before: { status: "pending" },
      after: { status: "approved" },
      reason: "Synthetic demo data: approved when the demo was seeded.",
    })),
    ...batchRows
      .filter((b) => b.status === "decided")
      .map((b) => ({
        id: demoId(`event:${b.id}`),
        at: b.decidedAt ?? b.createdAt,
        actorId: moderatorId,
        entityType: "batch" as const,
        entityId: b.id,
        action: "accept",
        before: { status: "queued" },
        after: { status: "decided", accepted: b.sampleCount },
        reason: "Synthetic demo data: accepted when the demo was seeded.",
      })),
  ];

  // ── one write transaction ──
  const groups = [
    ["stations", insertStatements(stations, stationRows)],
    ["batches", insertStatements(batches, batchRows)],
    ["samples", insertStatements(samples, sampleRows)],
    ["reviewEvents", insertStatements(reviewEvents, eventRows)],
  ] as const;
  const stmts = groups.flatMap(([, g]) => g);
  const results = await getClient().batch(stmts, "write");
  let i = 0;
  for (const [name, g] of groups) for (let j = 0; j < g.length; j++) inserted[name] += results[i++].rowsAffected;
  return { skipped: false, inserted, warnings, ms: performance.now() - t0 };
}
