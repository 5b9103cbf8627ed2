import { globals, writeArrayBuffer } from "geotiff";
import { DATA_LICENCE, SYNTHETIC_LABEL } from "./licence";
import { checkPlane, unitsAscii, type SurfacePlane } from "./surface";

// An edition surface plane → a single-band Float32 GeoTIFF, written with the
// `geotiff` package's writer (writeArrayBuffer). Pure: no framework, no I/O.
//
// Georeferencing (GeoTIFF 1.0 spec [pub], http://geotiff.maptools.org/spec/geotiff2.4.html):
//   ModelPixelScale = (dLon, dLat, 0); ModelTiepoint maps raster (0, 0) — the
//   outer north-west corner of the north-west cell, since GTRasterTypeGeoKey = 1
//   (RasterPixelIsArea) — to (lon0 − dLon/2, lat0 + dLat/2);
//   GTModelTypeGeoKey = 2 (geographic), GeographicTypeGeoKey = 4326 (WGS 84),
//   GeogAngularUnitsGeoKey = 9102 (degree).
// No value: cells that are NaN are written as NODATA_VALUE and named in the
// GDAL_NODATA tag (42113), which GDAL, QGIS and the geotiff package read.
// Tags naming the edition, variable, period and units: GDAL_METADATA (42112,
// the XML GDAL shows as dataset and band metadata, with the band's unit) and
// Copyright (the licence).
//
// Gaps in geotiff 3.0's writer, filled here:
//   - it knows no field type for GDAL_METADATA (42112) and throws "unknown
//     type of tag"; we register it as ASCII in the library's tag-type table
//     (the TIFF type GDAL itself writes) — one line, see registerGdalMetadata;
//   - it lays the whole header out in a fixed 1000-byte block and silently
//     drops anything beyond it; checkHeaderFits reads the written directory
//     back and refuses a header that did not fit, rather than ship a file with
//     truncated tags. Our tags take ~850 bytes at most (tested).
// Everything else (Float32 samples, SampleFormat 3, the GeoKey directory,
// GDAL_NODATA, one uncompressed strip, big-endian) the writer does itself.

/** The value written for NaN cells, outside every variable's natural range. */
export const NODATA_VALUE = -9999;

const GDAL_METADATA_TAG = 42112;
/** geotiff's writer reserves this many bytes for the header (its numBytesInIfd). */
export const HEADER_BLOCK_BYTES = 1000;

let registered = false;
function registerGdalMetadata(): void {
  if (registered) return;
  // geotiff's writer looks a tag's TIFF type up in this table; GDAL_METADATA is missing from it.
  (globals.fieldTagTypes as unknown as Record<number, string>)[GDAL_METADATA_TAG] = "ASCII";
  registered = true;
}

const ASCII = /^[\x20-\x7e\n]*$/;
function ascii(s: string, what: string): string {
  if (!ASCII.test(s)) throw new RangeError(`${what} must be printable ASCII for a TIFF tag: ${JSON.stringify(s)}`);
  return s;
}

const xml = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");

/** The GDAL_METADATA XML: dataset items, then band 0's unit and description. */
export function gdalMetadataXml(p: SurfacePlane): string {
  const { meta } = p;
  const items: [string, string][] = [
    ["EDITION", meta.editionId],
    ["VARIABLE", meta.variable],
    ["PERIOD", meta.period === 0 ? "annual" : String(meta.period)],
    ["PLANE", meta.plane],
    ["UNITS", unitsAscii(meta)],
    ["LICENCE", DATA_LICENCE.id],
  ];
  if (meta.isDemo) items.push(["NOTE", SYNTHETIC_LABEL]);
  const body = items.map(([k, v]) => `<Item name="${k}">${xml(v)}</Item>`).join("");
  const band = `<Item name="DESCRIPTION" sample="0" role="description">${xml(`${meta.variable} ${meta.plane}`)}</Item><Item name="UNITS" sample="0" role="unittype">${xml(
    unitsAscii(meta),
  )}</Item>`;
  return ascii(`<GDALMetadata>${body}${band}</GDALMetadata>`, "GDAL metadata");
}

/** Write the plane as a GeoTIFF; returns the file's bytes. */
export function surfaceToGeoTiff(p: SurfacePlane): Uint8Array {
  checkPlane(p);
  ascii(p.meta.editionId, "editionId");
  registerGdalMetadata();
  const { lon0, lat0, dLon, dLat, nx, ny } = p.grid;
  const values = new Float32Array(p.values.length);
  for (let i = 0; i < values.length; i++) {
    const v = p.values[i];
    values[i] = Number.isNaN(v) ? NODATA_VALUE : v;
  }
  // Tag names the writer maps to TIFF codes; those outside its typed options are cast below.
  const metadata = {
    width: nx,
    height: ny,
    BitsPerSample: [32],
    SampleFormat: [3], // IEEE floating point
    SamplesPerPixel: 1,
    PhotometricInterpretation: 1, // BlackIsZero
    ModelPixelScale: [dLon, dLat, 0],
    ModelTiepoint: [0, 0, 0, lon0 - dLon / 2, lat0 + dLat / 2, 0],
    GTModelTypeGeoKey: 2, // ModelTypeGeographic
    GTRasterTypeGeoKey: 1, // RasterPixelIsArea
    GeographicTypeGeoKey: 4326, // WGS 84
    GeogCitationGeoKey: "WGS 84",
    GeogAngularUnitsGeoKey: 9102, // degree
    GDAL_NODATA: String(NODATA_VALUE),
    Copyright: ascii(`${DATA_LICENCE.shortName} ${DATA_LICENCE.url}`, "copyright"),
    GDAL_METADATA: gdalMetadataXml(p),
  };
  const out = new Uint8Array(writeArrayBuffer(values, metadata as unknown as Parameters<typeof writeArrayBuffer>[1]));
  checkHeaderFits(out);
  return out;
}

const TYPE_BYTES: Record<number, number> = { 1: 1, 2: 1, 3: 2, 4: 4, 5: 8, 6: 1, 7: 1, 8: 2, 9: 4, 10: 8, 11: 4, 12: 8 };

/**
 * Bytes the first directory of a big-endian TIFF written by geotiff takes,
 * from the file start to the end of its last out-of-line tag value.
 */
export function headerBytes(tiff: Uint8Array): number {
  const view = new DataView(tiff.buffer, tiff.byteOffset, tiff.byteLength);
  if (view.getUint16(0) !== 0x4d4d || view.getUint16(2) !== 42) throw new Error("not a big-endian TIFF");
  const ifd = view.getUint32(4);
  const n = view.getUint16(ifd);
  let end = ifd + 2 + 12 * n + 4;
  for (let i = 0; i < n; i++) {
    const e = ifd + 2 + 12 * i;
    const bytes = (TYPE_BYTES[view.getUint16(e + 2)] ?? 1) * view.getUint32(e + 4);
    if (bytes > 4) end = Math.max(end, view.getUint32(e + 8) + bytes);
  }
  return end;
}

/** Refuse a file whose header did not fit in the writer's fixed block (its tags would be cut off). */
export function checkHeaderFits(tiff: Uint8Array): void {
  const end = headerBytes(tiff);
  if (end > HEADER_BLOCK_BYTES)
    throw new Error(`GeoTIFF header needs ${end} bytes, more than the ${HEADER_BLOCK_BYTES} the geotiff writer reserves: shorten the tags`);
}
