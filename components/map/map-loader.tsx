"use client";

import dynamic from "next/dynamic";
import type { MapEdition, MapSelection } from "./map-explorer";

// maplibre-gl and deck.gl need a browser: load the explorer on the client only.
const MapExplorer = dynamic(() => import("./map-explorer"), {
  ssr: false,
  loading: () => <p className="rounded-md border border-ink-200 bg-white p-6 text-ink-700">Loading the map…</p>,
});

export function MapLoader(props: { editions: MapEdition[]; initial: MapSelection }) {
  return <MapExplorer {...props} />;
}
