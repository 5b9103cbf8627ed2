// Stations, decisions and corrections against a temporary database: entry checks, the
// moderator's decision with optimistic concurrency (the second of two moderators gets 409),
// batch closing with its e-mail, a correction as a new version, and the daily digest.
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { batches, jobs, mailLog, reviewEvents, samples, users } from "@/db/schema";
import type { Viewer } from "@/lib/auth/guard";
import { AppError } from "@/lib/errors";
import { reviewDigestJob, nextDigestAt } from "@/lib/jobs/handlers/review-digest";
import { ingestCsv, resubmitSample } from "@/lib/intake/batches";
import { decideSamples, reviewQueue } from "@/lib/intake/review";
import { publicStationData } from "@/lib/intake/public-station";
import { stationInput } from "@/lib/intake/schemas";
import { stationEntryChecks } from "@/lib/intake/station-checks";
import { correctStation, decideStation, registerStation } from "@/lib/intake/stations";
import { freshDb } from "../helpers/db";

const TODAY = "2026-11-20";
let contributor: Viewer;
let mod1: Viewer;
let mod2: Viewer;

const viewer = (u: { id: string; email: string; name: string | null }, role: Viewer["role"]): Viewer => ({
  id: u.id,
  email: u.email,
  name: u.name,
  role,
  plan: "open",
  planSource: "none" as Viewer["planSource"],
  planOrganizationId: null,
  organizations: [],
});

beforeAll(async () => {
  await freshDb();
  const db = getDb();
  const mk = (email: string, name: string, role: "contributor" | "moderator") => db.insert(users).values({ email, name, role, emailVerified: new Date() }).returning().get();
  contributor = viewer(await mk("op@example.org", "Station Operator", "contributor"), "contributor");
  mod1 = viewer(await mk("m1@example.org", "First Moderator", "moderator"), "moderator");
  mod2 = viewer(await mk("m2@example.org", "Second Moderator", "moderator"), "moderator");
});

const conflict = async (p: Promise<unknown>) => {
  const e = await p.then(() => null, (x: unknown) => x);
  expect(e).toBeInstanceOf(AppError);
  expect((e as AppError).status).toBe(409);
  return (e as AppError).detail ?? "";
};

describe("station entry", () => {
  it("refuses 0, 0 and out-of-range coordinates with field messages", () => {
    const base = { code: "abc-1", name: "Test", lat: "0", lon: "0", elevationM: "10", collectorType: "bulk-oil", samplingInterval: "monthly" };
    const r = stationInput.safeParse(base);
    expect(r.success).toBe(false);
    expect(JSON.stringify(r.error!.issues)).toContain("usually means the coordinates were not filled in");
    expect(stationInput.safeParse({ ...base, lat: "91", lon: "8" }).success).toBe(false);
    expect(stationInput.safeParse({ ...base, lat: "47.4", lon: "8.5" }).data?.code).toBe("ABC-1");
  });

  it("warns (does not refuse) at sea, near another station and for an implausible elevation", () => {
    // 46.0 N, 4.0 W is in the Bay of Biscay, far from any coast [geography].
    const sea = stationEntryChecks({ lat: 46, lon: -4, elevationM: 300 }, []);
    expect(sea.map((c) => c.code)).toEqual(["offshore", "elevation"]);
    // Zürich area, on land [geography]; a neighbour 0.5 km north (0.0045° of latitude ≈ 0.5 km).
    const near = stationEntryChecks({ lat: 47.37, lon: 8.54, elevationM: 430 }, [{ code: "N-1", name: "N", lat: 47.3745, lon: 8.54, elevationM: 430 }]);
    expect(near.map((c) => c.code)).toEqual(["nearby-station"]);
    expect(near[0].values.distanceM).toBeGreaterThan(450);
    expect(near[0].values.distanceM).toBeLessThan(550);
    expect(stationEntryChecks({ lat: 47.37, lon: 8.54, elevationM: 7000 }, []).map((c) => c.code)).toEqual(["elevation"]);
  });

  it("registration finds a registered neighbour within 1 km, also across the ±180° meridian", async () => {
    const reg = (code: string, lat: string, lon: string) =>
      registerStation(contributor, stationInput.parse({ code, name: code, lat, lon, elevationM: "10", collectorType: "bulk-oil", samplingInterval: "monthly" }));
    await reg("NEAR-A", "-16.8", "179.999");
    // 0.002° of longitude at 16.8° S ≈ 0.21 km (spherical estimate [mem]), on the other side of the meridian
    const across = await reg("NEAR-B", "-16.8", "-179.999");
    expect(across.checks.map((c) => c.code)).toContain("nearby-station");
    await reg("NEAR-C", "51.5", "-0.1");
    const beside = await reg("NEAR-D", "51.5045", "-0.1");
    expect(beside.checks.map((c) => c.code)).toContain("nearby-station");
    const far = await reg("NEAR-E", "51.5", "0.2");
    expect(far.checks.map((c) => c.code)).not.toContain("nearby-station");
  });
});

