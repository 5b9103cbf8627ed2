import { requireDownload } from "@/lib/downloads/access";
import { stationDataChunks, stationDataFileName, stationDataQuery, type StationDataFormat, type StationDataset } from "@/lib/downloads/station-data";
import { chunksToStream, downloadHeaders } from "@/lib/downloads/stream";
import { errors } from "@/lib/errors";
import { route } from "@/lib/http/route";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

const FILES: Record<string, { dataset: StationDataset; format: StationDataFormat }> = {
  "samples.csv": { dataset: "samples", format: "csv" },
  "samples.geojson": { dataset: "samples", format: "geojson" },
  "station-means.csv": { dataset: "station-means", format: "csv" },
  "station-means.geojson": { dataset: "station-means", format: "geojson" },
};

/**
 * Accepted station data as a streamed file. Signed-in viewers whose plan
 * includes station data downloads (lib/downloads/access.ts decides); the
 * query may narrow it (`stations`, `from`, `to`, `bbox`).
 */
export const GET = route({ auth: {} }, async ({ req, viewer, params }) => {
  requireDownload(viewer, "station-data");
  const spec = FILES[String(params.file)];
  if (!spec) throw errors.notFound(`There is no station data file called “${String(params.file)}”. Choose one of: ${Object.keys(FILES).join(", ")}.`);
  // Empty fields of the downloads form arrive as `name=`; they mean "no filter".
  const filter = stationDataQuery.parse(Object.fromEntries([...new URL(req.url).searchParams].filter(([, v]) => v.trim() !== "")));
  const now = new Date();
  return new Response(chunksToStream(stationDataChunks(spec.dataset, spec.format, filter, now)), {
    headers: downloadHeaders(stationDataFileName(spec.dataset, spec.format, now), spec.format),
  });
});
