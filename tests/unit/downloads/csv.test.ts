// CSV writing for downloads: RFC 4180 quoting [pub, RFC 4180], formula
// neutralisation per OWASP "CSV Injection" [trade], and the surface CSV read
// back with papaparse (an independent CSV parser).
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { csvCell, csvRow, neutraliseFormula } from "@/lib/downloads/csv";
import type { SurfacePlane } from "@/lib/downloads/surface";
import { surfaceCsvChunks, surfaceToCsv } from "@/lib/downloads/surface-csv";

describe("csvCell", () => {
  it("neutralises text that a spreadsheet would run as a formula", () => {
    for (const bad of ["=1+1", "+SUM(A1)", "-2+3", "@cmd", "\t=x", "\r=x"]) expect(neutraliseFormula(bad).startsWith("'")).toBe(true);
    expect(csvCell('=HYPERLINK("http://evil.example","x")')).toBe(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    expect(neutraliseFormula("Tallowfen")).toBe("Tallowfen");
  });

  it("leaves numbers alone (a negative δ18O is not a formula)", () => {
    expect(csvCell(-8.25)).toBe("-8.25");
    expect(csvCell(Number.NaN)).toBe("");
    expect(csvCell(null)).toBe("");
    expect(csvCell(true)).toBe("yes");
  });

  it("quotes commas, quotes, line breaks and edge spaces (RFC 4180)", () => {
    expect(csvCell("a,b")).toBe('"a,b"');
    expect(csvCell('say "hi"')).toBe('"say ""hi"""');
    expect(csvCell("two\nlines")).toBe('"two\nlines"');
    expect(csvCell(" padded")).toBe('" padded"');
    expect(csvRow(["x", 1, null])).toBe("x,1,\r\n");
  });
});

describe("surface CSV", () => {
  const grid = { lon0: 170.25, lat0: -40.25, dLon: 0.5, dLat: 0.5, nx: 3, ny: 2 };
  const values = new Float32Array([-5.5, Number.NaN, -6.25, -7, -7.5, -8.125]);
  const plane: SurfacePlane = { grid, values, meta: { editionId: "2026.12.1", variable: "d18O", period: 1, plane: "value", isDemo: true } };

  it("writes one row per cell with a value at its centre, and the notice on the first row only", () => {
    const parsed = Papa.parse<Record<string, string>>(surfaceToCsv(plane), { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual(["lon", "lat", "d18O_permil", "notice"]);
    expect(parsed.data.map((r) => [r.lon, r.lat, r.d18O_permil])).toEqual([
      ["170.25", "-40.25", "-5.5"],
      ["171.25", "-40.25", "-6.25"],
      ["170.25", "-40.75", "-7"],
      ["170.75", "-40.75", "-7.5"],
      ["171.25", "-40.75", "-8.125"],
    ]);
    const notice = parsed.data[0].notice;
    expect(notice).toMatch(/Rainprint edition 2026\.12\.1/);
    expect(notice).toMatch(/month 01/);
    expect(notice).toMatch(/per mil VSMOW/);
    expect(notice).toMatch(/CC BY 4\.0/);
    expect(notice).toMatch(/synthetic demo data/);
    expect(parsed.data.slice(1).every((r) => r.notice === "")).toBe(true);
  });

  it("streams in chunks that join to the same file", () => {
    const chunks = [...surfaceCsvChunks(plane, 2)];
    expect(chunks.length).toBeGreaterThan(2);
    expect(chunks.join("")).toBe(surfaceToCsv(plane));
  });

  it("still carries the notice when no cell has a value", () => {
    const empty = { ...plane, values: new Float32Array(6).fill(Number.NaN) };
    const parsed = Papa.parse<Record<string, string>>(surfaceToCsv(empty), { header: true, skipEmptyLines: true });
    expect(parsed.data).toHaveLength(1);
    expect(parsed.data[0].notice).toMatch(/no cells with a value/);
  });
});
