// Accepted station data as CSV and GeoJSON (lib/downloads/station-data.ts),
// read back with papaparse and JSON.parse. Fixture: invented stations written
// here; the expected station mean of a constant series is that constant
// (a weighted mean of equal values [trade]).
import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "@/db";
import { batches, samples, stations, users } from "@/db/schema";
import { stationDataChunks, stationDataQuery, type StationDataFilter } from "@/lib/downloads/station-data";
import { freshDb } from "../helpers/db";

const NOW = new Date("2026-11-20T12:00:00Z");

async function file(dataset: "samples" | "station-means", format: "csv" | "geojson", filter: StationDataFilter = {}): Promise<string> {
  let out = "";
  for await (const chunk of stationDataChunks(dataset, format, filter, NOW)) out += chunk;
  return out;
}
const csv = (text: string) => Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });

function month(year: number, m: number): { startDate: string; endDate: string } {
  const pad = (x: number) => String(x).padStart(2, "0");
  const next = m === 12 ? `${year + 1}-01-01` : `${year}-${pad(m + 1)}-01`;
  return { startDate: `${year}-${pad(m)}-01`, endDate: next };
}

beforeAll(async () => {
  await freshDb();
  const db = getDb();
  const [ada] = await db.insert(users).values({ email: "ada@lab.example", name: "Ada Rill" }).returning();
  const [bo] = await db.insert(users).values({ email: "bo@lab.example", name: "Bo Fenwick", isDemo: true }).returning();
  const base = { collectorType: "bulk-oil" as const, elevationM: 410 };
  const [a] = await db
    .insert(stations)
    .values({ ...base, code: "TST-001", name: "Alder Moss", lat: 47.5, lon: 8.25, operatingOrg: "Moss Hydrology Group", ownerId: ada.id, status: "approved" })
    .returning();
  const [b] = await db
    .insert(stations)
    .values({ ...base, code: "TST-002", name: "=HYPERLINK(\"http://evil.example\")", lat: -33.9, lon: 151.1, operatingOrg: "Tallowfen Cooperative", ownerId: bo.id, status: "approved", isDemo: true })
    .returning();
  const [c] = await db
    .insert(stations)
    .values({ ...base, code: "TST-003", name: "Pending Ridge", lat: 10, lon: 10, ownerId: ada.id, status: "pending" })
    .returning();
  const [batch] = await db.insert(batches).values({ contributorId: ada.id, source: "form", status: "decided" }).returning();
  const rows: (typeof samples.$inferInsert)[] = [];
  // Station A: two full years of constant δ18O −8‰, δ2H −54‰ (d = 10‰), 50 mm a month.
  for (const y of [2024, 2025])
    for (let m = 1; m <= 12; m++)
      rows.push({ batchId: batch.id, stationId: a.id, status: "accepted", ...month(y, m), amountMm: 50, d18O: -8, d2H: -54, dExcess: 10, d18OSd: 0.1, d2HSd: 1, method: "laser", laboratory: "Lab One", scale: "VSMOW-SLAP" });
  // Not accepted: never downloaded.
  rows.push({ batchId: batch.id, stationId: a.id, status: "pending", ...month(2026, 1), amountMm: 50, d18O: -99, d2H: -99, dExcess: 693 });
  rows.push({ batchId: batch.id, stationId: a.id, status: "rejected", ...month(2026, 2), amountMm: 50, d18O: -98, d2H: -98, dExcess: 686 });
  // Station B (synthetic demo data): three months.
  for (let m = 1; m <= 3; m++) rows.push({ batchId: batch.id, stationId: b.id, status: "accepted", ...month(2025, m), amountMm: 80, d18O: -5.5, d2H: -32, dExcess: 12, isDemo: true });
  // Station C is pending: its accepted-looking sample must not appear either.
  rows.push({ batchId: batch.id, stationId: c.id, status: "accepted", ...month(2025, 1), amountMm: 10, d18O: -1, d2H: -1, dExcess: 7 });
  await db.insert(samples).values(rows);
});

