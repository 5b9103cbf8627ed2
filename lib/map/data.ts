import "server-only";
import { z } from "zod";
import { getEditionStationMeans, type EditionRow } from "@/lib/editions/queries";
import { errors } from "@/lib/errors";
import { readSurfaceCell, readSurfaceWindow } from "@/lib/surfaces/store";
import { layerSpec, MAP_VARIABLES, parseLayerKey, periodLabel, VARIABLE_UNITS, type LayerSpec, type MapVariable } from "@/lib/tiles/layers";
import { EXTRAPOLATION_STYLE, RAMPS, rampStops } from "@/lib/tiles/ramps";
import { findPublicEdition, findSurface, layerScale } from "@/lib/tiles/service";

// What the map page asks for besides tiles: the legend of a layer, the stations with their
// means, and the value at a clicked point. All public, all from a public edition.

/** z-value of the two-sided 95% normal interval [trade]. */
export const Z95 = 1.959964;

export const SYNTHETIC_NOTE = "synthetic demo data: invented stations and samples, for trying Rainprint out — not real measurements.";

const editionParam = z.string().trim().min(1, "Name an edition, e.g. 2026.12.1").max(40);
const periodParam = z.coerce.number({ error: "The period is 0 (annual) or a month 1–12." }).int("The period is 0 (annual) or a month 1–12.").min(0, "The period is 0 (annual) or a month 1–12.").max(12, "The period is 0 (annual) or a month 1–12.");

export const legendQuery = z.strictObject({
  edition: editionParam,
  layer: z.string().max(20),
  period: periodParam.default(0),
});

export const stationsQuery = z.strictObject({ edition: editionParam, period: periodParam.default(0) });

export const readoutQuery = z.strictObject({
  edition: editionParam,
  period: periodParam.default(0),
  lat: z.coerce.number({ error: "lat is a latitude in degrees, −90 to 90." }).min(-90, "lat is a latitude in degrees, −90 to 90.").max(90, "lat is a latitude in degrees, −90 to 90."),
  lon: z.coerce.number({ error: "lon is a longitude in degrees, −180 to 180." }).min(-180, "lon is a longitude in degrees, −180 to 180.").max(180, "lon is a longitude in degrees, −180 to 180."),
});

async function publicEdition(id: string): Promise<EditionRow> {
  const edition = await findPublicEdition(id);
  if (!edition)
    throw errors.notFound(id === "current" ? "No edition has been published yet." : `There is no published edition “${id}”. The map lists the published editions.`);
  return edition;
}

/** Answers naming "current" may change with the next publication; answers naming an edition do not. */
export function mapCacheControl(editionParam: string): string {
  return editionParam === "current" ? "public, max-age=60" : "public, max-age=3600";
}

export interface MapLegend {
  edition: string;
  layer: string;
  variable: MapVariable;
  kind: LayerSpec["kind"];
  period: number;
  periodLabel: string;
  title: string;
  units: "‰" | "mm";
  ramp: { id: string; name: string; kind: "sequential" | "diverging" };
  min: number;
  max: number;
  centre: number | null;
  ticks: number[];
  /** Evenly spaced colours from min to max (#rrggbb). */
  stops: string[];
  extrapolation: { distanceKm: number | null; veil: number; ink: string; spacing: number };
  seaLevelEquivalent: boolean;
  note: string | null;
  synthetic: boolean;
}

export async function mapLegend(q: z.infer<typeof legendQuery>): Promise<MapLegend> {
  const spec = parseLayerKey(q.layer);
  if (!spec) throw errors.invalid(`There is no map layer “${q.layer}”. Layers: d18O, d2H, dExcess, precipMm, each also with -sd (e.g. d18O-sd).`, { layer: ["Unknown layer"] });
  const edition = await publicEdition(q.edition);
  const surface = await findSurface(edition.id, spec, q.period);
  const scale = surface ? await layerScale(edition.id, spec, q.period) : null;
  if (!surface || !scale) throw errors.notFound(`Edition ${edition.id} has no ${spec.variable} surface for ${periodLabel(q.period).toLowerCase()}.`);
  const ramp = RAMPS[scale.ramp];
  const [r, g, b] = EXTRAPOLATION_STYLE.ink;
  return {
    edition: edition.id,
    layer: spec.key,
    variable: spec.variable,
    kind: spec.kind,
    period: q.period,
    periodLabel: periodLabel(q.period),
    title: spec.title,
    units: spec.units,
    ramp: { id: ramp.id, name: ramp.name, kind: ramp.kind },
    min: scale.min,
    max: scale.max,
    centre: scale.centre,
    ticks: scale.ticks,
    stops: rampStops(scale.ramp, 32),
    extrapolation: {
      distanceKm: surface.stats?.extrapolation.distanceKm ?? null,
      veil: EXTRAPOLATION_STYLE.veil,
      ink: `rgb(${r}, ${g}, ${b})`,
      spacing: EXTRAPOLATION_STYLE.spacing,
    },
    seaLevelEquivalent: surface.stats?.seaLevelEquivalent ?? false,
    note: surface.stats?.note ?? null,
    synthetic: edition.isDemo,
  };
}

