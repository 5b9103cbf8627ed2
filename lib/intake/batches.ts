import "server-only";
import { createHash } from "node:crypto";
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { batches, reviewEvents, samples, stations, uploads, users, type Severity } from "@/db/schema";
import { AppError, errors } from "@/lib/errors";
import { queueMail } from "@/lib/mail";
import type { CheckResult } from "@/lib/qc";
import { INTAKE_LIMITS, type SampleColumnName } from "./columns";
import { checkSamples, loadStationContexts, type StationForChecks } from "./context";
import { readSampleCsv, type CsvRow } from "./csv";
import { validateSampleRow, type CellError, type ParsedSample } from "./schemas";
import { isModerator } from "./stations";

// Batches: preview (nothing written), submit (one transaction: upload, batch, samples,
// audit event, e-mail), the CSV path that joins both, and corrections of returned samples.

export type Actor = { id: string; name: string | null; email: string; role?: string };

export type PreviewRow = {
  /** Line of the file (CSV) or row number of the form. */
  line: number;
  cells: Partial<Record<SampleColumnName, string>>;
  errors: CellError[];
  checks: CheckResult[];
  worst: Severity | null;
  dExcess: number | null;
};

export type Preview = {
  rows: PreviewRow[];
  rowsWithErrors: number;
  counts: { fail: number; warn: number; note: number; clean: number };
  stationCodes: string[];
};

type Prepared = Preview & { total: number; ready: { sample: ParsedSample; station: StationForChecks; checked: ReturnType<typeof checkSamples>[number] }[] };

export function todayIso(now = new Date()): string {
  return now.toISOString().slice(0, 10);
}

/** Validate rows and run the checks; writes nothing. */
export async function prepareRows(
  actor: Actor,
  input: CsvRow[],
  today = todayIso(),
  timings?: Record<string, number>,
  opts: { forSubmit?: boolean } = {},
): Promise<Prepared> {
  const t0 = performance.now();
  const validated = input.map((r) => {
    const v = validateSampleRow(r.cells, today);
    return { row: r, sample: v.sample, errors: [...r.errors, ...v.errors] };
  });
  const codes = [...new Set(validated.map((v) => v.sample?.stationCode ?? (v.row.cells.station_code ?? "").trim().toUpperCase()).filter(Boolean))];
  const found = codes.length
    ? await getDb()
        .select({ id: stations.id, code: stations.code, status: stations.status, ownerId: stations.ownerId, lat: stations.lat, lon: stations.lon, elevationM: stations.elevationM, samplingInterval: stations.samplingInterval })
        .from(stations)
        .where(inArray(stations.code, codes))
        .all()
    : [];
  const byCode = new Map(found.filter((s) => s.ownerId === actor.id).map((s) => [s.code, s]));
  for (const v of validated) {
    if (!v.sample) continue;
    const st = byCode.get(v.sample.stationCode);
    if (!st) {
      v.errors.push({ column: "station_code", message: `No station with the code ${v.sample.stationCode} is registered to your account. Register it first, or check the code.` });
    } else if (st.status !== "approved") {
      v.errors.push({
        column: "station_code",
        message: st.status === "pending" ? `Station ${st.code} is waiting for a moderator's approval; samples can be submitted once it is approved.` : `Station ${st.code} is ${st.status}; it cannot take new samples.`,
      });
    }
  }
  const okItems = validated.filter((v) => v.sample && v.errors.length === 0);
  const t1 = performance.now();
  const stationsById = new Map(found.map((s) => [s.id, s as StationForChecks]));
  const items = okItems.map((v) => ({ sample: v.sample!, stationId: byCode.get(v.sample!.stationCode)!.id, ref: `line ${v.row.line}` }));
  const contexts = await loadStationContexts([...new Set(items.map((i) => i.stationId))]);
  const t2 = performance.now();
  // Submitting keeps only the stored JSON of each sample's checks (a 100,000-row file would
  // otherwise hold every result object at once); a preview keeps the objects to show them.
  const checked = checkSamples(items, stationsById, contexts, today, { keepObjects: !opts.forSubmit });
  if (timings) {
    timings.validate = t1 - t0;
    timings.context = t2 - t1;
    timings.checks = performance.now() - t2;
  }
  const checkedByRow = new Map(okItems.map((v, i) => [v, checked[i]]));
  const counts = { fail: 0, warn: 0, note: 0, clean: 0 };
  const rows: PreviewRow[] = [];
  for (const v of validated) {
    const c = checkedByRow.get(v);
    if (c) counts[c.worst ?? "clean"]++;
    if (opts.forSubmit && !v.errors.length) continue;
    rows.push({ line: v.row.line, cells: v.row.cells, errors: v.errors, checks: c?.checks ?? [], worst: c?.worst ?? null, dExcess: c?.dExcess ?? null });
  }
  return {
    rows,
    rowsWithErrors: validated.filter((v) => v.errors.length).length,
    total: validated.length,
    counts,
    stationCodes: [...new Set(items.map((i) => stationsById.get(i.stationId)!.code))].sort(),
    ready: okItems.map((v, i) => ({ sample: v.sample!, station: stationsById.get(items[i].stationId)!, checked: checked[i] })),
  };
}