describe("stations, batches and the review desk", () => {
  let batchId = "";
  it("registers a station as pending with an audit event; the first moderator approves, the second gets 409", async () => {
    const input = stationInput.parse({ code: "FLOW-01", name: "Flow test", lat: "47.37", lon: "8.54", elevationM: "430", collectorType: "bulk-oil", samplingInterval: "monthly" });
    const { station } = await registerStation(contributor, input);
    expect(station.status).toBe("pending");
    const again = await registerStation(contributor, input).then(() => null, (e: unknown) => e);
    expect((again as AppError).detail).toContain("already registered");
    await decideStation(mod1, "FLOW-01", { decision: "approve", reason: "", rowVersion: station.rowVersion });
    const msg = await conflict(decideStation(mod2, "FLOW-01", { decision: "reject", reason: "duplicate", rowVersion: station.rowVersion }));
    expect(msg).toContain("already approved");
    const events = await getDb().select().from(reviewEvents).where(eq(reviewEvents.entityId, station.id)).all();
    expect(events.map((e) => e.action)).toEqual(["register", "approve"]);
    const mail = await getDb().select().from(mailLog).where(eq(mailLog.template, "station-decided")).all();
    expect(mail).toHaveLength(1);
  });

  it("queues a batch with checks stored; two moderators deciding the same sample: one wins, one gets 409, nothing half-written", async () => {
    const csv = [
      "station_code,collected_from,collected_until,d18O_permil,d2H_permil,amount_mm",
      "FLOW-01,2026-06-01,2026-07-01,-6.1,-38.6,80",
      "FLOW-01,2026-07-01,2026-08-01,-5.2,-31.0,90",
      "FLOW-01,2026-08-01,2026-09-01,-31.0,-5.2,70",
    ].join("\n");
    const r = await ingestCsv(contributor, { name: "flow.csv", bytes: Buffer.from(csv) }, { today: TODAY });
    batchId = r.batchId;
    expect(r.worst).toBe("fail"); // the swapped row [lib/qc swapped check]
    const rows = await getDb().select().from(samples).where(eq(samples.batchId, batchId)).orderBy(samples.startDate).all();
    const [a, b, c] = rows;
    await decideSamples(mod1, { decision: "accept", reason: "", samples: [{ id: a.id, rowVersion: a.rowVersion }] });
    const msg = await conflict(decideSamples(mod2, { decision: "reject", reason: "looks odd", samples: [{ id: b.id, rowVersion: b.rowVersion }, { id: a.id, rowVersion: a.rowVersion }] }));
    expect(msg).toContain("already accepted by First Moderator");
    // The losing request changed nothing, not even the sample it could have decided.
    expect((await getDb().select().from(samples).where(eq(samples.id, b.id)).get())!.status).toBe("pending");
    await decideSamples(mod2, { decision: "accept", reason: "", samples: [{ id: b.id, rowVersion: b.rowVersion }] });
    expect((await getDb().select().from(batches).where(eq(batches.id, batchId)).get())!.status).toBe("in-review");
    await decideSamples(mod1, { decision: "return", reason: "δ columns look swapped", samples: [{ id: c.id, rowVersion: c.rowVersion }] });
    expect((await getDb().select().from(batches).where(eq(batches.id, batchId)).get())!.status).toBe("decided");
    const decided = await getDb().select().from(mailLog).where(eq(mailLog.template, "batch-decided")).all();
    expect(decided).toHaveLength(1);
    expect(decided[0].text).toContain("δ columns look swapped");
  });

  it("a returned sample is corrected as version 2 with previousId; the old one is superseded and kept", async () => {
    const old = (await getDb().select().from(samples).where(eq(samples.status, "returned")).all())[0];
    const r = await resubmitSample(contributor, old.id, { cells: { collected_from: "2026-08-01", collected_until: "2026-09-01", d18O_permil: "-5.2", d2H_permil: "-31.0", amount_mm: "70" }, rowVersion: old.rowVersion }, TODAY);
    const fresh = await getDb().select().from(samples).where(eq(samples.id, r.sampleId)).get();
    expect(fresh).toMatchObject({ version: 2, previousId: old.id, status: "pending" });
    expect(fresh!.checks.some((c) => (c as { code: string }).code === "swapped")).toBe(false);
    expect((await getDb().select().from(samples).where(eq(samples.id, old.id)).get())!.status).toBe("superseded");
    await conflict(resubmitSample(contributor, old.id, { cells: {}, rowVersion: old.rowVersion + 1 }, TODAY));
  });

  it("the daily digest mails moderators and queues its next run at 07:00 UTC", async () => {
    expect(nextDigestAt(new Date("2026-11-20T06:00:00Z")).toISOString()).toBe("2026-11-20T07:00:00.000Z");
    expect(nextDigestAt(new Date("2026-11-20T07:00:00Z")).toISOString()).toBe("2026-11-21T07:00:00.000Z");
    const before = (await getDb().select().from(mailLog).where(eq(mailLog.template, "review-digest")).all()).length;
    const out = (await reviewDigestJob({ id: "x", kind: "review-digest", payload: { reschedule: true }, attempts: 1, maxAttempts: 3, checkpoint: null }, {} as never)) as { sent: number; pendingSamples: number };
    expect(out.pendingSamples).toBe(1);
    expect(out.sent).toBe(2);
    const after = await getDb().select().from(mailLog).where(eq(mailLog.template, "review-digest")).all();
    expect(after.length - before).toBe(2);
    const next = await getDb().select().from(jobs).where(eq(jobs.kind, "review-digest")).all();
    expect(next).toHaveLength(1);
  });
});

