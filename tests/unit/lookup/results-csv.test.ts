import Papa from "papaparse";
import { beforeAll, describe, expect, it } from "vitest";
import { forgetEditionPredictors, loadEditionPredictor } from "@/lib/editions/predictor";
import { resultsCsvColumns, resultsCsvHeader, resultsCsvRows } from "@/lib/lookup/results-csv";
import { parseSitesCsv } from "@/lib/lookup/sites-csv";
import { freshDb } from "../helpers/db";
import { insertTestEdition, insertTestStations } from "../helpers/edition";
import { testStations } from "../../shared/test-edition";

// The batch results file: every value and interval per site, ids made safe for spreadsheets
// (OWASP "CSV Injection" [trade]), and the sites file's row errors by line.

const ST = testStations("RP-CSV", 20, { lat: [-40, -30], lon: [140, 152] }, 11);

beforeAll(async () => {
  await freshDb();
  await insertTestStations(ST);
  await insertTestEdition({ id: "2026.07.1", stations: ST });
  forgetEditionPredictors();
});

describe("batch results CSV", () => {
  it("one row per site with all 13 periods × 4 quantities × (value, sd, lower95, upper95), the line and a notice on the first row", async () => {
    const { sites, errors } = parseSitesCsv('id,latitude,longitude,elevation_m\n=HYPERLINK("x"),-35.1,149.1,600\nplain,35 30 0 S,150 0 0 E,\n', { maxSites: 10 });
    expect(errors).toEqual([]);
    const p = await loadEditionPredictor("2026.07.1");
    const preds = p.predictMany(sites.map((s) => ({ lat: s.lat, lon: s.lon, elevationM: s.elevationM })));
    const text = resultsCsvHeader() + resultsCsvRows(preds, sites.map((s) => s.id), "notice text");
    const rows = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true }).data;
    expect(resultsCsvColumns()).toHaveLength(8 + 13 * 16 + 6);
    expect(rows).toHaveLength(2);
    expect(rows[0].id).toBe(`'=HYPERLINK("x")`);
    expect(Number(rows[0].d18O_permil_annual)).toBeCloseTo(preds[0].annual.d18O.value, 3);
    expect(Number(rows[0].d2H_permil_upper95_m07)).toBeCloseTo(preds[0].monthly[6].d2H.upper95, 2);
    expect(Number(rows[1].precip_mm_lower95_m12)).toBeCloseTo(preds[1].monthly[11].precipMm!.lower95, 1);
    expect(rows[1]).toMatchObject({ sea_level_equivalent: "yes", elevation_m: "", edition: "2026.07.1", notice: "" });
    expect(rows[0].notice).toBe("notice text");
    expect(Number(rows[0].lmwl_slope)).toBeCloseTo(preds[0].waterLine.slope, 4);
  });

  it("the sites file: every problem by line, a file over the plan's limit refused whole", () => {
    const bad = parseSitesCsv("site,lat,lon\na,91,0\nb,0,181\na,1,1\nc,1\n", { maxSites: 10 });
    expect(bad.sites).toEqual([]);
    expect(bad.errors.map((e) => [e.line, e.column])).toEqual([
      [2, "latitude"],
      [3, "longitude"],
      [4, "id"],
      [5, null],
    ]);
    const big = parseSitesCsv(`latitude,longitude\n${"1,1\n".repeat(11)}`, { maxSites: 10 });
    expect(big.errors[0].message).toMatch(/has 11 sites; at most 10/);
    expect(parseSitesCsv("", { maxSites: 10 }).errors[0].message).toMatch(/empty/);
    expect(parseSitesCsv("latitude,longitude\n\n", { maxSites: 10 }).errors[0].message).toMatch(/no sites/);
    expect(parseSitesCsv("latitude,longitude\n1,2\n", { maxSites: 10 }).sites[0]).toMatchObject({ id: "2", lat: 1, lon: 2, elevationM: null });
  });
});
