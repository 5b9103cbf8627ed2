import { z } from "zod";
import { WATER_LINE_METHODS } from "@/lib/isotopes";
import { route } from "@/lib/http/route";
import { publicStationData } from "@/lib/intake/public-station";

// GET: an approved station's accepted δ pairs and its water line by the chosen method (public).
export const GET = route({ auth: "public", anonymous: true, query: z.object({ method: z.enum(WATER_LINE_METHODS).default("ols") }) }, async ({ params, query }) => {
  const data = await publicStationData(String(params.code), query.method);
  return Response.json(data, { headers: { "Cache-Control": "no-store" } });
});