export function publicPreview(p: Prepared): Preview {
  return { rows: p.rows, rowsWithErrors: p.rowsWithErrors, counts: p.counts, stationCodes: p.stationCodes };
}

export function rowsFromForm(rows: Partial<Record<SampleColumnName, string>>[]): CsvRow[] {
  return rows.map((cells, i) => ({ line: i + 1, cells, errors: [] }));
}

/** Rows with errors refuse the whole batch: 400 with every row's problems, nothing written. */
function refuseRows(p: Prepared): never {
  throw new AppError("invalid-input", {
    detail: `${p.rowsWithErrors} of ${p.total} rows have problems. Fix them and submit again. Nothing was saved.`,
    extensions: { rows: p.rows.filter((r) => r.errors.length).slice(0, 200).map((r) => ({ line: r.line, errors: r.errors })) },
  });
}

const INSERT_CHUNK = 500; // × 23 columns, well under SQLite's 32,766 parameters

/**
 * Submit a batch: upload (if any), batch row, samples, audit event and the "received" e-mail
 * in one transaction. Throws 400 (nothing written) when any row has an error.
 */
export async function submitBatch(
  actor: Actor,
  input: { rows: CsvRow[]; file?: { name: string; bytes: Uint8Array; contentType?: string } | null; note?: string | null; source?: "form" | "csv" },
  opts: { today?: string; keepFileContent?: boolean; sendMail?: boolean; timings?: Record<string, number> } = {},
): Promise<{ batchId: string; sampleCount: number; worst: Severity | null; stationCodes: string[] }> {
  const t0 = performance.now();
  const p = await prepareRows(actor, input.rows, opts.today, opts.timings, { forSubmit: true });
  const t1 = performance.now();
  if (p.rowsWithErrors) refuseRows(p);
  if (!p.ready.length) throw errors.invalid("The batch has no samples. Nothing was saved.");
  const worst = p.ready.reduce<Severity | null>((w, r) => maxSeverity(w, r.checked.worst), null);
  const db = getDb();
  const batchId = await db.transaction(async (tx) => {
    let uploadId: string | null = null;
    if (input.file) {
      const sha = createHash("sha256").update(input.file.bytes).digest("hex");
      const up = await tx
        .insert(uploads)
        .values({
          userId: actor.id,
          fileName: input.file.name.slice(0, 200),
          sizeBytes: input.file.bytes.byteLength,
          sha256: sha,
          contentType: input.file.contentType ?? "text/csv",
          content: opts.keepFileContent === false ? null : Buffer.from(input.file.bytes),
        })
        .returning({ id: uploads.id })
        .get();
      uploadId = up.id;
    }
    const batch = await tx
      .insert(batches)
      .values({ contributorId: actor.id, source: input.source ?? (input.file ? "csv" : "form"), uploadId, status: "queued", sampleCount: p.ready.length, worstSeverity: worst, note: input.note ?? null })
      .returning({ id: batches.id })
      .get();
    await insertSamples(tx as unknown as Db, batch.id, p.ready);
    await tx.insert(reviewEvents).values({
      actorId: actor.id,
      entityType: "batch",
      entityId: batch.id,
      action: "submit",
      before: null,
      after: { status: "queued", samples: p.ready.length, worstSeverity: worst, stations: p.stationCodes, uploadId },
    });
    if (opts.sendMail !== false)
      await queueMail(
        { to: actor.email, template: "batch-received", data: { name: actor.name, batchId: batch.id, sampleCount: p.ready.length, worstSeverity: worst, stationCodes: p.stationCodes } },
        tx as unknown as Db,
      );
    return batch.id;
  });
  if (opts.timings) {
    opts.timings.prepare = t1 - t0;
    opts.timings.write = performance.now() - t1;
  }
  return { batchId, sampleCount: p.ready.length, worst, stationCodes: p.stationCodes };
}

