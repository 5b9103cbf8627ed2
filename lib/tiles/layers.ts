import type { SurfaceVariable } from "@/db/schema";
import type { RampId } from "./ramps";

// The layers the map can draw, named by the key used in tile URLs:
//   "d18O", "d2H", "dExcess", "precipMm"            the predicted value
//   "d18O-sd", "d2H-sd", "dExcess-sd", "precipMm-sd" its uncertainty (kriging standard deviation, √variance)
// Pure and client-safe (no culori, no db): the map page imports it for its selectors.

export const MAP_VARIABLES = ["d18O", "d2H", "dExcess", "precipMm"] as const satisfies readonly SurfaceVariable[];
export type MapVariable = (typeof MAP_VARIABLES)[number];

export type LayerKind = "value" | "sd";

export const VARIABLE_LABELS: Record<MapVariable, string> = {
  d18O: "δ18O",
  d2H: "δ2H",
  dExcess: "d-excess",
  precipMm: "Precipitation",
};

export const VARIABLE_UNITS: Record<MapVariable, "‰" | "mm"> = { d18O: "‰", d2H: "‰", dExcess: "‰", precipMm: "mm" };

/** The value d-excess ramps are centred on: the global mean d-excess of precipitation, about +10‰ [trade]; Craig (1961) line intercept [pub]. */
export const D_EXCESS_CENTRE_PERMIL = 10;

export interface LayerSpec {
  /** URL key, e.g. "d18O" or "d18O-sd". */
  key: string;
  variable: MapVariable;
  kind: LayerKind;
  ramp: RampId;
  /** Legend title, e.g. "δ18O" or "Uncertainty of δ18O (1 standard deviation)". */
  title: string;
  units: "‰" | "mm";
  /** Diverging ramps: the value at the ramp's neutral centre. */
  centre: number | null;
}

export function layerKey(variable: MapVariable, kind: LayerKind): string {
  return kind === "sd" ? `${variable}-sd` : variable;
}

export function layerSpec(variable: MapVariable, kind: LayerKind): LayerSpec {
  const label = VARIABLE_LABELS[variable];
  if (kind === "sd")
    return { key: layerKey(variable, kind), variable, kind, ramp: "haze", title: `Uncertainty of ${label === "Precipitation" ? "precipitation" : label} (1 standard deviation)`, units: VARIABLE_UNITS[variable], centre: null };
  const ramp: RampId = variable === "dExcess" ? "moisture-source" : variable === "precipMm" ? "rainfall" : "meltwater";
  return { key: variable, variable, kind, ramp, title: label, units: VARIABLE_UNITS[variable], centre: variable === "dExcess" ? D_EXCESS_CENTRE_PERMIL : null };
}

/** "d18O-sd" → its spec; null for anything else. */
export function parseLayerKey(key: string): LayerSpec | null {
  const m = /^(d18O|d2H|dExcess|precipMm)(-sd)?$/.exec(key);
  if (!m) return null;
  return layerSpec(m[1] as MapVariable, m[2] ? "sd" : "value");
}

/** "annual" for 0, the month's name for 1–12. */
export function periodLabel(period: number): string {
  if (period === 0) return "Annual";
  return new Date(Date.UTC(2000, period - 1, 1)).toLocaleString("en-GB", { month: "long", timeZone: "UTC" });
}
