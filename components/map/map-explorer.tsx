"use client";

import { MapboxOverlay } from "@deck.gl/mapbox";
import { ScatterplotLayer } from "@deck.gl/layers";
import * as maplibregl from "maplibre-gl";
import "maplibre-gl/dist/maplibre-gl.css";
import { useCallback, useEffect, useId, useMemo, useRef, useState } from "react";
import { DemoLabel } from "@/components/demo-label";
import { layerKey, MAP_VARIABLES, periodLabel, VARIABLE_LABELS, type LayerKind, type MapVariable } from "@/lib/tiles/layers";
import { decimalsFor, num } from "./format";
import { MapLegend, type LegendData } from "./legend";
import { ReadoutPanel, type ReadoutData } from "./readout-panel";

// The public map: maplibre-gl draws a local basemap (bundled land outlines, fixed at ±180°)
// and the surface as a raster source of our own tiles; deck.gl draws the stations on top.
// Every control is a labelled form element; the readout panel is an aria-live region.

export interface MapEdition {
  id: string;
  isDemo: boolean;
  publishedAt: string | null;
  withdrawn: boolean;
  withdrawnReason: string | null;
}

export interface MapSelection {
  edition: string;
  variable: MapVariable;
  kind: LayerKind;
  period: number;
}

type StationFeature = {
  geometry: { coordinates: [number, number] };
  properties: { code: string; name: string; elevationM: number; included: boolean; synthetic: boolean } & Record<MapVariable, number | null>;
};

const SELECTABLE: readonly MapVariable[] = MAP_VARIABLES.filter((v) => v !== "precipMm");
const PERIODS = Array.from({ length: 13 }, (_, p) => p);

/** The tile address template (braces must stay unencoded: maplibre fills them in). */
export function tileTemplate(s: MapSelection): string {
  return `/api/tiles/${encodeURIComponent(s.edition)}/${layerKey(s.variable, s.kind)}/${s.period}/{z}/{x}/{y}.png`;
}

function hexToRgb(hex: string): [number, number, number] {
  return [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16)) as [number, number, number];
}

function stationColour(legend: LegendData | null, v: number | null): [number, number, number, number] {
  if (!legend || legend.kind === "sd" || v === null) return [255, 255, 255, 230];
  const t = Math.min(1, Math.max(0, (v - legend.min) / (legend.max - legend.min)));
  return [...hexToRgb(legend.stops[Math.round(t * (legend.stops.length - 1))]), 255];
}