// Columns written for a new sample, in the order of the VALUES tuples below.
const SAMPLE_INSERT_COLUMNS = [
  samples.id, samples.batchId, samples.stationId, samples.version, samples.previousId, samples.status, samples.startDate, samples.endDate,
  samples.amountMm, samples.d18O, samples.d2H, samples.d18OSd, samples.d2HSd, samples.method, samples.laboratory, samples.scale,
  samples.referenceWaters, samples.notes, samples.dExcess, samples.lcExcess, samples.checks, samples.worstSeverity, samples.createdAt,
].map((c) => c.name);

let lastMs = 0;
let seq = 0;
/**
 * A version-7 UUID (RFC 9562): 48-bit millisecond time, a 12-bit counter, 62 random bits.
 * Ids of one batch then sort in insertion order, so the primary-key index grows at its end
 * instead of at random places (about a fifth faster for large batches); still unguessable.
 */
export function timeOrderedUuid(now = Date.now()): string {
  if (now <= lastMs) {
    seq++;
    if (seq > 0xfff) {
      lastMs++;
      seq = 0;
    }
  } else {
    lastMs = now;
    seq = 0;
  }
  if (randomAt + 8 > randomPool.length) {
    crypto.getRandomValues(randomPool);
    randomAt = 0;
  }
  const r = randomPool;
  const o = randomAt;
  randomAt += 8;
  const ts = lastMs.toString(16).padStart(12, "0");
  const h = (i: number) => HEX[r[o + i]];
  return `${ts.slice(0, 8)}-${ts.slice(8, 12)}-7${seq.toString(16).padStart(3, "0")}-${HEX[(r[o] & 0x3f) | 0x80]}${h(1)}-${h(2)}${h(3)}${h(4)}${h(5)}${h(6)}${h(7)}`;
}
const HEX = Array.from({ length: 256 }, (_, i) => i.toString(16).padStart(2, "0"));
const randomPool = new Uint8Array(8 * 4096);
let randomAt = randomPool.length;

type RawExecutor = { execute(stmt: { sql: string; args: (string | number | null)[] }): Promise<unknown> };

/**
 * Samples go in as multi-row INSERT statements (INSERT_CHUNK rows each) on the transaction's
 * own libSQL handle: building 100,000 rows through the query builder costs more than the
 * database does. Falls back to the query builder if the handle is not reachable.
 */
async function insertSamples(tx: Db, batchId: string, ready: Prepared["ready"], extra: { version?: number; previousId?: string } = {}) {
  const now = Date.now();
  const raw = (tx as unknown as { session?: { tx?: RawExecutor } }).session?.tx;
  const width = SAMPLE_INSERT_COLUMNS.length;
  const tuple = `(${new Array(width).fill("?").join(",")})`;
  for (let i = 0; i < ready.length; i += INSERT_CHUNK) {
    const part = ready.slice(i, i + INSERT_CHUNK);
    const args: (string | number | null)[] = [];
    if (raw) ready.fill(null as never, i, i + INSERT_CHUNK); // written below; let the collector have them
    for (const { sample: s, station, checked } of part) {
      args.push(
        timeOrderedUuid(), batchId, station.id, extra.version ?? 1, extra.previousId ?? null, "pending", s.startDate, s.endDate,
        s.amountMm, s.d18O, s.d2H, s.d18OSd, s.d2HSd, s.method, s.laboratory, s.scale,
        s.referenceWaters, s.notes, checked.dExcess, checked.lcExcess, checked.checksJson, checked.worst, now,
      );
    }
    if (raw) {
      await raw.execute({ sql: `INSERT INTO samples (${SAMPLE_INSERT_COLUMNS.map((c) => `"${c}"`).join(",")}) VALUES ${new Array(part.length).fill(tuple).join(",")}`, args });
    } else {
      await tx.insert(samples).values(
        part.map(({ sample: s, station, checked }) => ({
          batchId, stationId: station.id, version: extra.version ?? 1, previousId: extra.previousId ?? null, status: "pending" as const,
          startDate: s.startDate, endDate: s.endDate, amountMm: s.amountMm, d18O: s.d18O, d2H: s.d2H, d18OSd: s.d18OSd, d2HSd: s.d2HSd,
          method: s.method, laboratory: s.laboratory, scale: s.scale, referenceWaters: s.referenceWaters, notes: s.notes,
          dExcess: checked.dExcess, lcExcess: checked.lcExcess, checks: JSON.parse(checked.checksJson) as unknown[], worstSeverity: checked.worst, createdAt: new Date(now),
        })),
      );
    }
  }
}

