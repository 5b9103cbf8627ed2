import { csvRow, fixed, sig } from "./csv";
import { DATA_LICENCE, SYNTHETIC_LABEL } from "./licence";
import { checkPlane, periodText, unitsAscii, valueColumn, variableLabel, type SurfacePlane } from "./surface";

// An edition surface plane → CSV, one row per cell with a value:
//   lon, lat (the cell centre, WGS84 degrees), the value (column named after
//   the variable and its units), and `notice` — filled on the first data row
//   only — naming the edition, variable, period, units, grid, the licence and
//   the synthetic-demo-data label. One text cell in its own column: every
//   spreadsheet and CSV reader opens the file without options, and the notice
//   stays with the data. Cells without a value (NaN) are left out.
// Written in chunks (a generator) so a route can stream a global grid.

export function surfaceNotice(p: SurfacePlane): string {
  const m = p.meta;
  const g = p.grid;
  return [
    `Rainprint edition ${m.editionId}`,
    `${variableLabel(m.variable)}, ${periodText(m.period)}, ${m.plane === "variance" ? "kriging variance" : "predicted value"} in ${unitsAscii(m)}`,
    `cell centres in WGS84 degrees on a ${g.dLon} x ${g.dLat} degree grid (${g.nx} x ${g.ny} cells); cells without a value are left out`,
    `licence ${DATA_LICENCE.shortName} (${DATA_LICENCE.url}); credit Rainprint and the contributing stations`,
    ...(m.isDemo ? [`${SYNTHETIC_LABEL}: invented for demonstration, not real measurements`] : []),
  ].join("; ");
}

/** The CSV in chunks of about `rowsPerChunk` rows. */
export function* surfaceCsvChunks(p: SurfacePlane, rowsPerChunk = 4096): Generator<string> {
  checkPlane(p);
  const { lon0, lat0, dLon, dLat, nx, ny } = p.grid;
  let chunk = csvRow(["lon", "lat", valueColumn(p.meta), "notice"]);
  let rows = 0;
  let first = true;
  for (let r = 0; r < ny; r++) {
    const lat = fixed(lat0 - r * dLat, 6);
    for (let c = 0; c < nx; c++) {
      const v = p.values[r * nx + c];
      if (Number.isNaN(v)) continue;
      chunk += csvRow([fixed(lon0 + c * dLon, 6), lat, sig(v), first ? surfaceNotice(p) : null]);
      first = false;
      if (++rows % rowsPerChunk === 0) {
        yield chunk;
        chunk = "";
      }
    }
  }
  if (first) chunk += csvRow([null, null, null, surfaceNotice(p) + "; this surface has no cells with a value"]);
  if (chunk) yield chunk;
}

/** The whole CSV as one string (small grids, tests). */
export function surfaceToCsv(p: SurfacePlane): string {
  return [...surfaceCsvChunks(p)].join("");
}
