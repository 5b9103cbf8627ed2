// The intake corpus: every malformed or hostile file in tests/fixtures/intake-csv gets the
// message its manifest names, and a refused file leaves the database exactly as it was
// (one transaction per batch). Accepted files land as one queued batch with the upload's
// size and SHA-256.
import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { batches, samples, stations, uploads, users } from "@/db/schema";
import { csvCell } from "@/lib/downloads/csv";
import { AppError } from "@/lib/errors";
import { ingestCsv, type Actor } from "@/lib/intake/batches";
import { countRows, freshDb } from "../helpers/db";

const DIR = path.resolve("tests/fixtures/intake-csv");
type Case = { file: string; outcome: "accepted" | "rejected"; message?: string; line?: number; column?: string; samples?: number; check?: string; severity?: string; checkMessage?: string; storedNotesNeutralised?: boolean; generated?: string };
const manifest = JSON.parse(readFileSync(path.join(DIR, "manifest.json"), "utf8")) as { cases: Case[] };
const TODAY = "2026-11-20";
const TABLES = ["samples", "batches", "uploads", "review_events", "mail_log", "jobs", "stations"];

let actor: Actor;

async function snapshot() {
  return Object.fromEntries(await Promise.all(TABLES.map(async (t) => [t, await countRows(t)] as const)));
}

function bytesOf(c: Case): Uint8Array {
  if (c.file === "too-large-50mb.csv") {
    const line = "TST-001,2026-01-01,2026-02-01,-11.2,-79.8,62,0.1,1,laser spectroscopy,Example Isotope Laboratory,VSMOW-SLAP,VSMOW2; SLAP2,\n";
    const header = "station_code,collected_from,collected_until,d18O_permil,d2H_permil,amount_mm,d18O_sd_permil,d2H_sd_permil,method,laboratory,scale,reference_waters,notes\n";
    const buf = Buffer.alloc(50 * 1024 * 1024, " ");
    buf.write(header);
    let o = header.length;
    while (o + line.length < buf.length) o += buf.write(line, o);
    return buf;
  }
  if (c.file === "too-many-rows-200k.csv") {
    const rows = ["station_code,collected_from,collected_until,d18O_permil,d2H_permil"];
    for (let i = 0; i < 200_000; i++) rows.push("TST-001,x,x,1,1");
    return Buffer.from(rows.join("\n") + "\n");
  }
  return readFileSync(path.join(DIR, c.file));
}

beforeAll(async () => {
  await freshDb();
  const db = getDb();
  const me = await db.insert(users).values({ email: "uploader@example.org", name: "Test Uploader", emailVerified: new Date() }).returning().get();
  const other = await db.insert(users).values({ email: "other@example.org", name: "Someone Else", emailVerified: new Date() }).returning().get();
  const st = (code: string, ownerId: string, status: "approved" | "pending", lat: number) => ({
    code,
    name: `Invented station ${code}`,
    lat,
    lon: 8.5,
    elevationM: 500,
    collectorType: "bulk-oil" as const,
    samplingInterval: "monthly" as const,
    status,
    ownerId,
  });
  await db.insert(stations).values([st("TST-001", me.id, "approved", 47.4), st("TST-002", me.id, "approved", 47.6), st("TST-PEND", me.id, "pending", 47.8), st("OTHER-01", other.id, "approved", 48)]);
  actor = { id: me.id, name: me.name, email: me.email };
});

describe("intake CSV corpus", () => {
  it("has at least 30 files, each with the message a person should see", () => {
    expect(manifest.cases.length).toBeGreaterThanOrEqual(30);
    for (const c of manifest.cases) expect(c.outcome === "accepted" ? c.samples : c.message, c.file).toBeTruthy();
  });

  for (const c of manifest.cases) {
    it(`${c.file}: ${c.outcome}${c.message ? ` — ${c.message}` : ""}`, async () => {
      const bytes = bytesOf(c);
      const before = await snapshot();
      const run = ingestCsv(actor, { name: c.file, bytes }, { today: TODAY });
      if (c.outcome === "rejected") {
        const err = await run.then(
          () => null,
          (e: unknown) => e,
        );
        expect(err, "the upload should have been refused").toBeInstanceOf(AppError);
        const e = err as AppError;
        expect(e.status).toBe(400);
        if (c.line) {
          // Row-level: the detail says how many rows, the rows member names line, column and reason.
          expect(e.detail).toContain("Nothing was saved");
          const rows = (e.extensions?.rows ?? []) as { line: number; errors: { column: string; message: string }[] }[];
          const row = rows.find((r) => r.line === c.line);
          expect(row, `line ${c.line} reported`).toBeTruthy();
          const hit = row!.errors.find((x) => x.column === c.column && x.message.includes(c.message!));
          expect(hit, JSON.stringify(row!.errors)).toBeTruthy();
        } else {
          expect(e.detail).toContain(c.message);
        }
        expect(await snapshot()).toEqual(before);
      } else {
        const r = await run;
        expect(r.sampleCount).toBe(c.samples);
        const after = await snapshot();
        expect(after.samples - before.samples).toBe(c.samples);
        expect(after.batches - before.batches).toBe(1);
        expect(after.uploads - before.uploads).toBe(1);
        const db = getDb();
        const b = await db.select().from(batches).where(eq(batches.id, r.batchId)).get();
        expect(b?.status).toBe("queued");
        const up = await db.select().from(uploads).where(eq(uploads.id, b!.uploadId!)).get();
        expect(up?.sizeBytes).toBe(bytes.byteLength);
        expect(up?.sha256).toBe(createHash("sha256").update(bytes).digest("hex"));
        const stored = await db.select().from(samples).where(eq(samples.batchId, r.batchId)).all();
        if (c.check) {
          const found = stored.flatMap((s) => s.checks as { code: string; severity: string; message: string }[]).find((x) => x.code === c.check);
          expect(found?.severity).toBe(c.severity);
          expect(found?.message).toContain(c.checkMessage);
        }
        if (c.storedNotesNeutralised) {
          // Stored as typed; any CSV the product writes turns the formula into text.
          for (const s of stored) expect(csvCell(s.notes!).replace(/^"/, "")).toMatch(/^'[=@]/);
        }
        // Clean the accepted batch away so later files see the same station history.
        await db.delete(samples).where(eq(samples.batchId, r.batchId));
      }
    });
  }
});
