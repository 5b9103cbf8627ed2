import { route } from "@/lib/http/route";
import { stationCorrectionInput } from "@/lib/intake/schemas";
import { auditFor, correctStation, stationForViewer } from "@/lib/intake/stations";

// GET: a station's registry record and audit trail — its owner and moderators only (others 404).
export const GET = route({ auth: {} }, async ({ viewer, params }) => {
  const station = await stationForViewer(viewer, String(params.code));
  const audit = await auditFor([{ type: "station", ids: [station.id] }]);
  return Response.json({ station, audit });
});

// PATCH: the owner corrects a station returned for changes; it goes back to the moderators (others 404).
export const PATCH = route({ auth: {}, body: stationCorrectionInput }, async ({ viewer, body, params }) => {
  const { station, checks } = await correctStation(viewer, String(params.code), body);
  return Response.json({ station, checks, message: `Station ${station.code} is corrected and waits for a moderator again.` });
});
