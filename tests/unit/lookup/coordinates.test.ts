import { describe, expect, it } from "vitest";
import { CoordinateError, formatDms, parseCoordinate, parseCoordinatePair, parseElevation } from "@/lib/lookup/coordinates";

// Degrees-minutes-seconds arithmetic: d + m/60 + s/3600 [trade]; expected values worked by hand.

describe("parseCoordinate", () => {
  it("reads decimal degrees with a sign or a hemisphere letter", () => {
    expect(parseCoordinate("46.5042", "lat")).toBe(46.5042);
    expect(parseCoordinate("-33.86", "lat")).toBe(-33.86);
    expect(parseCoordinate("33.86 S", "lat")).toBe(-33.86);
    expect(parseCoordinate("7.2083°E", "lon")).toBe(7.2083);
    expect(parseCoordinate("W 122.3", "lon")).toBe(-122.3);
    expect(parseCoordinate("−12.5", "lon")).toBe(-12.5);
    expect(parseCoordinate(".5", "lat")).toBe(0.5);
    expect(parseCoordinate(12, "lon")).toBe(12);
  });

  it("reads degrees-minutes-seconds in the usual spellings", () => {
    const v = 46 + 30 / 60 + 15 / 3600; // 46.504166…
    expect(parseCoordinate(`46°30'15"N`, "lat")).toBeCloseTo(v, 12);
    expect(parseCoordinate("46°30′15″N", "lat")).toBeCloseTo(v, 12);
    expect(parseCoordinate("46 30 15 N", "lat")).toBeCloseTo(v, 12);
    expect(parseCoordinate("N 46 30 15", "lat")).toBeCloseTo(v, 12);
    expect(parseCoordinate("46º 30' 15'' n", "lat")).toBeCloseTo(v, 12);
    expect(parseCoordinate(`7°12'30"E`, "lon")).toBeCloseTo(7.208333333333, 12);
    expect(parseCoordinate(`7°12'30"W`, "lon")).toBeCloseTo(-7.208333333333, 12);
    expect(parseCoordinate("-7 12 30", "lon")).toBeCloseTo(-7.208333333333, 12);
    expect(parseCoordinate("46°30.25'N", "lat")).toBeCloseTo(46 + 30.25 / 60, 12); // degrees and decimal minutes
    expect(parseCoordinate("0 0 0.5 S", "lat")).toBeCloseTo(-0.5 / 3600, 15);
  });

  it("refuses latitude 91, longitude 181 and other impossible values with a clear message", () => {
    expect(() => parseCoordinate("91", "lat")).toThrow("Latitude 91 is outside −90…90°");
    expect(() => parseCoordinate("90 0 1 N", "lat")).toThrow(/outside −90…90/);
    expect(() => parseCoordinate("181", "lon")).toThrow("Longitude 181 is outside −180…180°");
    expect(() => parseCoordinate("-180.5", "lon")).toThrow(/outside/);
    expect(() => parseCoordinate(Number.NaN, "lat")).toThrow(/must be a number/);
  });

  it("refuses non-numbers, missing values, bad minutes and mixed signs", () => {
    expect(() => parseCoordinate("abc", "lat")).toThrow(/"abc" is not a number/);
    expect(() => parseCoordinate("12,5", "lat")).toThrow(/not a number/);
    expect(() => parseCoordinate("", "lon")).toThrow("Longitude is missing.");
    expect(() => parseCoordinate("46 60 00 N", "lat")).toThrow(/minutes must be below 60/);
    expect(() => parseCoordinate("46 30 61 N", "lat")).toThrow(/seconds must be below 60/);
    expect(() => parseCoordinate("46.5 30 N", "lat")).toThrow(/only the last part/);
    expect(() => parseCoordinate("-46 N", "lat")).toThrow(/both a sign and a hemisphere letter/);
    expect(() => parseCoordinate("46 E", "lat")).toThrow(/latitude takes N or S/);
    expect(() => parseCoordinate("7 N", "lon")).toThrow(/longitude takes E or W/);
    expect(() => parseCoordinate("1 2 3 4", "lon")).toThrow(/not a number/);
    try {
      parseCoordinate("x", "lon");
    } catch (e) {
      expect(e).toBeInstanceOf(CoordinateError);
      expect((e as CoordinateError).field).toBe("lon");
    }
  });
});

describe("parseCoordinatePair", () => {
  it("splits latitude and longitude in each written form", () => {
    expect(parseCoordinatePair("46.5042, 7.2083")).toEqual({ lat: 46.5042, lon: 7.2083 });
    expect(parseCoordinatePair("46.5042 7.2083")).toEqual({ lat: 46.5042, lon: 7.2083 });
    expect(parseCoordinatePair("-33.9; 151.2")).toEqual({ lat: -33.9, lon: 151.2 });
    const dms = parseCoordinatePair(`46°30'15"N 7°12'30"E`);
    expect(dms.lat).toBeCloseTo(46.50416666667, 10);
    expect(dms.lon).toBeCloseTo(7.20833333333, 10);
    expect(parseCoordinatePair("46 30 15 N 7 12 30 E").lon).toBeCloseTo(7.20833333333, 10);
    expect(parseCoordinatePair("S 33 52 0 E 151 12 0").lat).toBeCloseTo(-33.8666666667, 9);
  });

  it("refuses what it cannot split", () => {
    expect(() => parseCoordinatePair("46.5")).toThrow(/not a latitude and a longitude/);
    expect(() => parseCoordinatePair("46,5, 7,2")).toThrow(/more than two parts/);
    expect(() => parseCoordinatePair("")).toThrow(/Enter a latitude/);
    expect(() => parseCoordinatePair("91, 0")).toThrow(/Latitude 91/);
  });
});

describe("parseElevation and formatDms", () => {
  it("reads optional metres", () => {
    expect(parseElevation("")).toBeNull();
    expect(parseElevation(undefined)).toBeNull();
    expect(parseElevation("1200")).toBe(1200);
    expect(parseElevation("1200 m")).toBe(1200);
    expect(parseElevation("-20")).toBe(-20);
    expect(() => parseElevation("high")).toThrow(/not a number of metres/);
    expect(() => parseElevation("12000")).toThrow(/outside −500…9000 m/);
  });

  it("writes degrees-minutes-seconds that read back to the same value", () => {
    expect(formatDms(46.504166667, "lat")).toBe("46°30′15.0″N");
    expect(formatDms(-7.208333333, "lon")).toBe("7°12′30.0″W");
    expect(formatDms(45.99999999, "lat")).toBe("46°00′00.0″N");
    for (const v of [0.1234, -89.9999, 179.5, -0.0001]) expect(parseCoordinate(formatDms(v, "lon", 3), "lon")).toBeCloseTo(v, 6);
  });
});