export default function MapExplorer({ editions, initial }: { editions: MapEdition[]; initial: MapSelection }) {
  const [sel, setSel] = useState<MapSelection>(initial);
  // Fetched results remember the request they answer; "loading" = the answer is for another request.
  const [legendState, setLegendState] = useState<{ key: string; data: LegendData | null } | null>(null);
  const [stations, setStations] = useState<StationFeature[]>([]);
  const [point, setPoint] = useState<{ lat: number; lon: number } | null>(null);
  const [readoutState, setReadoutState] = useState<{ key: string; data: ReadoutData | null; error: string | null } | null>(null);
  const [inputError, setInputError] = useState<string | null>(null);
  const [mapReady, setMapReady] = useState(false);
  const container = useRef<HTMLDivElement>(null);
  const mapRef = useRef<maplibregl.Map | null>(null);
  const overlayRef = useRef<MapboxOverlay | null>(null);
  const markerRef = useRef<maplibregl.Marker | null>(null);
  const ids = { edition: useId(), period: useId(), lat: useId(), lon: useId() };
  const edition = editions.find((e) => e.id === sel.edition) ?? editions[0];
  const template = tileTemplate(sel);
  const legendKey = new URLSearchParams({ edition: sel.edition, layer: layerKey(sel.variable, sel.kind), period: String(sel.period) }).toString();
  const legend = legendState?.key === legendKey ? legendState.data : null;
  const legendLoading = legendState?.key !== legendKey;
  const readoutKey = point
    ? new URLSearchParams({ edition: sel.edition, period: String(sel.period), lat: point.lat.toFixed(5), lon: point.lon.toFixed(5) }).toString()
    : null;
  const readoutLoading = readoutKey !== null && readoutState?.key !== readoutKey;
  const readout = !readoutLoading ? (readoutState?.data ?? null) : null;
  const readoutError = inputError ?? (!readoutLoading ? (readoutState?.error ?? null) : null);

  // Keep the address shareable: /map?edition=…&layer=…&period=…
  useEffect(() => {
    const q = new URLSearchParams({ edition: sel.edition, layer: layerKey(sel.variable, sel.kind), period: String(sel.period) });
    window.history.replaceState(null, "", `${window.location.pathname}?${q}`);
  }, [sel]);

  // The map, once.
  useEffect(() => {
    if (!container.current) return;
    maplibregl.setWorkerUrl(new URL("maplibre-gl/dist/maplibre-gl-worker.mjs", import.meta.url).href);
    const map = new maplibregl.Map({
      container: container.current,
      style: {
        version: 8,
        sources: {
          land: { type: "geojson", data: "/api/map/land", attribution: "Land: Natural Earth (public domain)" },
          surface: { type: "raster", tiles: [window.location.origin + template], tileSize: 256, maxzoom: 12, attribution: "Rainprint" },
        },
        layers: [
          { id: "ocean", type: "background", paint: { "background-color": "#dde6ec" } },
          { id: "land", type: "fill", source: "land", paint: { "fill-color": "#f1f2ee" } },
          { id: "surface", type: "raster", source: "surface", paint: { "raster-resampling": "nearest", "raster-fade-duration": 0 } },
          { id: "coast", type: "line", source: "land", paint: { "line-color": "#4f5b6b", "line-width": 0.6 } },
        ],
      },
      center: [10, 20],
      zoom: 0.8,
      minZoom: 0,
      maxZoom: 9,
      renderWorldCopies: false,
      maxBounds: [
        [-180, -85],
        [180, 85],
      ],
      dragRotate: false,
      pitchWithRotate: false,
      attributionControl: { compact: true },
    });
    map.touchZoomRotate.disableRotation();
    map.keyboard.disableRotation();
    map.addControl(new maplibregl.NavigationControl({ showCompass: false }), "top-right");
    const overlay = new MapboxOverlay({ interleaved: false, layers: [] });
    map.addControl(overlay as unknown as maplibregl.IControl);
    map.on("click", (e) => {
      setInputError(null);
      setPoint({ lat: e.lngLat.lat, lon: e.lngLat.lng });
    });
    map.on("load", () => setMapReady(true));
    map.getCanvas().setAttribute("aria-label", "Map of the surface. Arrow keys pan, plus and minus zoom; use the form beside the map to read a point.");
    mapRef.current = map;
    overlayRef.current = overlay;
    return () => {
      map.remove();
      mapRef.current = null;
      overlayRef.current = null;
    };
    // The first template only; later changes go through setTiles below.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, []);

  // New tiles when the layer, period or edition changes.
  useEffect(() => {
    const map = mapRef.current;
    if (!map || !mapReady) return;
    const source = map.getSource("surface") as maplibregl.RasterTileSource | undefined;
    source?.setTiles([window.location.origin + template]);
  }, [template, mapReady]);

  // The legend of the layer.
  useEffect(() => {
    let gone = false;
    fetch(`/api/map/legend?${legendKey}`)
      .then(async (r) => (r.ok ? ((await r.json()) as LegendData) : null))
      .catch(() => null)
      .then((data) => {
        if (!gone) setLegendState({ key: legendKey, data });
      });
    return () => {
      gone = true;
    };
  }, [legendKey]);

  // The stations with their means for the period.
  useEffect(() => {
    let gone = false;
    fetch(`/api/map/stations?${new URLSearchParams({ edition: sel.edition, period: String(sel.period) })}`)
      .then(async (r) => (r.ok ? ((await r.json()) as { features: StationFeature[] }).features : []))
      .catch(() => [])
      .then((f) => {
        if (!gone) setStations(f);
      });
    return () => {
      gone = true;
    };
  }, [sel.edition, sel.period]);

  // The station layer (deck.gl), coloured by the chosen variable's mean on the legend's ramp.
  const stationLayer = useMemo(
    () =>
      new ScatterplotLayer<StationFeature>({
        id: "stations",
        data: stations,
        pickable: true,
        stroked: true,
        filled: true,
        radiusUnits: "pixels",
        getRadius: (f) => (f.properties.included ? 5 : 3.5),
        getPosition: (f) => f.geometry.coordinates,
        getFillColor: (f) => (f.properties.included ? stationColour(legend, f.properties[sel.variable]) : [0, 0, 0, 0]),
        getLineColor: (f) => (f.properties.included ? [21, 27, 37, 255] : [86, 103, 125, 255]),
        lineWidthUnits: "pixels",
        getLineWidth: 1.2,
        updateTriggers: { getFillColor: [legend, sel.variable] },
      }),
    [stations, legend, sel.variable],
  );

  useEffect(() => {
    overlayRef.current?.setProps({
      layers: [stationLayer],
      getTooltip: ({ object }: { object?: StationFeature | null }) => {
        if (!object) return null;
        const p = object.properties;
        const label = VARIABLE_LABELS[sel.variable];
        const v = p[sel.variable];
        const mean = v === null ? "no mean" : `${num(v, decimalsFor(sel.variable))} ${sel.variable === "precipMm" ? "mm" : "‰"}`;
        return {
          text: `${p.name} (${p.code}), ${p.elevationM} m\n${periodLabel(sel.period)} mean ${label}: ${mean}${p.included ? "" : "\nnot used for this period (too little coverage)"}${p.synthetic ? "\nsynthetic demo data" : ""}`,
        };
      },
    });
  }, [stationLayer, sel.variable, sel.period]);

  // The readout for the chosen point.
  useEffect(() => {
    if (!readoutKey) return;
    let gone = false;
    fetch(`/api/map/readout?${readoutKey}`)
      .then(async (r) => {
        const body = await r.json();
        if (!r.ok) throw new Error((body as { detail?: string }).detail ?? "The value could not be read.");
        return body as ReadoutData;
      })
      .then(
        (data) => !gone && setReadoutState({ key: readoutKey, data, error: null }),
        (e: Error) => !gone && setReadoutState({ key: readoutKey, data: null, error: e.message }),
      );
    return () => {
      gone = true;
    };
  }, [readoutKey]);

  // A pin where the value was read.
  useEffect(() => {
    const map = mapRef.current;
    if (!map || !point) return;
    markerRef.current ??= new maplibregl.Marker({ color: "#16454b" });
    markerRef.current.setLngLat([point.lon, point.lat]).addTo(map);
  }, [point]);

  const readTypedPoint = useCallback((form: HTMLFormElement) => {
    const data = new FormData(form);
    const lat = Number(data.get("lat"));
    const lon = Number(data.get("lon"));
    const latText = String(data.get("lat") ?? "").trim();
    const lonText = String(data.get("lon") ?? "").trim();
    if (!latText || !lonText || !Number.isFinite(lat) || lat < -90 || lat > 90 || !Number.isFinite(lon) || lon < -180 || lon > 180) {
      setInputError("Enter a latitude from −90 to 90 and a longitude from −180 to 180, in decimal degrees.");
      return;
    }
    setInputError(null);
    setPoint({ lat, lon });
  }, []);

  const set = (patch: Partial<MapSelection>) => setSel((s) => ({ ...s, ...patch }));

  return (
    <div className="flex flex-col gap-4">
      <form className="flex flex-wrap items-end gap-x-6 gap-y-3 rounded-md border border-ink-200 bg-white p-3" onSubmit={(e) => e.preventDefault()} aria-label="Map layers">
        <div className="flex flex-col gap-1">
          <label htmlFor={ids.edition} className="text-sm font-medium">
            Edition
          </label>
          <select id={ids.edition} className="rounded border border-ink-300 px-2 py-1" value={sel.edition} onChange={(e) => set({ edition: e.target.value })}>
            {editions.map((e, i) => (
              <option key={e.id} value={e.id}>
                {e.id}
                {i === 0 && !e.withdrawn ? " (current)" : ""}
                {e.withdrawn ? " (withdrawn)" : ""}
              </option>
            ))}
          </select>
        </div>
        <fieldset className="flex flex-col gap-1">
          <legend className="text-sm font-medium">Variable</legend>
          <div className="flex gap-3">
            {SELECTABLE.map((v) => (
              <label key={v} className="flex items-center gap-1">
                <input type="radio" name="variable" value={v} checked={sel.variable === v} onChange={() => set({ variable: v })} />
                {VARIABLE_LABELS[v]}
              </label>
            ))}
          </div>
        </fieldset>
        <fieldset className="flex flex-col gap-1">
          <legend className="text-sm font-medium">Show</legend>
          <div className="flex gap-3">
            <label className="flex items-center gap-1">
              <input type="radio" name="kind" value="value" checked={sel.kind === "value"} onChange={() => set({ kind: "value" })} />
              Predicted value
            </label>
            <label className="flex items-center gap-1">
              <input type="radio" name="kind" value="sd" checked={sel.kind === "sd"} onChange={() => set({ kind: "sd" })} />
              Uncertainty (1 sd)
            </label>
          </div>
        </fieldset>
        <div className="flex flex-col gap-1">
          <label htmlFor={ids.period} className="text-sm font-medium">
            Period
          </label>
          <select id={ids.period} className="rounded border border-ink-300 px-2 py-1" value={sel.period} onChange={(e) => set({ period: Number(e.target.value) })}>
            {PERIODS.map((p) => (
              <option key={p} value={p}>
                {periodLabel(p)}
              </option>
            ))}
          </select>
        </div>
        {edition?.publishedAt ? (
          <p className="text-sm text-ink-600">
            Published {new Date(edition.publishedAt).toLocaleDateString("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" })}
          </p>
        ) : null}
        {edition?.isDemo ? <DemoLabel what="every station and surface in this edition" /> : null}
        {edition?.withdrawn ? (
          <p role="note" className="w-full rounded border border-severity-warn/50 bg-amber-50 p-2 text-sm text-ink-800" data-testid="withdrawn-note">
            <strong>This edition was withdrawn.</strong> It stays here so that work citing it can be checked
            {edition.withdrawnReason ? `; the reason given: ${edition.withdrawnReason}` : ""}. Use the current edition for new work.
          </p>
        ) : null}
      </form>

      <div className="grid gap-4 lg:grid-cols-[1fr_20rem]">
        <div className="relative h-[34rem] overflow-hidden rounded-md border border-ink-200">
          <div ref={container} className="h-full w-full" data-testid="map-canvas" data-tiles={template} data-ready={mapReady ? "true" : "false"} data-stations={stations.length} />
          <div className="pointer-events-none absolute bottom-2 left-2 z-10">
            <div className="pointer-events-auto">
              <MapLegend legend={legend} loading={legendLoading} />
            </div>
          </div>
        </div>
        <aside aria-labelledby="readout-heading" className="flex flex-col gap-3 rounded-md border border-ink-200 bg-white p-4">
          <h2 id="readout-heading" className="text-lg font-semibold">
            Value at a point
          </h2>
          <div aria-live="polite" aria-atomic="false">
            <ReadoutPanel readout={readout} variable={sel.variable} error={readoutError} loading={readoutLoading} />
          </div>
          <form
            className="mt-auto flex flex-wrap items-end gap-2 border-t border-ink-100 pt-3"
            onSubmit={(e) => {
              e.preventDefault();
              readTypedPoint(e.currentTarget);
            }}
          >
            <div className="flex flex-col">
              <label htmlFor={ids.lat} className="text-xs font-medium">
                Latitude
              </label>
              <input id={ids.lat} name="lat" inputMode="decimal" className="w-24 rounded border border-ink-300 px-2 py-1" placeholder="47.37" />
            </div>
            <div className="flex flex-col">
              <label htmlFor={ids.lon} className="text-xs font-medium">
                Longitude
              </label>
              <input id={ids.lon} name="lon" inputMode="decimal" className="w-24 rounded border border-ink-300 px-2 py-1" placeholder="8.54" />
            </div>
            <button type="submit" className="rounded border border-ink-300 bg-white px-3 py-1 font-medium hover:bg-ink-50">
              Read value
            </button>
          </form>
        </aside>
      </div>
    </div>
  );
}
