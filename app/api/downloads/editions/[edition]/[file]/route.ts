import { requireDownload } from "@/lib/downloads/access";
import { findPublishedEdition, parseSurfaceFile, readSurfacePlane } from "@/lib/downloads/editions";
import { surfaceToGeoTiff } from "@/lib/downloads/geotiff";
import { chunksToStream, downloadHeaders } from "@/lib/downloads/stream";
import { periodText, surfaceFileName } from "@/lib/downloads/surface";
import { surfaceCsvChunks } from "@/lib/downloads/surface-csv";
import { errors } from "@/lib/errors";
import { route } from "@/lib/http/route";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/**
 * One surface of a published edition as GeoTIFF (`d18O-annual.tif`) or CSV
 * (`d18O-m07.csv`). Signed-in viewers whose plan includes surface downloads.
 */
export const GET = route({ auth: {} }, async ({ viewer, params }) => {
  requireDownload(viewer, "surface");
  const editionId = String(params.edition);
  const file = parseSurfaceFile(String(params.file));
  if (!file)
    throw errors.notFound("Name the surface file like d18O-annual.tif or dExcess-m07.csv (variable d18O, dExcess, d2H or precipMm; annual or m01–m12; .tif or .csv).");
  const edition = await findPublishedEdition(editionId);
  if (!edition) throw errors.notFound(`There is no published edition “${editionId}”. The downloads page lists the published editions.`);
  const plane = await readSurfacePlane(edition.id, file.variable, file.period);
  if (!plane) throw errors.notFound(`Edition ${edition.id} has no ${file.variable} surface for ${periodText(file.period)}.`);
  if (file.format === "tif") {
    const bytes = surfaceToGeoTiff(plane);
    return new Response(bytes as unknown as BodyInit, {
      headers: downloadHeaders(surfaceFileName(plane.meta, "tif"), "tif", { "Content-Length": String(bytes.byteLength) }),
    });
  }
  return new Response(chunksToStream(surfaceCsvChunks(plane)), { headers: downloadHeaders(surfaceFileName(plane.meta, "csv"), "csv") });
});
