import { route } from "@/lib/http/route";
import { mapCacheControl, legendQuery, mapLegend } from "@/lib/map/data";

export const dynamic = "force-dynamic";
export const runtime = "nodejs";

/** The legend of one map layer: ramp colours, range, ticks, units, extrapolation style. Open to everyone. */
export const GET = route({ auth: "public", anonymous: true, query: legendQuery }, async ({ query }) =>
  Response.json(await mapLegend(query), { headers: { "Cache-Control": mapCacheControl(query.edition) } }),
);