describe("the station schema", () => {
  it("accepts its own output (the form sends parsed values, the route parses again)", () => {
    const once = stationInput.parse({ code: "hill-01", name: "Hill", lat: "47.1", lon: "9.2", elevationM: "800", collectorType: "wet-only", samplingInterval: "weekly", operatingOrg: "", startDate: "" });
    expect(once.operatingOrg).toBeNull();
    expect(stationInput.parse(once)).toEqual(once);
  });
});

describe("a station returned for changes", () => {
  it("is corrected by its owner only, goes back to pending and the trail shows register → return → resubmit", async () => {
    const input = stationInput.parse({ code: "FIX-01", name: "Typo", lat: "-47.37", lon: "8.54", elevationM: "430", collectorType: "bulk-oil", samplingInterval: "monthly" });
    const { station, checks } = await registerStation(contributor, input);
    expect(checks.map((c) => c.code)).toContain("offshore"); // a sign error puts it in the Southern Ocean
    const returned = await decideStation(mod1, "FIX-01", { decision: "return", reason: "The latitude sign looks wrong.", rowVersion: station.rowVersion });
    const fixed = stationInput.parse({ ...input, lat: "47.37", lon: "8.54", elevationM: "430" });
    const notMine = await correctStation(mod2, "FIX-01", { ...fixed, rowVersion: returned.rowVersion }).then(() => null, (e: unknown) => e);
    expect((notMine as AppError).status).toBe(404);
    const r = await correctStation(contributor, "FIX-01", { ...fixed, rowVersion: returned.rowVersion });
    expect(r.station.status).toBe("pending");
    expect(r.checks.map((c) => c.code)).not.toContain("offshore");
    await conflict(correctStation(contributor, "FIX-01", { ...fixed, rowVersion: r.station.rowVersion }));
    const events = await getDb().select().from(reviewEvents).where(eq(reviewEvents.entityId, station.id)).orderBy(reviewEvents.at).all();
    expect(events.map((e) => e.action)).toEqual(["register", "return", "resubmit"]);
  });
});

describe("the review queue and the public station page", () => {
  it("filters by station and severity, sorts and pages", async () => {
    const csv = (code: string, rows: string[]) => Buffer.from(["station_code,collected_from,collected_until,d18O_permil,d2H_permil,amount_mm", ...rows.map((r) => `${code},${r}`)].join("\n"));
    await ingestCsv(contributor, { name: "a.csv", bytes: csv("FLOW-01", ["2026-09-01,2026-10-01,-7.1,-46.5,40"]) }, { today: TODAY });
    await ingestCsv(contributor, { name: "b.csv", bytes: csv("FLOW-01", ["2026-10-01,2026-11-01,-55,-7,40"]) }, { today: TODAY });
    const all = await reviewQueue({ sort: "severity", dir: "desc" });
    expect(all.total).toBeGreaterThanOrEqual(3);
    expect(all.rows[0].worstSeverity).toBe("fail");
    const fails = await reviewQueue({ severity: "fail" });
    expect(fails.rows.every((r) => r.worstSeverity === "fail")).toBe(true);
    expect((await reviewQueue({ station: "nope" })).total).toBe(0);
    expect((await reviewQueue({ contributor: "station op" })).total).toBe(all.total);
    const page2 = await reviewQueue({ pageSize: 5, page: 2 });
    expect(page2.rows.length).toBe(Math.max(0, Math.min(5, all.total - 5)));
  });

  it("shows accepted data only: means with coverage and a water line by the chosen method", async () => {
    const d = await publicStationData("FLOW-01", "rma");
    expect(d.sampleCount).toBe(2); // the two accepted samples of the flow above
    expect(d.points.map((p) => p.d18O).sort((a, b) => a - b)).toEqual([-6.1, -5.2]);
    expect(d.line).toBeNull(); // fewer than 3 samples
    expect(d.lineNote).toContain("at least 3");
    expect(d.means?.annual.included).toBe(false);
    await expect(publicStationData("FIX-01", "ols")).rejects.toThrow(/no public station/);
  });
});