const RANK: Record<Severity, number> = { note: 1, warn: 2, fail: 3 };
export function maxSeverity(a: Severity | null, b: Severity | null): Severity | null {
  if (!a) return b;
  if (!b) return a;
  return RANK[a] >= RANK[b] ? a : b;
}

/** The CSV path in one call: read → validate → checks → submit. A bad file throws 400 and writes nothing. */
export async function ingestCsv(
  actor: Actor,
  file: { name: string; bytes: Uint8Array },
  opts: { today?: string; limits?: { maxFileBytes: number; maxRows: number }; keepFileContent?: boolean; sendMail?: boolean; timings?: Record<string, number> } = {},
) {
  const t0 = performance.now();
  const read = readSampleCsv(file.bytes, opts.limits ?? INTAKE_LIMITS);
  if (opts.timings) opts.timings.read = performance.now() - t0;
  if (!read.ok) throw errors.invalid(read.message);
  return submitBatch(actor, { rows: read.rows, file, source: "csv" }, opts);
}

/** A CSV preview: the file's rows with their errors and check results; nothing written. */
export async function previewCsv(actor: Actor, bytes: Uint8Array, today?: string): Promise<Preview & { delimiter: string; sizeBytes: number; sha256: string }> {
  const read = readSampleCsv(bytes);
  if (!read.ok) throw errors.invalid(read.message);
  const p = await prepareRows(actor, read.rows, today);
  return { ...publicPreview(p), delimiter: read.delimiter, sizeBytes: read.sizeBytes, sha256: createHash("sha256").update(bytes).digest("hex") };
}

// ───────────── reading ─────────────

export type BatchSummary = {
  id: string;
  status: string;
  source: string;
  sampleCount: number;
  worstSeverity: Severity | null;
  createdAt: string;
  decidedAt: string | null;
  counts: Record<string, number>;
  stationCodes: string[];
  contributorName: string | null;
  contributorId: string;
  isDemo: boolean;
};

export async function batchSummaries(where: { contributorId?: string; statuses?: string[]; ids?: string[] }): Promise<BatchSummary[]> {
  const db = getDb();
  const conds = [];
  if (where.contributorId) conds.push(eq(batches.contributorId, where.contributorId));
  if (where.statuses) conds.push(inArray(batches.status, where.statuses as (typeof batches.status.enumValues)[number][]));
  if (where.ids) conds.push(inArray(batches.id, where.ids));
  const rows = await db
    .select({ b: batches, name: users.name, email: users.email })
    .from(batches)
    .innerJoin(users, eq(users.id, batches.contributorId))
    .where(conds.length ? and(...conds) : undefined)
    .orderBy(desc(batches.createdAt))
    .all();
  if (!rows.length) return [];
  const ids = rows.map((r) => r.b.id);
  const agg = await db
    .select({ batchId: samples.batchId, status: samples.status, code: stations.code, n: sql<number>`count(*)` })
    .from(samples)
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(inArray(samples.batchId, ids))
    .groupBy(samples.batchId, samples.status, stations.code)
    .all();
  const counts = new Map<string, Record<string, number>>();
  const codes = new Map<string, Set<string>>();
  for (const a of agg) {
    const c = counts.get(a.batchId) ?? {};
    c[a.status] = (c[a.status] ?? 0) + Number(a.n);
    counts.set(a.batchId, c);
    const s = codes.get(a.batchId) ?? new Set();
    s.add(a.code);
    codes.set(a.batchId, s);
  }
  return rows.map(({ b, name, email }) => ({
    id: b.id,
    status: b.status,
    source: b.source,
    sampleCount: b.sampleCount,
    worstSeverity: b.worstSeverity,
    createdAt: b.createdAt.toISOString(),
    decidedAt: b.decidedAt?.toISOString() ?? null,
    counts: counts.get(b.id) ?? {},
    stationCodes: [...(codes.get(b.id) ?? [])].sort(),
    contributorName: name ?? email,
    contributorId: b.contributorId,
    isDemo: b.isDemo,
  }));
}