describe("samples as CSV", () => {
  it("has the accepted samples of approved stations only, with credit, status and one notice", async () => {
    const parsed = csv(await file("samples", "csv"));
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toContain("d18O_permil");
    expect(parsed.meta.fields?.slice(-3)).toEqual(["credit", "data_status", "notice"]);
    expect(parsed.data).toHaveLength(24 + 3);
    expect(parsed.data.filter((r) => r.station_code === "TST-001")).toHaveLength(24);
    expect(parsed.data.some((r) => r.d18O_permil === "-99" || r.d18O_permil === "-98" || r.station_code === "TST-003")).toBe(false);
    const first = parsed.data[0];
    expect(first.credit).toBe("operated by Moss Hydrology Group; data contributed by Ada Rill");
    expect(first.data_status).toBe("contributed");
    expect(first.notice).toMatch(/CC BY 4\.0 \(https:\/\/creativecommons\.org\/licenses\/by\/4\.0\/\)/);
    expect(first.notice).toMatch(/2 stations; all accepted data/);
    expect(first.notice).toMatch(/synthetic demo data/);
    expect(parsed.data.slice(1).every((r) => r.notice === "")).toBe(true);
    const demo = parsed.data.find((r) => r.station_code === "TST-002")!;
    expect(demo.data_status).toBe("synthetic demo data");
    expect(demo.credit).toMatch(/\(invented, synthetic demo data\)$/);
  });

  it("neutralises a station name that a spreadsheet would run as a formula", async () => {
    const text = await file("samples", "csv", { stations: ["TST-002"] });
    const demo = csv(text).data[0];
    expect(demo.station_name).toBe(`'=HYPERLINK("http://evil.example")`);
    expect(text).not.toMatch(/,=HYPERLINK/);
  });

  it("narrows by station codes, dates and bounding box", async () => {
    expect(csv(await file("samples", "csv", { stations: ["TST-002"] })).data).toHaveLength(3);
    expect(csv(await file("samples", "csv", { from: "2025-01-01", to: "2025-03-01" })).data).toHaveLength(2 + 2);
    expect(csv(await file("samples", "csv", { bbox: [0, 40, 20, 50] })).data.every((r) => r.station_code === "TST-001")).toBe(true);
    const none = csv(await file("samples", "csv", { stations: ["NOPE"] }));
    expect(none.data).toHaveLength(1);
    expect(none.data[0].notice).toMatch(/no data matched/);
  });
});

describe("station means", () => {
  it("gives the annual and monthly means; a constant series' mean is that constant", async () => {
    const parsed = csv(await file("station-means", "csv", { stations: ["TST-001"] }));
    expect(parsed.data).toHaveLength(13);
    const annual = parsed.data[0];
    expect(annual).toMatchObject({ period: "annual", d18O_permil: "-8", d2H_permil: "-54", d_excess_permil: "10", precip_mm: "600", included: "yes", years_counted: "2" });
    const july = parsed.data.find((r) => r.period === "07")!;
    expect(july).toMatchObject({ d18O_permil: "-8", precip_mm: "50", included: "yes" });
  });

  it("as GeoJSON: one feature per station with flat monthly properties and a top-level metadata member", async () => {
    const fc = JSON.parse(await file("station-means", "geojson"));
    expect(fc.type).toBe("FeatureCollection");
    expect(fc.metadata.licence.id).toBe("CC-BY-4.0");
    expect(fc.metadata.syntheticDemoData).toBe(true);
    expect(fc.metadata.credits).toEqual(
      expect.arrayContaining([
        { operator: "Moss Hydrology Group", contributors: ["Ada Rill"], stations: 1, syntheticDemoData: false },
        { operator: "Tallowfen Cooperative", contributors: ["Bo Fenwick"], stations: 1, syntheticDemoData: true },
      ]),
    );
    const a = fc.features.find((f: { properties: { station_code: string } }) => f.properties.station_code === "TST-001");
    expect(a.geometry).toEqual({ type: "Point", coordinates: [8.25, 47.5] });
    expect(a.properties).toMatchObject({ d18O_permil_annual: -8, d18O_permil_m01: -8, included_annual: true, data_status: "contributed" });
    // Station B has only three months: no annual mean passes the coverage rules.
    const b = fc.features.find((f: { properties: { station_code: string } }) => f.properties.station_code === "TST-002");
    expect(b.properties.included_annual).toBe(false);
  });
});

describe("samples as GeoJSON", () => {
  it("has one point feature per sample in lon, lat order, with credit and status", async () => {
    const fc = JSON.parse(await file("samples", "geojson", { stations: ["TST-002"] }));
    expect(fc.features).toHaveLength(3);
    expect(fc.features[0].geometry.coordinates).toEqual([151.1, -33.9]);
    expect(fc.features[0].properties).toMatchObject({ station_code: "TST-002", d18O_permil: -5.5, data_status: "synthetic demo data" });
    expect(fc.features[0].properties).not.toHaveProperty("lat");
  });
});

describe("the query", () => {
  it("accepts filters and refuses bad ones with a plain message", () => {
    expect(stationDataQuery.parse({ stations: "TST-001, TST-002", from: "2024-01-01", bbox: "-10,40,20,55" })).toEqual({
      stations: ["TST-001", "TST-002"],
      from: "2024-01-01",
      bbox: [-10, 40, 20, 55],
    });
    expect(() => stationDataQuery.parse({ from: "2024-02-30" })).toThrow(/calendar date/);
    expect(() => stationDataQuery.parse({ from: "2025-01-01", to: "2024-01-01" })).toThrow(/before/);
    expect(() => stationDataQuery.parse({ bbox: "20,40,10,50" })).toThrow(/west < east/);
    expect(() => stationDataQuery.parse({ stations: "a;b" })).toThrow(/Station codes/);
    expect(() => stationDataQuery.parse({ format: "xlsx" })).toThrow();
  });
});
