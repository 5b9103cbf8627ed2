import { route } from "@/lib/http/route";
import { mapStations, stationsQuery } from "@/lib/map/data";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** The stations of a public edition with their means for one period, as GeoJSON. Open to everyone. */
export const GET = route({ auth: "public", anonymous: true, query: stationsQuery }, async ({ query }) =>
  Response.json(await mapStations(query), { headers: { "Cache-Control": "public, max-age=3600", "Content-Type": "application/geo+json" } }),
);