export type SampleView = {
  id: string;
  stationCode: string;
  stationId: string;
  version: number;
  previousId: string | null;
  status: string;
  startDate: string;
  endDate: string;
  amountMm: number | null;
  d18O: number;
  d2H: number;
  d18OSd: number | null;
  d2HSd: number | null;
  method: string | null;
  laboratory: string | null;
  scale: string | null;
  referenceWaters: string | null;
  notes: string | null;
  dExcess: number;
  lcExcess: number | null;
  checks: CheckResult[];
  worstSeverity: Severity | null;
  decisionReason: string | null;
  decidedAt: string | null;
  decidedBy: string | null;
  rowVersion: number;
  supersededBy: string | null;
};

/** A batch with its samples, if the viewer may see it (its contributor or a moderator); else 404. */
export async function batchForViewer(viewer: Actor & { role: string }, id: string) {
  const db = getDb();
  const b = await db.select().from(batches).where(eq(batches.id, id)).get();
  if (!b || (b.contributorId !== viewer.id && !isModerator(viewer as never))) throw errors.notFound("There is no batch of yours at this address.");
  const [summary] = await batchSummaries({ ids: [id] });
  const rows = await db
    .select({ s: samples, code: stations.code, decider: users.name })
    .from(samples)
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .leftJoin(users, eq(users.id, samples.decidedBy))
    .where(eq(samples.batchId, id))
    .orderBy(asc(stations.code), asc(samples.startDate))
    .all();
  const ids = rows.map((r) => r.s.id);
  const successors = ids.length
    ? await db.select({ id: samples.id, previousId: samples.previousId, batchId: samples.batchId }).from(samples).where(inArray(samples.previousId, ids)).all()
    : [];
  const nextOf = new Map(successors.map((s) => [s.previousId!, s.batchId]));
  const upload = b.uploadId ? await db.select({ fileName: uploads.fileName, sizeBytes: uploads.sizeBytes, sha256: uploads.sha256 }).from(uploads).where(eq(uploads.id, b.uploadId)).get() : null;
  return {
    batch: summary,
    note: b.note,
    upload: upload ?? null,
    samples: rows.map(({ s, code, decider }) => toSampleView(s, code, decider, nextOf.get(s.id) ?? null)),
  };
}

export function toSampleView(s: typeof samples.$inferSelect, code: string, decider: string | null, supersededBy: string | null): SampleView {
  return {
    id: s.id,
    stationCode: code,
    stationId: s.stationId,
    version: s.version,
    previousId: s.previousId,
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
    dExcess: s.dExcess,
    lcExcess: s.lcExcess,
    checks: (s.checks ?? []) as CheckResult[],
    worstSeverity: s.worstSeverity,
    decisionReason: s.decisionReason,
    decidedAt: s.decidedAt?.toISOString() ?? null,
    decidedBy: decider,
    rowVersion: s.rowVersion,
    supersededBy,
  };
}

// ───────────── corrections ─────────────

/** The cells of a stored sample, as the form shows them. */
export function cellsOf(s: SampleView): Record<SampleColumnName, string> {
  const n = (x: number | null) => (x === null || x === undefined ? "" : String(x));
  return {
    station_code: s.stationCode,
    collected_from: s.startDate,
    collected_until: s.endDate,
    d18O_permil: n(s.d18O),
    d2H_permil: n(s.d2H),
    amount_mm: n(s.amountMm),
    d18O_sd_permil: n(s.d18OSd),
    d2H_sd_permil: n(s.d2HSd),
    method: s.method ?? "",
    laboratory: s.laboratory ?? "",
    scale: s.scale ?? "",
    reference_waters: s.referenceWaters ?? "",
    notes: s.notes ?? "",
  };
}

/**
 * Correct a returned sample: the old version becomes `superseded` (kept, with its history),
 * the new one (version + 1, previousId) goes to the review desk in a new batch.
 */
