import { z } from "zod";
import { route } from "@/lib/http/route";
import { setElevationModelActive } from "@/lib/editions/elevation-models";

/** Make an elevation model the active one, or stop using it (admins). */
export const PATCH = route({ auth: { roles: ["admin"] }, body: z.strictObject({ active: z.boolean() }) }, async ({ params, body }) => {
  await setElevationModelActive(String(params.id), body.active);
  return Response.json({ active: body.active });
});
