import { route } from "@/lib/http/route";
import { stationDecisionInput } from "@/lib/intake/schemas";
import { decideStation } from "@/lib/intake/stations";

// POST: approve, return or reject a new station (moderators). 409 when someone decided first.
export const POST = route({ auth: { roles: ["moderator", "admin"] }, body: stationDecisionInput }, async ({ viewer, body, params }) => {
  const station = await decideStation(viewer, String(params.code), body);
  return Response.json({ station, message: `Station ${station.code} is now ${station.status}.` });
});
