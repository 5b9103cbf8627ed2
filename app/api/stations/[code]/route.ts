import { route } from "@/lib/http/route";
import { auditFor, stationForViewer } from "@/lib/intake/stations";

// GET: a station's registry record and audit trail — its owner and moderators only (others 404).
export const GET = route({ auth: {} }, async ({ viewer, params }) => {
  const station = await stationForViewer(viewer, String(params.code));
  const audit = await auditFor([{ type: "station", ids: [station.id] }]);
  return Response.json({ station, audit });
});
