// Where the synthetic demo stations go: four dense clusters (well-constrained surfaces)
// and sparse boxes on every inhabited continent (extrapolated areas between them).
// Boxes are [lonMin, lonMax, latMin, latMax] in degrees; lonMax may exceed 180 to run
// across the antimeridian (wrapped when a point is drawn).

import type { Continent } from "./types";

export interface RegionSpec {
  id: string;
  /** Plain description used in station notes. */
  label: string;
  continent: Continent;
  /** Stations in the full profile. */
  count: number;
  /** Minimum distance between stations placed here, km. */
  minSpacingKm: number;
  cluster?: { lon: number; lat: number; radiusKm: number };
  boxes?: [number, number, number, number][];
  /** Operating organisation keys (round-robin). */
  organizations: string[];
}

export const REGIONS: RegionSpec[] = [
  // ── dense clusters ──
  {
    id: "eur-alpine",
    label: "Central Europe and Alps cluster",
    continent: "europe",
    count: 52,
    minSpacingKm: 25,
    cluster: { lon: 10.5, lat: 47.0, radiusKm: 550 },
    organizations: ["tallowfen", "northmarch"],
  },
  {
    id: "nam-east",
    label: "Eastern North America cluster",
    continent: "north-america",
    count: 38,
    minSpacingKm: 30,
    cluster: { lon: -79.0, lat: 40.5, radiusKm: 650 },
    organizations: ["corrie-bay", "prairie-lantern"],
  },
  {
    id: "afr-east",
    label: "East African highlands cluster",
    continent: "africa",
    count: 28,
    minSpacingKm: 30,
    cluster: { lon: 37.5, lat: -1.0, radiusKm: 700 },
    organizations: ["rift-highland"],
  },
  {
    id: "oce-southeast",
    label: "Southeast Australia cluster",
    continent: "oceania",
    count: 24,
    minSpacingKm: 25,
    cluster: { lon: 146.5, lat: -35.5, radiusKm: 550 },
    organizations: ["southern-divide"],
  },
  // ── sparse: North America ──
  { id: "nam-west", label: "Western North America", continent: "north-america", count: 8, minSpacingKm: 150, boxes: [[-125, -104, 32, 55]], organizations: ["prairie-lantern"] },
  { id: "nam-plains", label: "North American plains", continent: "north-america", count: 3, minSpacingKm: 150, boxes: [[-104, -90, 30, 50]], organizations: ["prairie-lantern"] },
  { id: "nam-north", label: "Northern Canada and Alaska", continent: "north-america", count: 6, minSpacingKm: 250, boxes: [[-165, -60, 55, 72]], organizations: ["prairie-lantern"] },
  { id: "nam-south", label: "Mexico and Central America", continent: "north-america", count: 5, minSpacingKm: 150, boxes: [[-110, -80, 8, 30]], organizations: ["corrie-bay"] },
  { id: "nam-greenland", label: "Greenland", continent: "north-america", count: 1, minSpacingKm: 150, boxes: [[-55, -20, 60, 78]], organizations: ["northmarch"] },
  // ── sparse: South America ──
  { id: "sam-andes-north", label: "Northern Andes", continent: "south-america", count: 6, minSpacingKm: 120, boxes: [[-80, -66, -18, 11]], organizations: ["sierra-albar"] },
  { id: "sam-amazon", label: "Amazon basin", continent: "south-america", count: 6, minSpacingKm: 200, boxes: [[-70, -45, -15, 3]], organizations: ["sierra-albar"] },
  { id: "sam-southeast", label: "Southeastern South America", continent: "south-america", count: 6, minSpacingKm: 150, boxes: [[-58, -38, -34, -15]], organizations: ["sierra-albar"] },
  { id: "sam-south", label: "Southern Andes and Patagonia", continent: "south-america", count: 5, minSpacingKm: 150, boxes: [[-75, -63, -55, -35]], organizations: ["sierra-albar"] },
  // ── sparse: Europe ──
  { id: "eur-iberia", label: "Iberia", continent: "europe", count: 3, minSpacingKm: 150, boxes: [[-9.5, 3, 36, 44]], organizations: ["tallowfen"] },
  { id: "eur-north", label: "Northern Europe", continent: "europe", count: 4, minSpacingKm: 200, boxes: [[5, 30, 56, 70]], organizations: ["northmarch"] },
  { id: "eur-east", label: "Eastern Europe", continent: "europe", count: 4, minSpacingKm: 200, boxes: [[22, 45, 45, 60]], organizations: ["northmarch"] },
  { id: "eur-west", label: "British Isles", continent: "europe", count: 2, minSpacingKm: 150, boxes: [[-8, 2, 50.5, 58]], organizations: ["tallowfen"] },
  { id: "eur-south", label: "Balkans and Italy", continent: "europe", count: 2, minSpacingKm: 150, boxes: [[14, 28, 37, 44]], organizations: ["tallowfen"] },
  // ── sparse: Africa ──
  { id: "afr-west", label: "West Africa", continent: "africa", count: 5, minSpacingKm: 200, boxes: [[-17, 10, 5, 15]], organizations: ["savanna-edge"] },
  { id: "afr-north", label: "Sahara and Maghreb", continent: "africa", count: 4, minSpacingKm: 300, boxes: [[-10, 32, 16, 36]], organizations: ["dryland-springs"] },
  { id: "afr-central", label: "Central Africa", continent: "africa", count: 3, minSpacingKm: 250, boxes: [[10, 30, -10, 5]], organizations: ["savanna-edge"] },
  { id: "afr-south", label: "Southern Africa", continent: "africa", count: 5, minSpacingKm: 200, boxes: [[15, 33, -34, -17]], organizations: ["savanna-edge"] },
  { id: "afr-madagascar", label: "Madagascar", continent: "africa", count: 1, minSpacingKm: 150, boxes: [[43, 50.5, -25.5, -12]], organizations: ["savanna-edge"] },
  // ── sparse: Asia ──
  { id: "asi-siberia", label: "Siberia", continent: "asia", count: 6, minSpacingKm: 400, boxes: [[60, 140, 50, 72]], organizations: ["steppe-taiga"] },
  { id: "asi-chukotka", label: "Chukotka (across the antimeridian)", continent: "asia", count: 1, minSpacingKm: 150, boxes: [[180.5, 188, 64.5, 68.5]], organizations: ["steppe-taiga"] },
  { id: "asi-central", label: "Central Asia", continent: "asia", count: 5, minSpacingKm: 300, boxes: [[55, 90, 37, 50]], organizations: ["steppe-taiga"] },
  { id: "asi-tibet", label: "Tibetan plateau", continent: "asia", count: 3, minSpacingKm: 250, boxes: [[82, 97, 30.5, 35]], organizations: ["greywacke"] },
  { id: "asi-east", label: "East Asia", continent: "asia", count: 7, minSpacingKm: 250, boxes: [[100, 122, 22, 42]], organizations: ["monsoon-margin"] },
  { id: "asi-south", label: "South Asia", continent: "asia", count: 6, minSpacingKm: 250, boxes: [[70, 90, 8, 30]], organizations: ["monsoon-margin"] },
  { id: "asi-southeast", label: "Southeast Asia", continent: "asia", count: 5, minSpacingKm: 250, boxes: [[95, 125, -8, 20]], organizations: ["monsoon-margin"] },
  { id: "asi-levant", label: "Eastern Mediterranean", continent: "asia", count: 2, minSpacingKm: 150, boxes: [[34.5, 40, 30, 37]], organizations: ["dryland-springs"] },
  { id: "asi-west", label: "Arabia and Iran", continent: "asia", count: 3, minSpacingKm: 250, boxes: [[42, 60, 15, 38]], organizations: ["dryland-springs"] },
  { id: "asi-japan", label: "Japanese islands", continent: "asia", count: 2, minSpacingKm: 200, boxes: [[130, 145, 31, 44]], organizations: ["monsoon-margin"] },
  // ── sparse: Oceania ──
  { id: "oce-australia", label: "Northern and western Australia", continent: "oceania", count: 5, minSpacingKm: 300, boxes: [[115, 150, -32, -12]], organizations: ["southern-divide"] },
  { id: "oce-new-zealand", label: "New Zealand", continent: "oceania", count: 3, minSpacingKm: 150, boxes: [[166, 178.5, -46.5, -34.5]], organizations: ["greywacke"] },
  { id: "oce-fiji", label: "Fiji (next to the antimeridian)", continent: "oceania", count: 1, minSpacingKm: 50, boxes: [[177.2, 180, -18.5, -16]], organizations: ["coral-rim"] },
  { id: "oce-new-guinea", label: "New Guinea", continent: "oceania", count: 1, minSpacingKm: 150, boxes: [[141, 151, -10, -2]], organizations: ["coral-rim"] },
];

/** Share of each region's stations kept by the `test` profile (at least one each). */
export const TEST_PROFILE_SHARE = 0.25;

/** Stations of a region kept by a profile: the first n placed (placement is sequential). */
export function regionCount(spec: RegionSpec, profile: "full" | "test"): number {
  return profile === "full" ? spec.count : Math.max(1, Math.ceil(spec.count * TEST_PROFILE_SHARE));
}

/** Three-letter continent code used in station codes. */
export const CONTINENT_CODE: Record<Continent, string> = {
  "north-america": "NAM",
  "south-america": "SAM",
  europe: "EUR",
  africa: "AFR",
  asia: "ASI",
  oceania: "OCE",
};
