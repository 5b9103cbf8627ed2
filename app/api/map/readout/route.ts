import { route } from "@/lib/http/route";
import { mapCacheControl, mapReadout, readoutQuery } from "@/lib/map/data";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/**
 * The value of each surface at the grid cell holding a point, ± 95% interval, with the
 * extrapolation flag (the map's click readout). Open to everyone; the full site lookup with
 * elevation and the water line is /lookup.
 */
export const GET = route({ auth: "public", anonymous: true, query: readoutQuery }, async ({ query }) =>
  Response.json(await mapReadout(query), { headers: { "Cache-Control": mapCacheControl(query.edition) } }),
);