/** Stations of an edition with their means for one period, as GeoJSON (lon, lat order). */
export async function mapStations(q: z.infer<typeof stationsQuery>) {
  const edition = await publicEdition(q.edition);
  const means = await getEditionStationMeans(edition.id, q.period);
  const round = (v: number | null, d: number) => (v === null || !Number.isFinite(v) ? null : Number(v.toFixed(d)));
  return {
    type: "FeatureCollection" as const,
    edition: edition.id,
    period: q.period,
    synthetic: edition.isDemo,
    ...(edition.isDemo ? { notice: SYNTHETIC_NOTE } : {}),
    features: means.map((m) => ({
      type: "Feature" as const,
      geometry: { type: "Point" as const, coordinates: [m.lon, m.lat] },
      properties: {
        code: m.code,
        name: m.name,
        elevationM: m.elevationM,
        d18O: round(m.d18O, 2),
        d2H: round(m.d2H, 1),
        dExcess: round(m.dExcess, 1),
        precipMm: round(m.precipMm, 0),
        included: m.included,
        synthetic: m.isDemo,
      },
    })),
  };
}

export interface ReadoutValue {
  value: number;
  /** Kriging standard deviation √variance. */
  sd: number;
  /** value ± 1.96·sd (precipitation: never below 0). */
  lower: number;
  upper: number;
  units: "‰" | "mm";
  extrapolation: boolean;
}

export interface MapReadout {
  edition: string;
  period: number;
  periodLabel: string;
  lat: number;
  lon: number;
  /** Centre of the grid cell read. */
  cell: { lat: number; lon: number } | null;
  /** Per variable, null where the surface has no value (sea, outside the grid, not built). */
  values: Record<MapVariable, ReadoutValue | null>;
  extrapolation: boolean;
  extrapolationDistanceKm: number | null;
  seaLevelEquivalent: boolean;
  notes: string[];
  synthetic: boolean;
}

/** The surfaces' values at the grid cell holding a point, with 95% intervals from the kriging variance. */
export async function mapReadout(q: z.infer<typeof readoutQuery>): Promise<MapReadout> {
  const edition = await publicEdition(q.edition);
  const values = {} as Record<MapVariable, ReadoutValue | null>;
  let cell: MapReadout["cell"] = null;
  let seaLevelEquivalent = false;
  let distanceKm: number | null = null;
  const notes: string[] = [];
  for (const variable of MAP_VARIABLES) {
    values[variable] = null;
    const surface = await findSurface(edition.id, layerSpec(variable, "value"), q.period);
    if (!surface) continue;
    const g = surface.grid;
    const row = Math.round((g.lat0 - q.lat) / g.dLat);
    const col = Math.round((q.lon - g.lon0) / g.dLon);
    const value = await readSurfaceCell(surface.id, g, "value", row, col);
    if (!Number.isFinite(value)) continue;
    const variance = await readSurfaceCell(surface.id, g, "variance", row, col);
    const [extra] = await readSurfaceWindow(surface.id, g, "extrapolation", { col0: col, row0: row, cols: 1, rows: 1 });
    const sd = Math.sqrt(Math.max(0, variance));
    const lower = value - Z95 * sd;
    values[variable] = {
      value,
      sd,
      lower: variable === "precipMm" ? Math.max(0, lower) : lower,
      upper: value + Z95 * sd,
      units: VARIABLE_UNITS[variable],
      extrapolation: extra === 1,
    };
    cell ??= { lat: g.lat0 - row * g.dLat, lon: g.lon0 + col * g.dLon };
    seaLevelEquivalent ||= surface.stats?.seaLevelEquivalent ?? false;
    distanceKm ??= surface.stats?.extrapolation.distanceKm ?? null;
    if (surface.stats?.note && !notes.includes(surface.stats.note)) notes.push(surface.stats.note);
  }
  return {
    edition: edition.id,
    period: q.period,
    periodLabel: periodLabel(q.period),
    lat: q.lat,
    lon: q.lon,
    cell,
    values,
    extrapolation: MAP_VARIABLES.some((v) => values[v]?.extrapolation),
    extrapolationDistanceKm: distanceKm,
    seaLevelEquivalent,
    notes,
    synthetic: edition.isDemo,
  };
}
