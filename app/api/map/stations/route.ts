import { route } from "@/lib/http/route";
import { mapCacheControl, mapStations, stationsQuery } from "@/lib/map/data";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** The stations of a public edition with their means for one period, as GeoJSON. Open to everyone. */
export const GET = route({ auth: "public", anonymous: true, query: stationsQuery }, async ({ query }) =>
  Response.json(await mapStations(query), { headers: { "Cache-Control": mapCacheControl(query.edition), "Content-Type": "application/geo+json" } }),
);
