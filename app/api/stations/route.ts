import { z } from "zod";
import { route } from "@/lib/http/route";
import { stationInput } from "@/lib/intake/schemas";
import { isModerator, listPendingStations, listStationsOf, registerStation } from "@/lib/intake/stations";
import { errors } from "@/lib/errors";

// GET: the viewer's own stations (moderators: `?status=pending` lists every station waiting for a decision).
export const GET = route({ auth: {}, query: z.object({ status: z.enum(["pending"]).optional() }) }, async ({ viewer, query }) => {
  if (query.status === "pending") {
    if (!isModerator(viewer)) throw errors.forbidden("Only moderators see every pending station.");
    const rows = await listPendingStations();
    return Response.json({ stations: rows.map((r) => ({ ...r.station, ownerName: r.ownerName ?? r.ownerEmail })) });
  }
  return Response.json({ stations: await listStationsOf(viewer.id) });
});

// POST: register a station (it waits for a moderator).
export const POST = route({ auth: {}, body: stationInput }, async ({ viewer, body }) => {
  const { station, checks } = await registerStation(viewer, body);
  return Response.json({ station, checks, message: `Station ${station.code} is registered and waits for a moderator's approval.` }, { status: 201 });
});