export async function resubmitSample(
  actor: Actor,
  sampleId: string,
  input: { cells: Partial<Record<SampleColumnName, string>>; rowVersion: number },
  today = todayIso(),
) {
  const db = getDb();
  const old = await db
    .select({ s: samples, code: stations.code, contributorId: batches.contributorId })
    .from(samples)
    .innerJoin(batches, eq(batches.id, samples.batchId))
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(eq(samples.id, sampleId))
    .get();
  if (!old || old.contributorId !== actor.id) throw errors.notFound("There is no sample of yours at this address.");
  if (old.s.status !== "returned")
    throw errors.conflict(
      old.s.status === "superseded" ? "This sample has already been corrected; the newer version is in review." : `Only samples returned for correction can be resubmitted; this one is ${old.s.status}.`,
    );
  const cells = { ...input.cells, station_code: old.code };
  const p = await prepareRows(actor, [{ line: 1, cells, errors: [] }], today, undefined, { forSubmit: true });
  if (p.rowsWithErrors) refuseRows(p);
  const ready = p.ready;
  // The returned version's own period does not count as "already stored" (it is being replaced).
  const contexts = await loadStationContexts([ready[0].station.id], { excludeSampleIds: [old.s.id] });
  ready[0].checked = checkSamples([{ sample: ready[0].sample, stationId: ready[0].station.id, ref: "corrected sample" }], new Map([[ready[0].station.id, ready[0].station]]), contexts, today, { keepObjects: false })[0];
  const worst = ready[0].checked.worst;
  const s = ready[0].sample;
  return db.transaction(async (tx) => {
    const superseded = await tx
      .update(samples)
      .set({ status: "superseded", rowVersion: sql`${samples.rowVersion} + 1` })
      .where(and(eq(samples.id, old.s.id), eq(samples.rowVersion, input.rowVersion), eq(samples.status, "returned")))
      .returning({ rowVersion: samples.rowVersion })
      .get();
    if (!superseded) throw errors.conflict("This sample changed since you opened it (it may have been corrected already). Reload the page.");
    const batch = await tx
      .insert(batches)
      .values({ contributorId: actor.id, source: "resubmission", status: "queued", sampleCount: 1, worstSeverity: worst, note: `Correction of a sample returned for correction (${old.code}, ${old.s.startDate}).` })
      .returning({ id: batches.id })
      .get();
    await insertSamples(tx as unknown as Db, batch.id, ready, { version: old.s.version + 1, previousId: old.s.id });
    const fresh = await tx.select({ id: samples.id }).from(samples).where(eq(samples.previousId, old.s.id)).get();
    await tx.insert(reviewEvents).values([
      {
        actorId: actor.id,
        entityType: "sample",
        entityId: old.s.id,
        action: "supersede",
        before: { status: "returned", rowVersion: old.s.rowVersion },
        after: { status: "superseded", rowVersion: superseded.rowVersion, replacedBy: fresh?.id ?? null },
        reason: "Corrected by the contributor after it was returned.",
      },
      {
        actorId: actor.id,
        entityType: "sample",
        entityId: fresh!.id,
        action: "resubmit",
        before: { d18O: old.s.d18O, d2H: old.s.d2H, startDate: old.s.startDate, endDate: old.s.endDate, amountMm: old.s.amountMm, version: old.s.version },
        after: { d18O: s.d18O, d2H: s.d2H, startDate: s.startDate, endDate: s.endDate, amountMm: s.amountMm, version: old.s.version + 1, previousId: old.s.id },
      },
      { actorId: actor.id, entityType: "batch", entityId: batch.id, action: "submit", before: null, after: { status: "queued", samples: 1, worstSeverity: worst, stations: [old.code], resubmission: true } },
    ]);
    await queueMail({ to: actor.email, template: "batch-received", data: { name: actor.name, batchId: batch.id, sampleCount: 1, worstSeverity: worst, stationCodes: [old.code] } }, tx as unknown as Db);
    return { batchId: batch.id, sampleId: fresh!.id };
  });
}

/** Samples of the viewer returned for correction (not yet corrected). */
export async function returnedSamplesOf(userId: string) {
  return getDb()
    .select({ id: samples.id, batchId: samples.batchId, code: stations.code, startDate: samples.startDate, endDate: samples.endDate, reason: samples.decisionReason })
    .from(samples)
    .innerJoin(batches, eq(batches.id, samples.batchId))
    .innerJoin(stations, eq(stations.id, samples.stationId))
    .where(and(eq(batches.contributorId, userId), eq(samples.status, "returned")))
    .orderBy(asc(stations.code), asc(samples.startDate))
    .all();
}
