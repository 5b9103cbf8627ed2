import { route } from "@/lib/http/route";
import { landGeoJSON, LAND_SOURCE } from "@/lib/geo";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

let body: string | null = null;

/**
 * The map's basemap: the bundled 1:50m land outlines (antimeridian-safe, lib/geo) as GeoJSON,
 * coordinates rounded to 0.01° (~1 km, far below a 0.25° surface cell). Open to everyone.
 */
export const GET = route({ auth: "public", anonymous: true }, async () => {
  body ??= JSON.stringify({ ...landGeoJSON({ detail: "50m" }), source: LAND_SOURCE }, (_k, v) => (typeof v === "number" ? Math.round(v * 100) / 100 : v));
  return new Response(body, { headers: { "Content-Type": "application/geo+json", "Cache-Control": "public, max-age=86400" } });
});
