// Sanity checks on a station at registration. Refusals (a bad range, 0/0) live in the
// shared zod schema; these are the warnings a moderator and the contributor should see.
// Pure over the position and the nearby stations, so tests need no database.
import { distanceToCoastKm, greatCircleKm, isOnLand } from "@/lib/geo";

export type StationCheck = { code: string; severity: "note" | "warn"; message: string; values: Record<string, number | string | null> };

export type NearbyStation = { code: string; name: string; lat: number; lon: number; elevationM: number };

/** Another collector closer than this is probably the same site entered twice [trade]. */
export const NEAR_STATION_KM = 1;
/** On land but within this distance of the 1:50m coastline: check the position [trade]. */
export const COASTAL_KM = 2;
/** Stations this close with more elevation difference than ELEVATION_STEP_M are suspicious [trade]. */
export const ELEVATION_NEIGHBOUR_KM = 25;
export const ELEVATION_STEP_M = 2000;

export function stationEntryChecks(s: { lat: number; lon: number; elevationM: number }, nearby: readonly NearbyStation[]): StationCheck[] {
  const out: StationCheck[] = [];
  const onLand = isOnLand(s.lon, s.lat);
  const coastKm = distanceToCoastKm(s.lon, s.lat);
  if (!onLand) {
    out.push({
      code: "offshore",
      severity: "warn",
      message: `This position is at sea, ${coastKm.toFixed(1)} km from the nearest coast in Rainprint's land outlines (1:50m, small islands may be missing). Check the signs and decimals of the coordinates; if the collector is on a small island, pier or ship, say so in the notes.`,
      values: { coastKm: round(coastKm, 1) },
    });
    if (s.elevationM > 100)
      out.push({
        code: "elevation",
        severity: "warn",
        message: `An elevation of ${s.elevationM} m is unusual for a position at sea. Check the coordinates and the elevation.`,
        values: { elevationM: s.elevationM },
      });
  } else if (coastKm < COASTAL_KM) {
    out.push({
      code: "coastal",
      severity: "note",
      message: `This position is ${coastKm.toFixed(1)} km from the coast. Coastal collectors are welcome; check that the coordinates are precise enough.`,
      values: { coastKm: round(coastKm, 1) },
    });
  }
  if (s.elevationM < -30)
    out.push({
      code: "elevation",
      severity: "warn",
      message: `An elevation of ${s.elevationM} m is below sea level; only a few depressions on Earth are this low. Check the sign.`,
      values: { elevationM: s.elevationM },
    });
  if (s.elevationM > 5500)
    out.push({
      code: "elevation",
      severity: "warn",
      message: `An elevation of ${s.elevationM} m is higher than almost every permanent collector. Check that it is in metres, not feet.`,
      values: { elevationM: s.elevationM },
    });
  for (const n of nearby) {
    const km = greatCircleKm(s.lon, s.lat, n.lon, n.lat);
    if (km < NEAR_STATION_KM)
      out.push({
        code: "nearby-station",
        severity: "warn",
        message: `Station ${n.code} (${n.name}) is ${Math.round(km * 1000)} m away. If it is the same collector, submit samples to it instead of registering it again.`,
        values: { otherCode: n.code, distanceM: Math.round(km * 1000) },
      });
    else if (km < ELEVATION_NEIGHBOUR_KM && Math.abs(n.elevationM - s.elevationM) > ELEVATION_STEP_M)
      out.push({
        code: "elevation",
        severity: "warn",
        message: `Station ${n.code}, ${km.toFixed(1)} km away, is at ${n.elevationM} m; ${s.elevationM} m here is ${Math.round(Math.abs(n.elevationM - s.elevationM))} m different. Check the elevation (metres above sea level).`,
        values: { otherCode: n.code, otherElevationM: n.elevationM, distanceKm: round(km, 1) },
      });
  }
  return out;
}

function round(x: number, d: number): number {
  const f = 10 ** d;
  return Math.round(x * f) / f;
}
