// lib/geo: land geometry for Rainprint — pure TypeScript over the bundled Natural Earth
// outlines (no framework, no database). Usable from route handlers, scripts, the worker
// and tests. See DEVELOPERS.md, "Land geometry".

export { isOnLand, landMask, globalGrid, cellCentre, MAX_MASK_CELLS, type LonLatGrid } from "./mask";
export { distanceToCoastKm } from "./coast";
export { landGeoJSON, coastlines, coastlinesGeoJSON, rawLand, LAND_SOURCE, type LandDetail } from "./land";
export { splitRing, splitPolygon, ringToCoastLines, type LonLat } from "./antimeridian";
export { greatCircleKm, wrapLon, lonDelta, EARTH_RADIUS_KM } from "./sphere";
