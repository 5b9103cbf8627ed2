import { z } from "zod";
import { readBodyLimited } from "@/lib/http/body";
import { route } from "@/lib/http/route";
import { MAX_ELEVATION_BYTES, parseElevationGeoTiff, saveElevationModel } from "@/lib/editions/elevation-models";

const query = z.strictObject({ name: z.string().trim().min(1, "Give the model a name.").max(120, "At most 120 characters.") });

/** Upload an elevation model: the GeoTIFF file as the request body (admins); it becomes the active model. */
export const POST = route({ auth: { roles: ["admin"] }, query }, async ({ req, query, viewer }) => {
  const bytes = await readBodyLimited(req, MAX_ELEVATION_BYTES);
  const parsed = await parseElevationGeoTiff(bytes);
  const { id } = await saveElevationModel(query.name, parsed, viewer.id);
  return Response.json({ id, grid: parsed.grid, cells: parsed.cells }, { status: 201 });
});
